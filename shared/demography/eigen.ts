// Dominant eigenvalue λ (Perron root), stable stage distribution w, reproductive
// values v, and the second eigenvalue λ₂ with the quantities derived from it
// (damping ratio, period, convergence time). Caswell 2001, ch. 4.
//
// Method. Small matrices (n ≤ DENSE_LIMIT): a full Arnoldi process reduces A to
// Hessenberg form H = VᵀAV, whose eigenvalues (Francis QR) are all of A's; w
// and v are inverse-iteration eigenvectors of H mapped back by V. Larger
// matrices: implicitly restarted Arnoldi on A for λ, w and λ₂, with a
// residual test on every wanted Ritz value; then v by inverse iteration at
// the now-known λ (one dense LU, n ≤ 100) or by restarted Arnoldi on Aᵀ
// (larger n, where the LU would cost more than the Krylov run). Imprimitive matrices
// have several eigenvalues on the top circle (λ·e^{2πik/d}); plain power
// iteration would oscillate among them, but a Krylov space resolves them as
// separate Ritz values and λ is picked as the real one with the largest real
// part, which for a non-negative matrix is the Perron root. When the Krylov
// runs do not converge within their budget, an explicit fallback takes over:
// shifted inverse iteration with a dense LU of A − σI, σ an upper
// Collatz–Wielandt bound (max_i (Ax)_i/x_i ≥ λ for any positive x), so that λ
// is the eigenvalue nearest the shift. An irreducible matrix with a long
// period d (many eigenvalues on the top circle, which no small Krylov space
// separates) goes straight to that fallback, started from power iterates
// averaged over one period: the components on the circle, λω^j with
// ω = e^{2πi/d}, cancel in such an average because Σ_k ω^{jk} = 0 for j ≠ 0.
// If even the fallback fails, the best estimate is returned with
// converged = false — never silently. Badly scaled matrices are balanced
// first (balance.ts).
import { EPS, matvec, normFrobenius, pseudoRandom, toArray, toDense, vecmat } from "./matrix";
import { combineRows, restartedArnoldi, ritzVector, type KrylovResult } from "./krylov";
import { hessenbergLeftEigenvector } from "./hessenberg";
import { luFactor, luFactorInPlace, luSolve, luSolveInPlace, luSolveTransposed, luSolveTransposedInPlace, type LuFactors } from "./lu";
import { graphStructure, type GraphStructure } from "./graph";
import { balance } from "./balance";

/** Up to this size the Arnoldi process spans the whole space (all eigenvalues exact). */
const DENSE_LIMIT = 20;
/** Basis size of the restarted Arnoldi process for larger matrices. */
const BASIS_SIZE = 24;
/** Up to this size v comes from inverse iteration with a dense LU instead of a Krylov run on Aᵀ. */
const LU_LEFT_LIMIT = 100;
/** Periods above this put more eigenvalues on the top circle than the Krylov space separates well. */
const LONG_PERIOD = 6;
/** Residual wanted for λ, relative to λ. */
const TOL_LAMBDA = 1e-13;
/**
 * λ₂ only feeds ρ = λ/|λ₂|, the period and t_x = ln x / ln ρ, so its target
 * is set on ln ρ: a Ritz residual ≤ TOL_LOG_RHO · |λ₂| · ln(λ/|λ₂|) changes
 * ln ρ by about TOL_LOG_RHO relative. The target is strictest exactly when ρ
 * is near 1, where t_x is most sensitive; for ρ ≫ 1 it does not spend
 * hundreds of products polishing digits nobody reads.
 */
const TOL_LOG_RHO = 1e-7;

function secondTolerance(re: number, im: number, leadRe: number, leadIm: number): number {
  const m2 = Math.hypot(re, im);
  const m1 = Math.hypot(leadRe, leadIm);
  if (!(m2 > 0) || !(m1 > 0)) return 0;
  return TOL_LOG_RHO * m2 * Math.abs(Math.log(m1 / m2));
}
/** A final residual ‖Aw − λw‖₁ above this (relative to λ) sends the result to the fallback. */
const ACCEPT = 1e-10;
/** |v_j| below this times max|v| counts as a zero when choosing the entry that v is scaled by. */
const V_ZERO = 1e-12;

/** The second eigenvalue λ₂ (largest modulus after λ), with im ≥ 0 (its conjugate is implied). */
export interface SecondEigenvalue {
  readonly re: number;
  readonly im: number;
  readonly modulus: number;
  /** False when the Krylov estimate did not reach its residual target. */
  readonly converged: boolean;
}

export type EigenMethod = "exact" | "hessenberg" | "restarted-arnoldi" | "shift-invert";

/** Internal result on Float64Array buffers. */
export interface EigenDense {
  readonly n: number;
  readonly lambda: number;
  /** Right eigenvector, Σw = 1. */
  readonly w: Float64Array;
  /** Left eigenvector, v[vScaleIndex] = 1. */
  readonly v: Float64Array;
  readonly vScaleIndex: number;
  readonly residualRight: number;
  readonly residualLeft: number;
  readonly iterations: number;
  readonly converged: boolean;
  readonly method: EigenMethod;
  readonly second: SecondEigenvalue | null;
}

