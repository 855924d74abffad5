// Balancing: a diagonal similarity B = D⁻¹ A D that makes each stage's
// off-diagonal row and column sums comparable (Parlett & Reinsch 1969,
// Numer. Math. 13:293). Eigenvalues are unchanged; eigenvectors map back as
// w = D w_B and v = D⁻¹ v_B. Population matrices mixing fertilities of 10⁵
// eggs with survival of 10⁻⁴ are badly scaled, and an eigen-solve on the
// balanced matrix is far more accurate. D holds powers of 2, so scaling adds
// no rounding error.

/** Off-diagonal row/column sums more unequal than this trigger balancing. */
const IMBALANCE = 8;

/** Balanced copy of a non-negative row-major matrix and the scaling d (B = D⁻¹AD), or null when already balanced. */
export function balance(a: Float64Array, n: number): { matrix: Float64Array; d: Float64Array } | null {
  const row = new Float64Array(n);
  const col = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      const v = Math.abs(a[base + j] as number);
      row[i] = (row[i] as number) + v;
      col[j] = (col[j] as number) + v;
    }
  }
  let needed = false;
  for (let i = 0; i < n && !needed; i++) {
    const r = row[i] as number;
    const c = col[i] as number;
    if (r > 0 && c > 0 && (r > IMBALANCE * c || c > IMBALANCE * r)) needed = true;
  }
  if (!needed) return null;

  const b = Float64Array.from(a);
  const d = new Float64Array(n).fill(1);
  for (let sweep = 0; sweep < 40; sweep++) {
    let changed = false;
    for (let i = 0; i < n; i++) {
      const c = col[i] as number;
      const r = row[i] as number;
      // The running sums can drift a hair below zero (seen: −2.4e−19), and a
      // non-positive sum would make the loops below run forever: skip it.
      if (!(c > 0) || !(r > 0) || !Number.isFinite(c) || !Number.isFinite(r)) continue;
      // f = power of 2 with c·f² ≈ r: column i ×f, row i ÷f (bounded: doubles span 2^±1074).
      let f = 1;
      let cf = c;
      for (let k = 0; cf < r / 2 && k < 1100; k++) {
        f *= 2;
        cf *= 4;
      }
      for (let k = 0; cf > 2 * r && k < 1100; k++) {
        f /= 2;
        cf /= 4;
      }
      if (f === 1 || c * f + r / f >= 0.95 * (c + r)) continue;
      changed = true;
      d[i] = (d[i] as number) * f;
      const base = i * n;
      for (let j = 0; j < n; j++) {
        if (j === i) continue;
        const rowEntry = Math.abs(b[base + j] as number);
        b[base + j] = (b[base + j] as number) / f;
        col[j] = (col[j] as number) + rowEntry * (1 / f - 1);
        const colEntry = Math.abs(b[j * n + i] as number);
        b[j * n + i] = (b[j * n + i] as number) * f;
        row[j] = (row[j] as number) + colEntry * (f - 1);
      }
      col[i] = c * f;
      row[i] = r / f;
    }
    if (!changed) break;
  }
  return { matrix: b, d };
}
