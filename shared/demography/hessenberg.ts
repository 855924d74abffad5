// Small dense eigen-solves on an upper Hessenberg matrix H (m×m, row-major),
// as produced by the Arnoldi process in krylov.ts: all eigenvalues by the
// Francis double-shift QR algorithm, and single eigenvectors by inverse
// iteration. Golub & Van Loan, Matrix Computations (4th ed.), §7.5 and §7.6.
import { EPS } from "./matrix";

const MAX_SWEEPS_PER_EIGENVALUE = 60;

/**
 * All eigenvalues of the upper Hessenberg matrix h (overwritten) into
 * (wr, wi). Complex conjugate pairs come out adjacent, positive imaginary part
 * first. Returns false when an eigenvalue did not converge (never seen on
 * finite input, but callers treat it as a failed solve, not a result).
 */
export function hessenbergEigenvalues(h: Float64Array, m: number, wr: Float64Array, wi: Float64Array): boolean {
  let scaleNorm = 0;
  for (let k = 0; k < m * m; k++) scaleNorm += Math.abs(h[k] as number);
  let hi = m - 1;
  let sweeps = 0;
  while (hi >= 0) {
    // Deflate: find the top `lo` of the unreduced block ending at `hi`.
    let lo = hi;
    for (; lo > 0; lo--) {
      const sub = Math.abs(h[lo * m + lo - 1] as number);
      let s = Math.abs(h[(lo - 1) * m + lo - 1] as number) + Math.abs(h[lo * m + lo] as number);
      if (s === 0) s = scaleNorm;
      if (sub <= EPS * s) {
        h[lo * m + lo - 1] = 0;
        break;
      }
    }
    if (lo === hi) {
      wr[hi] = h[hi * m + hi] as number;
      wi[hi] = 0;
      hi -= 1;
      sweeps = 0;
      continue;
    }
    if (lo === hi - 1) {
      twoByTwoEigenvalues(
        h[(hi - 1) * m + hi - 1] as number,
        h[(hi - 1) * m + hi] as number,
        h[hi * m + hi - 1] as number,
        h[hi * m + hi] as number,
        wr,
        wi,
        hi - 1,
      );
      hi -= 2;
      sweeps = 0;
      continue;
    }
    if (sweeps >= MAX_SWEEPS_PER_EIGENVALUE) return false;
    sweeps += 1;

    // Shifts: the eigenvalues of the trailing 2×2 block, used through their
    // sum s and product t so the sweep stays in real arithmetic. Every tenth
    // sweep uses an ad hoc shift to break the rare stagnation cycles.
    let s: number;
    let t: number;
    if (sweeps % 10 === 0) {
      const w = Math.abs(h[hi * m + hi - 1] as number) + Math.abs(h[(hi - 1) * m + hi - 2] as number);
      const a = (h[hi * m + hi] as number) + 0.75 * w;
      s = 2 * a;
      t = a * a + 0.4375 * w * w;
    } else {
      const a = h[(hi - 1) * m + hi - 1] as number;
      const b = h[(hi - 1) * m + hi] as number;
      const c = h[hi * m + hi - 1] as number;
      const d = h[hi * m + hi] as number;
      s = a + d;
      t = a * d - b * c;
    }
    francisSweep(h, m, lo, hi, s, t);
  }
  return true;
}

/** Eigenvalues of [[a, b], [c, d]] into (wr, wi) at k and k + 1. */
function twoByTwoEigenvalues(a: number, b: number, c: number, d: number, wr: Float64Array, wi: Float64Array, k: number): void {
  const p = 0.5 * (a - d);
  const disc = p * p + b * c;
  if (disc >= 0) {
    // Real pair; the larger-magnitude root first, the other from the product
    // of the roots, which avoids cancellation.
    const r = Math.sqrt(disc);
    const z = p >= 0 ? p + r : p - r;
    wr[k] = d + z;
    wr[k + 1] = z !== 0 ? d - (b * c) / z : d + z;
    wi[k] = 0;
    wi[k + 1] = 0;
  } else {
    const im = Math.sqrt(-disc);
    wr[k] = d + p;
    wr[k + 1] = d + p;
    wi[k] = im;
    wi[k + 1] = -im;
  }
}