export interface DominantEigenOptions {
  /** Also estimate λ₂ (default true). */
  readonly second?: boolean;
  /** Life-cycle graph structure if already known (saves a pass over A). */
  readonly structure?: GraphStructure;
}

/** Result of dominantEigen: plain, JSON-serialisable numbers. */
export interface DominantEigen {
  /** Dominant eigenvalue λ (asymptotic growth factor per projection interval). */
  readonly lambda: number;
  /** Stable stage distribution (proportions, Σw = 1). */
  readonly w: number[];
  /** Reproductive values, scaled so v[vScaleIndex] = 1 (relative to that stage). */
  readonly v: number[];
  /** 0 (v₁ = 1) unless v₁ = 0, then the first stage with a non-zero reproductive value. */
  readonly vScaleIndex: number;
  /** ‖Aw − λw‖₁ (w has Σw = 1; units of λ). */
  readonly residualRight: number;
  /** ‖vᵀA − λvᵀ‖₁ / ‖v‖₁ (units of λ). */
  readonly residualLeft: number;
  /** Matrix–vector products plus linear solves used. */
  readonly iterations: number;
  readonly converged: boolean;
  readonly method: EigenMethod;
  /** λ₂, or null for a 1×1 matrix (there is no second eigenvalue). */
  readonly second: SecondEigenvalue | null;
}

/** Dominant eigenvalue λ (per projection interval), right vector w (Σ = 1) and left vector v (v₁ = 1) of a non-negative matrix. */
export function dominantEigen(A: readonly (readonly number[])[], options?: DominantEigenOptions): DominantEigen {
  const n = A.length;
  const r = dominantEigenDense(toDense(A), n, options);
  return {
    lambda: r.lambda,
    w: toArray(r.w),
    v: toArray(r.v),
    vScaleIndex: r.vScaleIndex,
    residualRight: r.residualRight,
    residualLeft: r.residualLeft,
    iterations: r.iterations,
    converged: r.converged,
    method: r.method,
    second: r.second,
  };
}

/** Stable stage distribution w (proportions per stage, Σw = 1). */
export function stableStageDistribution(A: readonly (readonly number[])[]): number[] {
  return dominantEigen(A, { second: false }).w;
}

/** Reproductive values v (relative to stage `scaleIndex`, normally stage 1). */
export function reproductiveValues(A: readonly (readonly number[])[]): { values: number[]; scaleIndex: number } {
  const r = dominantEigen(A, { second: false });
  return { values: r.v, scaleIndex: r.vScaleIndex };
}

/** Second eigenvalue λ₂ (per projection interval), or null for a 1×1 matrix. */
export function secondEigenvalue(A: readonly (readonly number[])[]): SecondEigenvalue | null {
  return dominantEigen(A).second;
}

/** Damping ratio ρ = λ/|λ₂| (dimensionless); null when λ₂ does not exist or is zero (ρ infinite). */
export function dampingRatio(A: readonly (readonly number[])[]): number | null {
  const r = dominantEigen(A);
  return dampingFromEigenvalues(r.lambda, r.second);
}

/** ρ = λ/|λ₂| from the two eigenvalues; null when λ₂ is missing or zero to working precision. */
export function dampingFromEigenvalues(lambda: number, second: SecondEigenvalue | null): number | null {
  if (second === null || !(lambda > 0)) return null;
  if (second.modulus <= 1e-12 * lambda) return null;
  return lambda / second.modulus;
}

/** Period of the oscillation set by λ₂, 2π/|arg λ₂| (projection intervals); null when λ₂ is real. */
export function oscillationPeriod(second: SecondEigenvalue | null): number | null {
  if (second === null || second.im === 0) return null;
  const arg = Math.abs(Math.atan2(second.im, second.re));
  return arg === 0 ? null : (2 * Math.PI) / arg;
}

/** Time t_x = ln x / ln ρ (projection intervals) for the λ₂ transient to shrink x-fold relative to λ; null when ρ ≤ 1 or unknown. */
export function convergenceTime(rho: number | null, x = 10): number | null {
  if (rho === null || !(rho > 1) || !Number.isFinite(rho)) return null;
  return Math.log(x) / Math.log(rho);
}

