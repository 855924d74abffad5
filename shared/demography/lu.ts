// Dense LU factorisation with partial pivoting (PA = LU) and the two solves
// the core needs: A x = b and Aᵀ x = b from the same factors.
import { EPS } from "./matrix";

export interface LuFactors {
  readonly n: number;
  /** L (unit lower, below the diagonal) and U (on and above), row-major. */
  readonly lu: Float64Array;
  /** Row i of PA is row piv[i] of A. */
  readonly piv: Int32Array;
  /** Smallest |u_kk| divided by the largest |a_ij| (0 for an exactly singular matrix). */
  readonly minPivotRatio: number;
  /** True when a pivot is negligible next to the entries: the matrix is singular to working precision. */
  readonly singular: boolean;
}

/**
 * Factor a copy of the row-major n×n matrix `a`. With `replaceTinyPivots`, a
 * negligible pivot is replaced by a tiny multiple of the largest entry so the
 * solves stay finite — what shifted inverse iteration wants, where a
 * near-singular A − σI is the point.
 */
export function luFactor(a: Float64Array, n: number, options?: { replaceTinyPivots?: boolean }): LuFactors {
  return luFactorInPlace(Float64Array.from(a), n, new Int32Array(n), options);
}

/**
 * luFactor without allocation: factors the row-major n×n `lu` in place and
 * writes the row order into `piv` (for solvers that factor many matrices of
 * one size in the same work space). The returned factors share both arrays.
 */
export function luFactorInPlace(lu: Float64Array, n: number, piv: Int32Array, options?: { replaceTinyPivots?: boolean }): LuFactors {
  for (let i = 0; i < n; i++) piv[i] = i;
  let maxEntry = 0;
  for (let k = 0; k < lu.length; k++) maxEntry = Math.max(maxEntry, Math.abs(lu[k] as number));
  const tiny = Math.max(n, 1) * EPS * (maxEntry > 0 ? maxEntry : 1);
  let minPivot = Infinity;
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(lu[k * n + k] as number);
    for (let i = k + 1; i < n; i++) {
      const v = Math.abs(lu[i * n + k] as number);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (p !== k) {
      const rk = k * n;
      const rp = p * n;
      for (let j = 0; j < n; j++) {
        const t = lu[rk + j] as number;
        lu[rk + j] = lu[rp + j] as number;
        lu[rp + j] = t;
      }
      const t = piv[k] as number;
      piv[k] = piv[p] as number;
      piv[p] = t;
    }
    let pivot = lu[k * n + k] as number;
    minPivot = Math.min(minPivot, Math.abs(pivot));
    if (Math.abs(pivot) <= tiny) {
      if (!options?.replaceTinyPivots) continue; // leave it; `singular` reports it
      pivot = pivot < 0 ? -tiny : tiny;
      lu[k * n + k] = pivot;
    }
    const rk = k * n;
    for (let i = k + 1; i < n; i++) {
      const ri = i * n;
      const l = (lu[ri + k] as number) / pivot;
      lu[ri + k] = l;
      if (l === 0) continue;
      for (let j = k + 1; j < n; j++) lu[ri + j] = (lu[ri + j] as number) - l * (lu[rk + j] as number);
    }
  }
  const ratio = maxEntry > 0 ? (Number.isFinite(minPivot) ? minPivot : 0) / maxEntry : 0;
  return { n, lu, piv, minPivotRatio: ratio, singular: !(minPivot > tiny) };
}

/** Solve A x = b with the factors of A; returns a new vector. */
export function luSolve(f: LuFactors, b: Float64Array): Float64Array {
  const { n, piv } = f;
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = b[piv[i] as number] as number;
  substitute(f, x);
  return x;
}

/** x ← A⁻¹x with the factors of A, in place (`scratch`: n numbers of work space). */
export function luSolveInPlace(f: LuFactors, x: Float64Array, scratch: Float64Array): void {
  const { n, piv } = f;
  scratch.set(x);
  for (let i = 0; i < n; i++) x[i] = scratch[piv[i] as number] as number;
  substitute(f, x);
}

/** L y = Pb then U x = y, on the permuted right-hand side already in x. */
function substitute(f: LuFactors, x: Float64Array): void {
  const { n, lu } = f;
  for (let i = 1; i < n; i++) {
    const ri = i * n;
    let s = x[i] as number;
    for (let j = 0; j < i; j++) s -= (lu[ri + j] as number) * (x[j] as number);
    x[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    const ri = i * n;
    let s = x[i] as number;
    for (let j = i + 1; j < n; j++) s -= (lu[ri + j] as number) * (x[j] as number);
    x[i] = s / (lu[ri + i] as number);
  }
}

/** Solve Aᵀ x = b with the factors of A (PA = LU ⇒ Aᵀ = Uᵀ Lᵀ P); returns a new vector. */
export function luSolveTransposed(f: LuFactors, b: Float64Array): Float64Array {
  const x = new Float64Array(f.n);
  const y = Float64Array.from(b);
  transposedSubstitute(f, y);
  for (let i = 0; i < f.n; i++) x[f.piv[i] as number] = y[i] as number;
  return x;
}

/** x ← A⁻ᵀx with the factors of A, in place (`scratch`: n numbers of work space, not x). */
export function luSolveTransposedInPlace(f: LuFactors, x: Float64Array, scratch: Float64Array): void {
  scratch.set(x);
  transposedSubstitute(f, scratch);
  for (let i = 0; i < f.n; i++) x[f.piv[i] as number] = scratch[i] as number;
}

/** Uᵀ z = y, then Lᵀ on the result, in place on y. */
function transposedSubstitute(f: LuFactors, y: Float64Array): void {
  const { n, lu } = f;
  // Uᵀ y = b: forward substitution, column-oriented so the inner loop runs along a row of U.
  for (let i = 0; i < n; i++) {
    const ri = i * n;
    const yi = (y[i] as number) / (lu[ri + i] as number);
    y[i] = yi;
    if (yi === 0) continue;
    for (let j = i + 1; j < n; j++) y[j] = (y[j] as number) - (lu[ri + j] as number) * yi;
  }
  // Lᵀ z = y: backward substitution with the unit lower factor.
  for (let i = n - 1; i >= 0; i--) {
    const ri = i * n;
    const zi = y[i] as number;
    if (zi === 0) continue;
    for (let j = 0; j < i; j++) y[j] = (y[j] as number) - (lu[ri + j] as number) * zi;
  }
}