/**
 * One implicit double-shift QR sweep on rows/columns lo..hi of h, with shifts
 * given by their sum s and product t: chase the bulge made by the first
 * column of H² − sH + tI with 3×3 Householder reflectors.
 */
function francisSweep(h: Float64Array, m: number, lo: number, hi: number, s: number, t: number): void {
  const h00 = h[lo * m + lo] as number;
  const h01 = h[lo * m + lo + 1] as number;
  const h10 = h[(lo + 1) * m + lo] as number;
  const h11 = h[(lo + 1) * m + lo + 1] as number;
  const h21 = h[(lo + 2) * m + lo + 1] as number;
  let x = h00 * h00 + h01 * h10 - s * h00 + t;
  let y = h10 * (h00 + h11 - s);
  let z = h10 * h21;
  for (let k = lo; k <= hi - 2; k++) {
    const scaleXYZ = Math.abs(x) + Math.abs(y) + Math.abs(z);
    if (scaleXYZ !== 0) {
      // Only the direction matters; scaling keeps the squares from underflowing.
      x /= scaleXYZ;
      y /= scaleXYZ;
      z /= scaleXYZ;
      const nrm = norm3(x, y, z);
      const u0 = x >= 0 ? x + nrm : x - nrm;
      const u1 = y;
      const u2 = z;
      const beta = 2 / (u0 * u0 + u1 * u1 + u2 * u2);
      const r0 = k * m;
      const r1 = r0 + m;
      const r2 = r1 + m;
      // From the left, on rows k..k+2 (columns from the bulge to the window end).
      for (let j = Math.max(lo, k - 1); j <= hi; j++) {
        const d = beta * (u0 * (h[r0 + j] as number) + u1 * (h[r1 + j] as number) + u2 * (h[r2 + j] as number));
        h[r0 + j] = (h[r0 + j] as number) - d * u0;
        h[r1 + j] = (h[r1 + j] as number) - d * u1;
        h[r2 + j] = (h[r2 + j] as number) - d * u2;
      }
      // From the right, on columns k..k+2.
      const iEnd = Math.min(k + 3, hi);
      for (let i = lo; i <= iEnd; i++) {
        const ri = i * m;
        const d = beta * (u0 * (h[ri + k] as number) + u1 * (h[ri + k + 1] as number) + u2 * (h[ri + k + 2] as number));
        h[ri + k] = (h[ri + k] as number) - d * u0;
        h[ri + k + 1] = (h[ri + k + 1] as number) - d * u1;
        h[ri + k + 2] = (h[ri + k + 2] as number) - d * u2;
      }
      if (k > lo) {
        h[(k + 1) * m + k - 1] = 0;
        h[(k + 2) * m + k - 1] = 0;
      }
    }
    x = h[(k + 1) * m + k] as number;
    y = h[(k + 2) * m + k] as number;
    z = k < hi - 2 ? (h[(k + 3) * m + k] as number) : 0;
  }
  // Last step: a Givens rotation on rows/columns hi−1, hi.
  const r = norm3(x, y, 0);
  if (r !== 0) {
    const c = x / r;
    const sn = y / r;
    const k = hi - 1;
    for (let j = Math.max(lo, k - 1); j <= hi; j++) {
      const a = h[k * m + j] as number;
      const b = h[(k + 1) * m + j] as number;
      h[k * m + j] = c * a + sn * b;
      h[(k + 1) * m + j] = -sn * a + c * b;
    }
    for (let i = lo; i <= hi; i++) {
      const a = h[i * m + k] as number;
      const b = h[i * m + k + 1] as number;
      h[i * m + k] = c * a + sn * b;
      h[i * m + k + 1] = -sn * a + c * b;
    }
    if (k > lo) h[(k + 1) * m + k - 1] = 0;
  }
}

/**
 * Right eigenvector y of the Hessenberg matrix h for the real eigenvalue
 * theta, by two steps of inverse iteration with (H − θI); returned with
 * ‖y‖₂ = 1. `work` needs m·m entries. Gaussian elimination on a Hessenberg
 * matrix only ever pivots between adjacent rows, so each solve is O(m²).
 */