/** Dominant eigen-analysis on a row-major n×n Float64Array (the hot path behind dominantEigen). */
export function dominantEigenDense(a: Float64Array, n: number, options?: DominantEigenOptions): EigenDense {
  const wantSecond = options?.second !== false;
  if (n === 1) {
    const lambda = a[0] as number;
    const one = Float64Array.of(1);
    return {
      n,
      lambda,
      w: one,
      v: Float64Array.of(1),
      vScaleIndex: 0,
      residualRight: 0,
      residualLeft: 0,
      iterations: 0,
      converged: true,
      method: "exact",
      second: null,
    };
  }
  const structure = options?.structure ?? graphStructure(a, n);
  if (!structure.hasCycle) return nilpotent(a, n);

  // Work on the balanced matrix b = D⁻¹AD; map vectors back at the end.
  const balanced = balance(a, n);
  const b = balanced?.matrix ?? a;
  const normF = normFrobenius(b);
  const op = (x: Float64Array, y: Float64Array): void => matvec(b, n, x, y);
  let iterations = 0;
  let lambda = NaN;
  let w: Float64Array | null = null;
  let v: Float64Array | null = null;
  let second: SecondEigenvalue | null = null;
  let method: EigenMethod;
  let bestGuess: Float64Array | null = null;
  const period = structure.irreducible ? (structure.componentPeriod[0] ?? 1) : 1;

  if (n <= DENSE_LIMIT) {
    method = "hessenberg";
    const run = restartedArnoldi(op, n, {
      m: n,
      wanted: 1,
      order: "real",
      tolLeading: TOL_LAMBDA,
      tolOthers: secondTolerance,
      maxProducts: n,
      operatorNorm: normF,
      seed: 0x5eed + n,
    });
    iterations += run.products;
    if (run.solved) {
      const idx = run.sorted[0] as number;
      lambda = run.re[idx] as number;
      w = ritzVector(run, n, lambda);
      const z = new Float64Array(n);
      hessenbergLeftEigenvector(run.h, n, lambda, z, new Float64Array(2 * n * n));
      v = combineRows(run.basis, n, z, n);
      if (wantSecond) second = pickSecond(run, idx, n, true);
    }
  } else if (period > LONG_PERIOD) {
    method = "shift-invert";
    const averaged = periodAveragedPowerIteration(b, n, period);
    iterations += averaged.products;
    bestGuess = averaged.x;
  } else {
    method = "restarted-arnoldi";
    const m = Math.min(BASIS_SIZE, n);
    const budget = Math.max(25 * m, n);
    const right = restartedArnoldi(op, n, {
      m,
      wanted: wantSecond ? 2 : 1,
      order: wantSecond ? "modulus" : "real",
      tolLeading: TOL_LAMBDA,
      tolOthers: secondTolerance,
      maxProducts: budget,
      operatorNorm: normF,
      seed: 0x5eed + n,
    });
    iterations += right.products;
    if (right.solved) {
      const idx = right.sorted[0] as number;
      const lead = right.re[idx] as number;
      if (right.im[idx] === 0 && lead > 0) {
        bestGuess = ritzVector(right, n, lead);
        if (right.leadingConverged) {
          lambda = lead;
          w = bestGuess;
        }
        if (wantSecond) second = pickSecond(right, idx, right.wantedCount, right.converged);
      }
    }
    if (w !== null && n <= LU_LEFT_LIMIT) {
      // λ is known to full precision: one LU of A − λI and two transposed
      // solves (inverse iteration at a known eigenvalue) give v for n³/3 flops,
      // less than a second Krylov run costs at this size.
      v = leftByInverseIteration(b, n, lambda);
      iterations += 2;
    } else if (w !== null) {
      const left = restartedArnoldi((x, y) => vecmat(b, n, x, y), n, {
        m,
        wanted: 1,
        order: "real",
        tolLeading: TOL_LAMBDA,
        tolOthers: secondTolerance,
        maxProducts: budget,
        operatorNorm: normF,
        seed: 0xfeed + n,
      });
      iterations += left.products;
      if (left.solved && left.leadingConverged) {
        const idx = left.sorted[0] as number;
        const lambdaLeft = left.re[idx] as number;
        if (left.im[idx] === 0 && Math.abs(lambdaLeft - lambda) <= 1e-9 * Math.abs(lambda)) {
          v = ritzVector(left, n, lambdaLeft);
        }
      }
    }
  }

  const unbalance = (x: Float64Array, inverse: boolean): Float64Array => {
    if (balanced === null) return x;
    const d = balanced.d;
    for (let i = 0; i < n; i++) x[i] = inverse ? (x[i] as number) / (d[i] as number) : (x[i] as number) * (d[i] as number);
    return x;
  };
  const floor = 1e3 * EPS * normF;
  let finished = w !== null && v !== null ? finish(a, n, lambda, unbalance(w, false), unbalance(v, true)) : null;
  if (finished === null || !acceptable(finished, floor)) {
    // Explicit fallback: shifted inverse iteration with a dense LU.
    method = "shift-invert";
    const fb = shiftInvert(b, n, w ?? bestGuess);
    iterations += fb.iterations;
    const candidate = finish(a, n, fb.lambda, unbalance(fb.w, false), unbalance(fb.v, true));
    if (finished === null || candidate.residualRight + candidate.residualLeft < finished.residualRight + finished.residualLeft) {
      finished = candidate;
    }
  }
  const converged = acceptable(finished, floor);
  return { n, ...finished, iterations, converged, method, second };
}

