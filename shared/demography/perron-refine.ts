// λ, w and v of a matrix close to one already analysed (Monte Carlo draws,
// finite differences), by two-sided Rayleigh quotient iteration started from
// the known vectors: σ = vᵀAw / vᵀw, then (A − σI) w' = w and
// (A − σI)ᵀ v' = v with one LU per step (Ostrowski 1959; Parlett 1974,
// Math. Comp. 28:679 — locally cubic convergence). A few steps at n³/3 flops
// each instead of a full eigen-analysis.
//
// The answer is accepted only when it is provably the Perron root: for an
// irreducible non-negative matrix the only eigenvector with all entries
// positive is the Perron vector (Perron–Frobenius), so both converged vectors
// must be strictly positive, and both residuals small. Otherwise the caller
// falls back to dominantEigenDense. The caller must know that A is
// irreducible (e.g. the same non-zero pattern as an irreducible matrix).

/** Relative residual accepted, ‖Aw − λw‖₁/(λ‖w‖₁) and the same for v. */
const TOLERANCE = 1e-13;
const MAX_STEPS = 12;

export interface PerronRefinement {
  readonly lambda: number;
  /** Σw = 1. */
  readonly w: Float64Array;
  /** Scaled so v[0] = 1 when v[0] > 0 (the first stage otherwise). */
  readonly v: Float64Array;
}

function residual(a: Float64Array, n: number, x: Float64Array, lambda: number, transposed: boolean): number {
  let r = 0;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    if (transposed) for (let k = 0; k < n; k++) s += a[k * n + i]! * x[k]!;
    else for (let k = 0; k < n; k++) s += a[i * n + k]! * x[k]!;
    r += Math.abs(s - lambda * x[i]!);
    norm += Math.abs(x[i]!);
  }
  return r / (Math.abs(lambda) * norm);
}

/**
 * The Perron root and vectors of the irreducible non-negative row-major n×n
 * matrix `a`, started from positive guesses `w0`, `v0` (those of a nearby
 * matrix); null when the iteration does not reach a verified Perron pair.
 */
export function refinePerron(a: Float64Array, n: number, w0: ArrayLike<number>, v0: ArrayLike<number>): PerronRefinement | null {
  return perronRefiner(n)(a, w0, v0);
}

/** refinePerron for many matrices of one size, reusing its work space (the result's vectors are overwritten by the next call). */
export function perronRefiner(n: number): (a: Float64Array, w0: ArrayLike<number>, v0: ArrayLike<number>) => PerronRefinement | null {
  const w = new Float64Array(n);
  const v = new Float64Array(n);
  const shifted = new Float64Array(n * n);
  const aw = new Float64Array(n);
  const piv = new Int32Array(n);
  const work = new Float64Array(n);
  const wOut = new Float64Array(n);
  const vOut = new Float64Array(n);
  return (a, w0, v0) => {
    for (let i = 0; i < n; i++) {
      w[i] = w0[i]!;
      v[i] = v0[i]!;
    }
    for (let step = 0; step < MAX_STEPS; step++) {
      let vaw = 0;
      let vw = 0;
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let k = 0; k < n; k++) s += a[i * n + k]! * w[k]!;
        aw[i] = s;
      }
      for (let i = 0; i < n; i++) {
        vaw += v[i]! * aw[i]!;
        vw += v[i]! * w[i]!;
      }
      if (!(vw > 0)) return null;
      const sigma = vaw / vw;
      if (!(sigma > 0) || !Number.isFinite(sigma)) return null;
      if (residualOf(aw, w, sigma, n) <= TOLERANCE && residual(a, n, v, sigma, true) <= TOLERANCE) return finish(sigma, w, v, n, wOut, vOut);
      shifted.set(a);
      for (let i = 0; i < n; i++) shifted[i * n + i] = shifted[i * n + i]! - sigma;
      factor(shifted, n, piv);
      solve(shifted, n, piv, w, work);
      solveTransposed(shifted, n, piv, v, work);
      normalise(w);
      normalise(v);
      if (w.some((x) => !Number.isFinite(x)) || v.some((x) => !Number.isFinite(x))) return null;
    }
    return null;
  };
}

/** ‖Aw − σw‖₁/(σ‖w‖₁) from Aw already computed. */
function residualOf(aw: Float64Array, w: Float64Array, sigma: number, n: number): number {
  let r = 0;
  let norm = 0;
  for (let i = 0; i < n; i++) {
    r += Math.abs(aw[i]! - sigma * w[i]!);
    norm += Math.abs(w[i]!);
  }
  return r / (Math.abs(sigma) * norm);
}