export function hessenbergEigenvector(h: Float64Array, m: number, theta: number, y: Float64Array, work: Float64Array): void {
  let scaleNorm = 0;
  for (let k = 0; k < m * m; k++) scaleNorm = Math.max(scaleNorm, Math.abs(h[k] as number));
  const tiny = EPS * (scaleNorm > 0 ? scaleNorm : 1);
  for (let k = 0; k < m * m; k++) work[k] = h[k] as number;
  for (let i = 0; i < m; i++) work[i * m + i] = (work[i * m + i] as number) - theta;
  // Factor once, remember each step's swap and multiplier (row k+1 of `work`
  // below the diagonal is free after elimination and stores the multiplier).
  const swapped = new Uint8Array(m);
  for (let k = 0; k < m - 1; k++) {
    const rk = k * m;
    const rk1 = rk + m;
    if (Math.abs(work[rk1 + k] as number) > Math.abs(work[rk + k] as number)) {
      swapped[k] = 1;
      for (let j = k; j < m; j++) {
        const t = work[rk + j] as number;
        work[rk + j] = work[rk1 + j] as number;
        work[rk1 + j] = t;
      }
    }
    let p = work[rk + k] as number;
    if (Math.abs(p) <= tiny) {
      p = tiny;
      work[rk + k] = p;
    }
    const l = (work[rk1 + k] as number) / p;
    work[rk1 + k] = l;
    if (l !== 0) for (let j = k + 1; j < m; j++) work[rk1 + j] = (work[rk1 + j] as number) - l * (work[rk + j] as number);
  }
  const last = (m - 1) * m + m - 1;
  if (Math.abs(work[last] as number) <= tiny) work[last] = tiny;

  y.fill(1, 0, m);
  for (let iter = 0; iter < 2; iter++) {
    for (let k = 0; k < m - 1; k++) {
      if (swapped[k] === 1) {
        const t = y[k] as number;
        y[k] = y[k + 1] as number;
        y[k + 1] = t;
      }
      y[k + 1] = (y[k + 1] as number) - (work[(k + 1) * m + k] as number) * (y[k] as number);
    }
    for (let i = m - 1; i >= 0; i--) {
      const ri = i * m;
      let s = y[i] as number;
      for (let j = i + 1; j < m; j++) s -= (work[ri + j] as number) * (y[j] as number);
      y[i] = s / (work[ri + i] as number);
    }
    normalise2(y, m);
  }
}

/**
 * Left eigenvector z (zᵀH = θzᵀ) of the Hessenberg matrix h for a real
 * eigenvalue: reversing the index order of Hᵀ gives an upper Hessenberg
 * matrix again, whose right eigenvector, reversed back, is z. `work` needs
 * 2·m·m entries.
 */
export function hessenbergLeftEigenvector(h: Float64Array, m: number, theta: number, z: Float64Array, work: Float64Array): void {
  const flipped = work.subarray(m * m, 2 * m * m);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < m; j++) flipped[i * m + j] = h[(m - 1 - j) * m + (m - 1 - i)] as number;
  }
  const y = new Float64Array(m);
  hessenbergEigenvector(flipped, m, theta, y, work);
  for (let i = 0; i < m; i++) z[i] = y[m - 1 - i] as number;
}

/**
 * Size of the last component of the unit right eigenvector of h for the
 * complex eigenvalue (re, im): |y_m| with ‖y‖₂ = 1. The Arnoldi residual of a
 * Ritz pair is |β_m|·|y_m|, so this is all the restart test needs for a
 * complex Ritz value. One complex inverse-iteration solve.
 */