/**
 * Spectral radius (dominant eigenvalue) of a non-negative row-major matrix,
 * without eigenvectors — used for diagonal blocks of reducible matrices and for
 * R0 = ρ(F N).
 */
export function spectralRadiusDense(a: Float64Array, n: number, structure?: GraphStructure): { value: number; converged: boolean } {
  if (n === 1) return { value: Math.abs(a[0] as number), converged: true };
  const s = structure ?? graphStructure(a, n);
  if (!s.hasCycle) return { value: 0, converged: true };
  const period = s.irreducible ? (s.componentPeriod[0] ?? 1) : 1;
  const dense = n <= DENSE_LIMIT;
  if (dense || period <= LONG_PERIOD) {
    const b = balance(a, n)?.matrix ?? a;
    const m = dense ? n : Math.min(BASIS_SIZE, n);
    const run = restartedArnoldi((x, y) => matvec(b, n, x, y), n, {
      m,
      wanted: 1,
      order: "real",
      tolLeading: TOL_LAMBDA,
      tolOthers: secondTolerance,
      maxProducts: dense ? n : Math.max(25 * m, n),
      operatorNorm: normFrobenius(b),
      seed: 0x5eed + n,
    });
    if (run.solved && (dense || run.leadingConverged)) {
      const idx = run.sorted[0] as number;
      if (run.im[idx] === 0 && (run.re[idx] as number) > 0) return { value: run.re[idx] as number, converged: true };
    }
  }
  const full = dominantEigenDense(a, n, { second: false, structure: s });
  return { value: full.lambda, converged: full.converged };
}

/** Relative residual ‖Ax − λx‖₁/(λ‖x‖₁) the warm-started solver accepts by default. */
const WARM_TOLERANCE = 1e-13;
/** Factorisations of A − σI the warm-started solver may make in one call. */
const WARM_FACTORISATIONS = 8;
/** Solves with one factorisation at the most before the shift is renewed. */
const WARM_SOLVES = 12;

export interface PerronSolverOptions {
  /** Also compute the left vector v (reproductive values); default false: λ and w only. */
  readonly left?: boolean;
  /** Relative residual ‖Ax − λx‖₁/(λ‖x‖₁) accepted (default 1e-13; the iteration aims ten times lower while rounding lets it); with `left`, for v as well. */
  readonly tolerance?: number;
  /** When the warm iteration cannot verify its answer: true (default) asks dominantEigenDense, false returns null. */
  readonly fallback?: boolean;
  /** Without a start vector, start from the previous call's answer (a sequence of nearby matrices, such as λ over temperatures). */
  readonly follow?: boolean;
}

/** λ and the Perron vectors found by a PerronSolver; the vectors are the solver's own and are overwritten by its next call. */
export interface PerronPair {
  /** Dominant eigenvalue λ (per projection interval). */
  readonly lambda: number;
  /** Right vector, Σw = 1. */
  readonly w: Float64Array;
  /** Left vector with v[vScaleIndex] = 1 (v₁ = 1 when positive), or null without the `left` option. */
  readonly v: Float64Array | null;
  readonly converged: boolean;
  /** True when the warm iteration answered, false when dominantEigenDense did. */
  readonly warm: boolean;
}

/** A positive start near the Perron vector: the matrix's own, or that of a nearby matrix. */
export interface PerronStart {
  readonly w: ArrayLike<number>;
  /** Used with the `left` option; a vector of ones when absent. */
  readonly v?: ArrayLike<number> | null;
}

/**
 * λ, w (and v) of non-negative n×n row-major matrices close to one whose
 * vectors are known — a changed lever, a break-even scan, a Monte Carlo draw,
 * λ at the next temperature — by shifted inverse iteration started from those
 * vectors, for a few solves with one LU of A − σI instead of a full
 * eigen-analysis. The work space is allocated once per solver.
 *
 * Shifts. λ and w only: σ is a Collatz–Wielandt upper bound
 * max_i (Ax)_i/x_i ≥ λ of the current positive iterate (Horn & Johnson 2013,
 * Matrix Analysis, §8.1), so every other eigenvalue μ, |μ| ≤ λ ≤ σ, lies
 * farther from σ than λ does and the iteration can only find λ; for σ > λ,
 * (σI − A)⁻¹ ≥ 0 keeps the iterates one-signed, and a one-signed w with a
 * small residual is accepted. With v as well: σ = vᵀAw/vᵀw, the two-sided
 * Rayleigh quotient (Ostrowski 1959; Parlett 1974, Math. Comp. 28:679 —
 * locally cubic), with v from the transposed solves; such a shift may fall
 * below λ, so the answer is accepted only when both vectors are strictly
 * positive, which makes it the Perron root (a positive eigenvector of a
 * non-negative matrix belongs to its spectral radius). One factorisation
 * serves as long as the solves it still needs, at the rate the residual
 * falls, cost less than a new LU at the better shift now known.
 *
 * Anything not verified goes to dominantEigenDense (or null without `fallback`).
 */