/**
 * In-place LU with partial pivoting of the row-major n×n `lu` (row i of PA is
 * row piv[i] of A). A pivot that vanishes (A − σI at an exact eigenvalue) is
 * replaced by a tiny one: inverse iteration wants the near-singular solve.
 */
function factor(lu: Float64Array, n: number, piv: Int32Array): void {
  let maxEntry = 0;
  for (let k = 0; k < n * n; k++) maxEntry = Math.max(maxEntry, Math.abs(lu[k]!));
  const tiny = Math.max(n, 1) * 2.220446049250313e-16 * (maxEntry > 0 ? maxEntry : 1);
  for (let i = 0; i < n; i++) piv[i] = i;
  for (let k = 0; k < n; k++) {
    let p = k;
    let best = Math.abs(lu[k * n + k]!);
    for (let i = k + 1; i < n; i++) {
      const x = Math.abs(lu[i * n + k]!);
      if (x > best) {
        best = x;
        p = i;
      }
    }
    if (p !== k) {
      for (let j = 0; j < n; j++) {
        const t = lu[k * n + j]!;
        lu[k * n + j] = lu[p * n + j]!;
        lu[p * n + j] = t;
      }
      const t = piv[k]!;
      piv[k] = piv[p]!;
      piv[p] = t;
    }
    let pivot = lu[k * n + k]!;
    if (Math.abs(pivot) <= tiny) {
      pivot = pivot < 0 ? -tiny : tiny;
      lu[k * n + k] = pivot;
    }
    for (let i = k + 1; i < n; i++) {
      const l = lu[i * n + k]! / pivot;
      lu[i * n + k] = l;
      if (l === 0) continue;
      for (let j = k + 1; j < n; j++) lu[i * n + j] = lu[i * n + j]! - l * lu[k * n + j]!;
    }
  }
}

/** x ← A⁻¹x with the factors (b: work space of n). */
function solve(lu: Float64Array, n: number, piv: Int32Array, x: Float64Array, b: Float64Array): void {
  b.set(x);
  for (let i = 0; i < n; i++) x[i] = b[piv[i]!]!;
  for (let i = 1; i < n; i++) {
    let s = x[i]!;
    for (let j = 0; j < i; j++) s -= lu[i * n + j]! * x[j]!;
    x[i] = s;
  }
  for (let i = n - 1; i >= 0; i--) {
    let s = x[i]!;
    for (let j = i + 1; j < n; j++) s -= lu[i * n + j]! * x[j]!;
    x[i] = s / lu[i * n + i]!;
  }
}

/** x ← A⁻ᵀx with the factors (PA = LU ⇒ Aᵀ = Uᵀ Lᵀ P). */
function solveTransposed(lu: Float64Array, n: number, piv: Int32Array, x: Float64Array, y: Float64Array): void {
  y.set(x);
  for (let i = 0; i < n; i++) {
    const yi = y[i]! / lu[i * n + i]!;
    y[i] = yi;
    if (yi === 0) continue;
    for (let j = i + 1; j < n; j++) y[j] = y[j]! - lu[i * n + j]! * yi;
  }
  for (let i = n - 1; i >= 0; i--) {
    const zi = y[i]!;
    if (zi === 0) continue;
    for (let j = 0; j < i; j++) y[j] = y[j]! - lu[i * n + j]! * zi;
  }
  for (let i = 0; i < n; i++) x[piv[i]!] = y[i]!;
}

/** Scale to Σ|x| = 1 with a positive sum. */
function normalise(x: Float64Array): void {
  let s = 0;
  let abs = 0;
  for (let i = 0; i < x.length; i++) {
    s += x[i]!;
    abs += Math.abs(x[i]!);
  }
  const c = (s < 0 ? -1 : 1) / abs;
  for (let i = 0; i < x.length; i++) x[i] = x[i]! * c;
}

function finish(lambda: number, w: Float64Array, v: Float64Array, n: number, wOut: Float64Array, vOut: Float64Array): PerronRefinement | null {
  for (let i = 0; i < n; i++) if (!(w[i]! > 0) || !(v[i]! > 0)) return null; // not the Perron pair
  let sw = 0;
  for (let i = 0; i < n; i++) sw += w[i]!;
  for (let i = 0; i < n; i++) wOut[i] = w[i]! / sw;
  const v0 = v[0]!;
  for (let i = 0; i < n; i++) vOut[i] = v[i]! / v0;
  return { lambda, w: wOut, v: vOut };
}