export function hessenbergEigenvectorTail(h: Float64Array, m: number, re: number, im: number): number {
  let scaleNorm = 0;
  for (let k = 0; k < m * m; k++) scaleNorm = Math.max(scaleNorm, Math.abs(h[k] as number));
  const tiny = EPS * (scaleNorm > 0 ? scaleNorm : 1);
  const ar = Float64Array.from(h.subarray(0, m * m));
  const ai = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    ar[i * m + i] = (ar[i * m + i] as number) - re;
    ai[i * m + i] = -im;
  }
  const yr = new Float64Array(m).fill(1);
  const yi = new Float64Array(m);
  for (let k = 0; k < m - 1; k++) {
    const rk = k * m;
    const rk1 = rk + m;
    if (Math.hypot(ar[rk1 + k] as number, ai[rk1 + k] as number) > Math.hypot(ar[rk + k] as number, ai[rk + k] as number)) {
      for (let j = k; j < m; j++) {
        let t = ar[rk + j] as number;
        ar[rk + j] = ar[rk1 + j] as number;
        ar[rk1 + j] = t;
        t = ai[rk + j] as number;
        ai[rk + j] = ai[rk1 + j] as number;
        ai[rk1 + j] = t;
      }
      let t = yr[k] as number;
      yr[k] = yr[k + 1] as number;
      yr[k + 1] = t;
      t = yi[k] as number;
      yi[k] = yi[k + 1] as number;
      yi[k + 1] = t;
    }
    let pr = ar[rk + k] as number;
    let pi = ai[rk + k] as number;
    if (Math.hypot(pr, pi) <= tiny) {
      pr = tiny;
      pi = 0;
      ar[rk + k] = pr;
      ai[rk + k] = 0;
    }
    const den = pr * pr + pi * pi;
    const br = ar[rk1 + k] as number;
    const bi = ai[rk1 + k] as number;
    const lr = (br * pr + bi * pi) / den;
    const li = (bi * pr - br * pi) / den;
    for (let j = k + 1; j < m; j++) {
      const ur = ar[rk + j] as number;
      const ui = ai[rk + j] as number;
      ar[rk1 + j] = (ar[rk1 + j] as number) - (lr * ur - li * ui);
      ai[rk1 + j] = (ai[rk1 + j] as number) - (lr * ui + li * ur);
    }
    const ykr = yr[k] as number;
    const yki = yi[k] as number;
    yr[k + 1] = (yr[k + 1] as number) - (lr * ykr - li * yki);
    yi[k + 1] = (yi[k + 1] as number) - (lr * yki + li * ykr);
  }
  for (let i = m - 1; i >= 0; i--) {
    const ri = i * m;
    let sr = yr[i] as number;
    let si = yi[i] as number;
    for (let j = i + 1; j < m; j++) {
      const ur = ar[ri + j] as number;
      const ui = ai[ri + j] as number;
      sr -= ur * (yr[j] as number) - ui * (yi[j] as number);
      si -= ur * (yi[j] as number) + ui * (yr[j] as number);
    }
    let pr = ar[ri + i] as number;
    let pi = ai[ri + i] as number;
    if (Math.hypot(pr, pi) <= tiny) {
      pr = tiny;
      pi = 0;
    }
    const den = pr * pr + pi * pi;
    yr[i] = (sr * pr + si * pi) / den;
    yi[i] = (si * pr - sr * pi) / den;
  }
  let nrm = 0;
  for (let i = 0; i < m; i++) nrm = Math.hypot(nrm, yr[i] as number, yi[i] as number);
  if (nrm === 0 || !Number.isFinite(nrm)) return 1;
  return Math.hypot(yr[m - 1] as number, yi[m - 1] as number) / nrm;
}

/**
 * √(x² + y² + z²). Math.hypot guards against overflow but is slow in V8;
 * the plain formula is exact enough and only falls back when it overflows or
 * underflows.
 */
export function norm3(x: number, y: number, z: number): number {
  const s = x * x + y * y + z * z;
  if (s > 1e-290 && s < 1e290) return Math.sqrt(s);
  return Math.hypot(x, y, z);
}

function normalise2(y: Float64Array, m: number): void {
  let big = 0;
  for (let i = 0; i < m; i++) big = Math.max(big, Math.abs(y[i] as number));
  if (big === 0 || !Number.isFinite(big)) {
    y.fill(1 / Math.sqrt(m), 0, m);
    return;
  }
  let s = 0;
  for (let i = 0; i < m; i++) {
    const t = (y[i] as number) / big;
    y[i] = t;
    s += t * t;
  }
  const inv = 1 / Math.sqrt(s);
  for (let i = 0; i < m; i++) y[i] = (y[i] as number) * inv;
}