export class PerronSolver {
  /** How often dominantEigenDense answered instead of the warm iteration. */
  fallbacks = 0;
  private readonly left: boolean;
  private readonly tolerance: number;
  private readonly fallback: boolean;
  private readonly follow: boolean;
  private hasPrevious = false;
  private readonly x: Float64Array;
  private readonly v: Float64Array;
  private readonly y: Float64Array;
  private readonly z: Float64Array;
  private readonly scratch: Float64Array;
  private readonly shifted: Float64Array;
  private readonly piv: Int32Array;
  private readonly wOut: Float64Array;
  private readonly vOut: Float64Array;

  constructor(
    readonly n: number,
    options: PerronSolverOptions = {},
  ) {
    this.left = options.left === true;
    this.tolerance = options.tolerance ?? WARM_TOLERANCE;
    this.fallback = options.fallback !== false;
    this.follow = options.follow === true;
    this.x = new Float64Array(n);
    this.v = new Float64Array(n);
    this.y = new Float64Array(n);
    this.z = new Float64Array(n);
    this.scratch = new Float64Array(n);
    this.shifted = new Float64Array(n * n);
    this.piv = new Int32Array(n);
    this.wOut = new Float64Array(n);
    this.vOut = new Float64Array(n);
  }

  /** The Perron pair of `a` (not changed), started from `start` (with `follow`, by default from the previous answer). */
  solve(a: Float64Array, start: PerronStart | null = null): PerronPair | null {
    const { n } = this;
    if (n === 1) {
      this.wOut[0] = 1;
      this.vOut[0] = 1;
      return { lambda: a[0] as number, w: this.wOut, v: this.left ? this.vOut : null, converged: true, warm: true };
    }
    const from = start ?? (this.follow && this.hasPrevious ? { w: this.wOut, v: this.vOut } : null);
    if (from !== null && n > 1) {
      const lambda = this.iterate(a, from);
      if (lambda !== null) {
        this.hasPrevious = true;
        return { lambda, w: this.wOut, v: this.left ? this.vOut : null, converged: true, warm: true };
      }
    }
    if (!this.fallback) return null;
    this.fallbacks += 1;
    const full = dominantEigenDense(a, n, { second: false });
    this.wOut.set(full.w);
    this.vOut.set(full.v);
    this.hasPrevious = true;
    return { lambda: full.lambda, w: this.wOut, v: this.left ? this.vOut : null, converged: full.converged, warm: false };
  }

  /** The warm iteration; λ with wOut (and vOut) filled when verified, else null. */
  private iterate(a: Float64Array, start: PerronStart): number | null {
    const { n, x, v, y, z, left, tolerance } = this;
    positiveStart(start.w, x);
    if (left) {
      if (start.v) positiveStart(start.v, v);
      else v.fill(1);
    }
    let factors: LuFactors | null = null;
    let factorisations = 0;
    let solves = 0;
    let before = Infinity;
    // Flops of one more solve with its residual check, and of a new LU.
    const solveCost = (left ? 5 : 3) * n * n;
    const factorCost = (n * n * n) / 3;
    for (;;) {
      matvec(a, n, x, y);
      // λ estimate uᵀAx/uᵀx with u = v (two-sided) or a vector of ones.
      let ux = 0;
      let uy = 0;
      if (left) {
        for (let i = 0; i < n; i++) {
          ux += (v[i] as number) * (x[i] as number);
          uy += (v[i] as number) * (y[i] as number);
        }
      } else {
        for (let i = 0; i < n; i++) {
          ux += x[i] as number;
          uy += y[i] as number;
        }
      }
      const lambda = uy / ux;
      if (!(lambda > 0) || !Number.isFinite(lambda)) return null;
      let residual = relativeResidual(y, x, lambda);
      if (left && residual <= tolerance) {
        // v's residual only once w has converged (v converges with w under the two-sided shifts).
        vecmat(a, n, v, z);
        residual = Math.max(residual, relativeResidual(z, v, lambda));
      }
      // Aim ten times below the tolerance; settle for the tolerance once rounding stalls the residual.
      const aim = tolerance / 10;
      if (residual <= aim) return this.accept(lambda);
      const rate = residual / before;
      const stalled = !(rate < 0.5);
      if (stalled && residual <= tolerance) return this.accept(lambda);
      // Keep the factors while the solves still needed at the rate of the last one cost less than a new LU at a better shift.
      const stillNeeded = Math.log(aim / residual) / Math.log(rate);
      if (factors === null || solves >= WARM_SOLVES || stalled || stillNeeded * solveCost > factorCost + solveCost) {
        if (factorisations === WARM_FACTORISATIONS) return residual <= tolerance ? this.accept(lambda) : null;
        const sigma = left ? lambda : upperBound(a, n, x, y);
        if (!(sigma > 0) || !Number.isFinite(sigma)) return null;
        const shifted = this.shifted;
        shifted.set(a);
        for (let i = 0; i < n; i++) shifted[i * n + i] = (shifted[i * n + i] as number) - sigma;
        factors = luFactorInPlace(shifted, n, this.piv, { replaceTinyPivots: true });
        factorisations += 1;
        solves = 0;
      }
      before = residual;
      luSolveInPlace(factors, x, this.scratch);
      normaliseSum(x);
      if (left) {
        luSolveTransposedInPlace(factors, v, this.scratch);
        normaliseSum(v);
      }
      solves += 1;
    }
  }

