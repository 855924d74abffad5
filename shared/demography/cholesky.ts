// Cholesky factorisation of a symmetric positive-definite matrix, R = L Lᵀ,
// as used to correlate normal draws (z = L ε has correlation R when the
// ε are independent standard normals).

/** Pivots at or below this count as zero: the matrix is not (numerically) positive definite. */
export const CHOLESKY_PIVOT_TOLERANCE = 1e-10;

export type CholeskyResult =
  | { readonly ok: true; /** Lower-triangular factor, row-major n×n. */ readonly L: Float64Array }
  | { readonly ok: false; /** 0-based row at which the factorisation broke down. */ readonly row: number; /** The pivot found there (≤ tolerance). */ readonly pivot: number };

/** Lower Cholesky factor of a symmetric matrix given as rows, or where it fails when the matrix is not positive definite. */
export function choleskyLower(matrix: readonly (readonly number[])[]): CholeskyResult {
  const n = matrix.length;
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const row = matrix[i];
    if (!row || row.length !== n) throw new RangeError(`Row ${i + 1} of the matrix must have ${n} entries.`);
    for (let j = 0; j <= i; j++) {
      let s = row[j]!;
      for (let k = 0; k < j; k++) s -= L[i * n + k]! * L[j * n + k]!;
      if (i === j) {
        // The tolerance is relative to the diagonal entry (1 for a correlation matrix).
        if (!(s > CHOLESKY_PIVOT_TOLERANCE * Math.max(1, Math.abs(row[i]!)))) return { ok: false, row: i, pivot: s };
        L[i * n + i] = Math.sqrt(s);
      } else {
        L[i * n + j] = s / L[j * n + j]!;
      }
    }
  }
  return { ok: true, L };
}