  /** Checks that the converged pair is the Perron pair and writes w (Σ = 1) and v (v₁ = 1). */
  private accept(lambda: number): number | null {
    const { n, x, v } = this;
    if (this.left) {
      for (let i = 0; i < n; i++) if (!((x[i] as number) > 0) || !((v[i] as number) > 0)) return null;
    } else if (!oneSigned(x)) return null;
    let s = 0;
    for (let i = 0; i < n; i++) s += x[i] as number;
    for (let i = 0; i < n; i++) this.wOut[i] = (x[i] as number) / s;
    if (this.left) {
      const v0 = v[0] as number;
      for (let i = 0; i < n; i++) this.vOut[i] = (v[i] as number) / v0;
    }
    return lambda;
  }
}

/**
 * λ and w (and v with `left`) of one matrix near a known one, started from
 * `start` (the known Perron vectors); the full dominantEigenDense answers
 * when there is no start or the warm iteration cannot verify its answer.
 */
export function perronFrom(a: Float64Array, n: number, start: PerronStart | null, options: Omit<PerronSolverOptions, "follow" | "fallback"> = {}): PerronPair {
  return new PerronSolver(n, options).solve(a, start) as PerronPair;
}

/** The two-sided warm iteration alone (λ, w, v from positive guesses `w0`, `v0` of a nearby matrix): null when it cannot verify the Perron pair. */
export function refinePerron(a: Float64Array, n: number, w0: ArrayLike<number>, v0: ArrayLike<number>): (PerronPair & { readonly v: Float64Array }) | null {
  const pair = new PerronSolver(n, { left: true, fallback: false }).solve(a, { w: w0, v: v0 });
  return pair === null ? null : { ...pair, v: pair.v! };
}

/** x = |s|/max|s| + 1e-6: a strictly positive start (a zero entry would stall a Collatz–Wielandt bound). */
function positiveStart(s: ArrayLike<number>, x: Float64Array): void {
  let big = 0;
  for (let i = 0; i < x.length; i++) big = Math.max(big, Math.abs(s[i] as number));
  for (let i = 0; i < x.length; i++) x[i] = big > 0 && Number.isFinite(big) ? Math.abs(s[i] as number) / big + 1e-6 : 1;
}

/** ‖y − λx‖₁/(λ‖x‖₁). */
function relativeResidual(y: Float64Array, x: Float64Array, lambda: number): number {
  let r = 0;
  let norm = 0;
  for (let i = 0; i < x.length; i++) {
    r += Math.abs((y[i] as number) - lambda * (x[i] as number));
    norm += Math.abs(x[i] as number);
  }
  return r / (lambda * norm);
}

/**
 * A shift just above the Collatz–Wielandt upper bound max_i (Ax)_i/x_i ≥ λ of
 * x made strictly positive (y = Ax is recomputed when x had to change).
 */
function upperBound(a: Float64Array, n: number, x: Float64Array, y: Float64Array): number {
  let positive = true;
  let mx = 0;
  for (let i = 0; i < n; i++) {
    if (!((x[i] as number) > 0)) positive = false;
    mx = Math.max(mx, Math.abs(x[i] as number));
  }
  if (!positive) {
    for (let i = 0; i < n; i++) x[i] = Math.abs(x[i] as number) + 1e-12 * mx;
    matvec(a, n, x, y);
  }
  let sigma = 0;
  for (let i = 0; i < n; i++) sigma = Math.max(sigma, (y[i] as number) / (x[i] as number));
  return sigma * (1 + 1e-12);
}

interface Finished {
  lambda: number;
  w: Float64Array;
  v: Float64Array;
  vScaleIndex: number;
  residualRight: number;
  residualLeft: number;
}

/** Scale w to Σw = 1 and v to v[index] = 1, and measure the true residuals. */
function finish(a: Float64Array, n: number, lambda: number, w: Float64Array, v: Float64Array): Finished {
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i] as number;
  if (s !== 0 && Number.isFinite(s)) for (let i = 0; i < n; i++) w[i] = (w[i] as number) / s;
  let big = 0;
  for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(v[i] as number));
  let vScaleIndex = 0;
  for (let i = 0; i < n; i++) {
    if (Math.abs(v[i] as number) > V_ZERO * big) {
      vScaleIndex = i;
      break;
    }
  }
  const pivot = v[vScaleIndex] as number;
  if (pivot !== 0 && Number.isFinite(pivot)) for (let i = 0; i < n; i++) v[i] = (v[i] as number) / pivot;
  const tmp = new Float64Array(n);
  matvec(a, n, w, tmp);
  let rr = 0;
  for (let i = 0; i < n; i++) rr += Math.abs((tmp[i] as number) - lambda * (w[i] as number));
  vecmat(a, n, v, tmp);
  let rl = 0;
  let vn = 0;
  for (let i = 0; i < n; i++) {
    rl += Math.abs((tmp[i] as number) - lambda * (v[i] as number));
    vn += Math.abs(v[i] as number);
  }
  return {
    lambda,
    w,
    v,
    vScaleIndex,
    residualRight: Number.isFinite(rr) ? rr : Number.MAX_VALUE,
    residualLeft: vn > 0 && Number.isFinite(rl) ? rl / vn : Number.MAX_VALUE,
  };
}

/** Residuals small (floor: what rounding allows), λ positive, w and v of one sign (Perron vectors). */
function acceptable(f: Finished, floor: number): boolean {
  const tol = Math.max(ACCEPT * Math.abs(f.lambda), floor);
  if (!(f.lambda > 0) || !(f.residualRight <= tol) || !(f.residualLeft <= tol)) return false;
  return oneSigned(f.w) && oneSigned(f.v);
}

function oneSigned(x: Float64Array): boolean {
  let big = 0;
  let low = 0;
  for (let i = 0; i < x.length; i++) {
    big = Math.max(big, x[i] as number);
    low = Math.min(low, x[i] as number);
  }
  return big > 0 && low >= -1e-8 * big;
}

/**
 * λ₂ among the Ritz values of a finished run: the largest modulus except the
 * one taken as λ; ties (equal moduli, as on the circle of an imprimitive
 * matrix) go to the smallest |arg|, which gives the true cycle length.
 */
function pickSecond(run: KrylovResult, leadIdx: number, ranks: number, converged: boolean): SecondEigenvalue | null {
  let best = -1;
  let bestMod = -1;
  let bestArg = Infinity;
  const limit = Math.min(ranks, run.sorted.length);
  for (let r = 0; r < limit; r++) {
    const i = run.sorted[r] as number;
    if (i === leadIdx) continue;
    const re = run.re[i] as number;
    const im = Math.abs(run.im[i] as number);
    const mod = Math.hypot(re, im);
    const arg = Math.atan2(im, re);
    const tie = Math.abs(mod - bestMod) <= 1e-10 * Math.max(mod, bestMod);
    if ((!tie && mod > bestMod) || (tie && arg < bestArg)) {
      best = i;
      bestMod = mod;
      bestArg = arg;
    }
  }
  if (best < 0) return null;
  const re = run.re[best] as number;
  const im = Math.abs(run.im[best] as number);
  return { re, im, modulus: Math.hypot(re, im), converged };
}

/**
 * No loop in the life-cycle graph: A is nilpotent and every eigenvalue is
 * exactly 0. Eigenvectors for 0: stages with no way out (zero columns) for w,
 * stages nothing enters (zero rows) for v — an acyclic graph has both.
 */
function nilpotent(a: Float64Array, n: number): EigenDense {
  const w = new Float64Array(n);
  const v = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    let colZero = true;
    let rowZero = true;
    for (let i = 0; i < n; i++) {
      if ((a[i * n + j] as number) !== 0) colZero = false;
      if ((a[j * n + i] as number) !== 0) rowZero = false;
    }
    if (colZero) w[j] = 1;
    if (rowZero) v[j] = 1;
  }
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i] as number;
  for (let i = 0; i < n; i++) w[i] = (w[i] as number) / s;
  let vScaleIndex = 0;
  while (v[vScaleIndex] === 0) vScaleIndex += 1;
  return {
    n,
    lambda: 0,
    w,
    v,
    vScaleIndex,
    residualRight: 0,
    residualLeft: 0,
    iterations: 0,
    converged: true,
    method: "exact",
    second: { re: 0, im: 0, modulus: 0, converged: true },
  };
}

/**
 * Power iteration averaged over one period d of an imprimitive matrix: each
 * super-step sums d iterates scaled by the running estimate μ of λ, which
 * cancels the components on the top circle; the growth over the d steps
 * updates μ. Returns a positive vector close to w for the shifted inverse
 * iteration to finish.
 */
function periodAveragedPowerIteration(a: Float64Array, n: number, d: number): { x: Float64Array; products: number } {
  let x = new Float64Array(n).fill(1 / n);
  let y = new Float64Array(n);
  let products = 0;
  // First μ: geometric-mean growth per step over one period of normalised
  // power iterates (the growth over a whole period is insensitive to the
  // rotation on the circle).
  let logGrowth = 0;
  for (let k = 0; k < d; k++) {
    matvec(a, n, x, y);
    products += 1;
    let t = 0;
    for (let i = 0; i < n; i++) t += y[i] as number;
    if (!(t > 0)) return { x: new Float64Array(n).fill(1), products };
    logGrowth += Math.log(t);
    for (let i = 0; i < n; i++) x[i] = (y[i] as number) / t;
  }
  let mu = Math.exp(logGrowth / d);
  const acc = new Float64Array(n);
  for (let step = 0; step < 2; step++) {
    acc.fill(0);
    logGrowth = 0;
    for (let k = 0; k < d; k++) {
      let s = 0;
      for (let i = 0; i < n; i++) {
        acc[i] = (acc[i] as number) + (x[i] as number);
        s += x[i] as number;
      }
      matvec(a, n, x, y);
      products += 1;
      let t = 0;
      for (let i = 0; i < n; i++) t += y[i] as number;
      if (!(t > 0) || !(s > 0)) break;
      logGrowth += Math.log(t / s);
      for (let i = 0; i < n; i++) y[i] = (y[i] as number) / mu;
      const tmp = x;
      x = y;
      y = tmp;
    }
    mu = Math.exp(logGrowth / d);
    let s = 0;
    for (let i = 0; i < n; i++) s += acc[i] as number;
    for (let i = 0; i < n; i++) x[i] = (acc[i] as number) / s;
  }
  return { x, products };
}

/**
 * Shifted inverse iteration for the Perron pair. The shift σ is the upper
 * Collatz–Wielandt bound of the current positive iterate, so σ ≥ λ and λ is
 * the eigenvalue nearest σ (for |μ| ≤ λ ≤ σ, |σ − μ| ≥ σ − λ, with equality
 * only at μ = λ); for σ > λ, (σI − A)⁻¹ ≥ 0 keeps the iterates positive and
 * each new factorisation tightens σ. v comes from the transposed solves with
 * the same factors.
 */
function shiftInvert(a: Float64Array, n: number, guess: Float64Array | null): { lambda: number; w: Float64Array; v: Float64Array; iterations: number } {
  const rand = pseudoRandom(0xabcdef + n);
  let x: Float64Array = new Float64Array(n);
  let big = 0;
  if (guess !== null) for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(guess[i] as number));
  for (let i = 0; i < n; i++) x[i] = big > 0 && guess !== null ? Math.abs(guess[i] as number) / big + 1e-6 : 0.5 + rand();
  const y = new Float64Array(n);
  const shifted = new Float64Array(n * n);
  let lambda = NaN;
  let iterations = 0;
  let factors = null as ReturnType<typeof luFactor> | null;
  for (let attempt = 0; attempt < 6; attempt++) {
    matvec(a, n, x, y);
    iterations += 1;
    let sigma = 0;
    for (let i = 0; i < n; i++) sigma = Math.max(sigma, (y[i] as number) / (x[i] as number));
    sigma *= 1 + 1e-12;
    shifted.set(a);
    for (let i = 0; i < n; i++) shifted[i * n + i] = (shifted[i * n + i] as number) - sigma;
    factors = luFactor(shifted, n, { replaceTinyPivots: true });
    let done = false;
    for (let it = 0; it < 6; it++) {
      x = luSolve(factors, x);
      iterations += 1;
      normaliseSum(x);
      matvec(a, n, x, y);
      let s = 0;
      let sx = 0;
      for (let i = 0; i < n; i++) {
        s += y[i] as number;
        sx += x[i] as number;
      }
      lambda = s / sx;
      let res = 0;
      for (let i = 0; i < n; i++) res += Math.abs((y[i] as number) - lambda * (x[i] as number));
      if (res <= 1e-14 * Math.abs(lambda)) {
        done = true;
        break;
      }
    }
    if (done) break;
    // Positive iterate for the next (tighter) Collatz–Wielandt bound.
    let mx = 0;
    for (let i = 0; i < n; i++) mx = Math.max(mx, Math.abs(x[i] as number));
    for (let i = 0; i < n; i++) x[i] = Math.abs(x[i] as number) + 1e-12 * mx;
  }
  let v: Float64Array = new Float64Array(n).fill(1);
  if (factors !== null) {
    for (let it = 0; it < 6; it++) {
      v = luSolveTransposed(factors, v);
      iterations += 1;
      normaliseSum(v);
    }
  }
  return { lambda, w: x, v, iterations };
}

/** Left eigenvector for a known eigenvalue: two transposed solves with the LU of A − λI. */
function leftByInverseIteration(a: Float64Array, n: number, lambda: number): Float64Array {
  const shifted = Float64Array.from(a);
  for (let i = 0; i < n; i++) shifted[i * n + i] = (shifted[i * n + i] as number) - lambda;
  const factors = luFactor(shifted, n, { replaceTinyPivots: true });
  let v: Float64Array = new Float64Array(n).fill(1);
  for (let it = 0; it < 2; it++) {
    v = luSolveTransposed(factors, v);
    normaliseSum(v);
  }
  return v;
}

function normaliseSum(x: Float64Array): void {
  let s = 0;
  let big = 0;
  for (let i = 0; i < x.length; i++) {
    s += x[i] as number;
    big = Math.max(big, Math.abs(x[i] as number));
  }
  const d = s !== 0 && Math.abs(s) > 1e-300 ? s : big;
  if (d === 0 || !Number.isFinite(d)) return;
  for (let i = 0; i < x.length; i++) x[i] = (x[i] as number) / d;
}
