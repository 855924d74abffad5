// Projection of an initial population, n(t+1) = A n(t), and transient indices
// of the standardised model (Neubert & Caswell 1997, Ecology 78:653; Stott,
// Townley & Hodgson 2011, Ecol. Lett. 14:959). Standardising removes the
// asymptotic growth: Â = A/λ, n̂₀ = n₀/‖n₀‖₁, so every index below is a
// population size relative to one that grew at rate λ from the start.
import { matvec, vecmat, toArray } from "./matrix";
import { readPopulationVector, readSquareMatrix, readStepCount, MAX_PROJECTION_STEPS } from "./input";
import { dominantEigenDense } from "./eigen";

/** Relative difference below which two population sizes count as the same extreme. */
const SAME = 1e-9;

/** Default horizon (projection intervals) for the transient maxima and bounds. */
export const DEFAULT_TRANSIENT_HORIZON = 100;

export interface Projection {
  /** Steps requested. */
  readonly steps: number;
  /** population[t][i]: individuals in stage i at step t (t = 0 is the initial population). */
  readonly population: number[][];
  /** Σ_i population[t][i]. */
  readonly total: number[];
  /** total[t] / total[t−1] (growth factor over one interval); null at t = 0 and after extinction. */
  readonly growthRatio: (number | null)[];
  /** Keyfitz's Δ = ½ Σ_i |n_i(t)/Σn(t) − w_i| (0 = stable structure, 1 = no overlap); null without w or after extinction. */
  readonly distanceToStable: (number | null)[];
  /** Why the projection stopped before `steps` (numbers beyond double precision), else null. */
  readonly truncatedReason: string | null;
}

export interface TransientIndices {
  /** Horizon (projection intervals) over which the maxima, minima and their bounds are taken. */
  readonly horizon: number;
  /** ‖Â n̂₀‖₁: relative size after one step. */
  readonly reactivity: number;
  /** True when reactivity < 1 (the population first shrinks relative to λ). */
  readonly firstStepAttenuation: boolean;
  /** max_{1≤t≤horizon} ‖Âᵗ n̂₀‖₁ and the step where it occurs. */
  readonly maxAmplification: number;
  readonly maxAmplificationTime: number;
  /** min_{1≤t≤horizon} ‖Âᵗ n̂₀‖₁ and the step where it occurs. */
  readonly maxAttenuation: number;
  readonly maxAttenuationTime: number;
  /** Asymptotic relative size (v·n̂₀)‖w‖₁/(v·w). */
  readonly inertia: number;
  /** Bounds over every possible initial structure. */
  readonly bounds: {
    /** Largest column sum of Â. */
    readonly reactivityUpper: number;
    /** Smallest column sum of Â. */
    readonly firstStepAttenuationLower: number;
    /** max_{1≤t≤horizon} ‖Âᵗ‖₁ and its step. */
    readonly maxAmplificationUpper: number;
    readonly maxAmplificationUpperTime: number;
    /** min_{1≤t≤horizon} of the smallest column sum of Âᵗ and its step. */
    readonly maxAttenuationLower: number;
    readonly maxAttenuationLowerTime: number;
    /** max_j and min_j of v_j ‖w‖₁/(v·w). */
    readonly inertiaUpper: number;
    readonly inertiaLower: number;
  };
}

/** Project n0 for `steps` intervals on a row-major matrix; w (Σ = 1) for the distance to the stable structure, or null. */
export function projectDense(a: Float64Array, n: number, n0: Float64Array, steps: number, w: ArrayLike<number> | null): Projection {
  const population: number[][] = [toArray(n0)];
  const total: number[] = [sumOf(n0)];
  const growthRatio: (number | null)[] = [null];
  const distanceToStable: (number | null)[] = [keyfitz(n0, w)];
  let x = Float64Array.from(n0);
  let y = new Float64Array(n);
  let truncatedReason: string | null = null;
  for (let t = 1; t <= steps; t++) {
    matvec(a, n, x, y);
    const size = sumOf(y);
    if (!Number.isFinite(size)) {
      truncatedReason = `The population exceeds the range of double-precision numbers after step ${t - 1}; the projection stops there.`;
      break;
    }
    population.push(toArray(y));
    const prev = total[t - 1] as number;
    total.push(size);
    growthRatio.push(prev > 0 ? size / prev : null);
    distanceToStable.push(keyfitz(y, w));
    const tmp = x;
    x = y;
    y = tmp;
  }
  return { steps, population, total, growthRatio, distanceToStable, truncatedReason };
}

/** Transient indices of n0 (any scale) under A with dominant triple (λ > 0, w, v); horizon in intervals. */
export function transientIndicesDense(
  a: Float64Array,
  n: number,
  n0: Float64Array,
  eig: { readonly lambda: number; readonly w: ArrayLike<number>; readonly v: ArrayLike<number> },
  horizon: number,
): TransientIndices {
  const inv = 1 / eig.lambda;
  const s0 = sumOf(n0);
  let x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = (n0[i] as number) / s0;
  let y = new Float64Array(n);
  // Column sums of Âᵗ: rᵗ = 1ᵀÂᵗ, and since Âᵗ ≥ 0, ‖Âᵗ‖₁ = max_j r_j.
  let r = new Float64Array(n).fill(1);
  let rNext = new Float64Array(n);
  let reactivity = NaN;
  let ampMax = -Infinity;
  let ampT = 0;
  let attMin = Infinity;
  let attT = 0;
  let upper1 = NaN;
  let lower1 = NaN;
  let upMax = -Infinity;
  let upT = 0;
  let lowMin = Infinity;
  let lowT = 0;
  let used = 0;
  for (let t = 1; t <= horizon; t++) {
    matvec(a, n, x, y);
    let size = 0;
    for (let i = 0; i < n; i++) {
      y[i] = (y[i] as number) * inv;
      size += y[i] as number;
    }
    vecmat(a, n, r, rNext);
    let cMax = -Infinity;
    let cMin = Infinity;
    for (let j = 0; j < n; j++) {
      const c = (rNext[j] as number) * inv;
      rNext[j] = c;
      if (c > cMax) cMax = c;
      if (c < cMin) cMin = c;
    }
    if (!Number.isFinite(size) || !Number.isFinite(cMax)) break;
    used = t;
    if (t === 1) {
      reactivity = size;
      upper1 = cMax;
      lower1 = cMin;
    }
    // The first step at which an extreme is reached counts: a later one must
    // beat it by more than rounding (λ itself carries ~1e-15 relative error,
    // which compounds over the horizon in Âᵗ).
    if (size > ampMax * (1 + SAME)) {
      ampMax = size;
      ampT = t;
    }
    if (size < attMin * (1 - SAME)) {
      attMin = size;
      attT = t;
    }
    if (cMax > upMax * (1 + SAME)) {
      upMax = cMax;
      upT = t;
    }
    if (cMin < lowMin * (1 - SAME)) {
      lowMin = cMin;
      lowT = t;
    }
    let tmp = x;
    x = y;
    y = tmp;
    tmp = r;
    r = rNext;
    rNext = tmp;
  }
  let vw = 0;
  let vn = 0;
  let wNorm = 0;
  let vMax = -Infinity;
  let vMin = Infinity;
  for (let i = 0; i < n; i++) {
    const vi = eig.v[i] as number;
    vw += vi * (eig.w[i] as number);
    vn += (vi * (n0[i] as number)) / s0;
    wNorm += Math.abs(eig.w[i] as number);
    vMax = Math.max(vMax, vi);
    vMin = Math.min(vMin, vi);
  }
  return {
    horizon: used,
    reactivity,
    firstStepAttenuation: reactivity < 1,
    maxAmplification: ampMax,
    maxAmplificationTime: ampT,
    maxAttenuation: attMin,
    maxAttenuationTime: attT,
    inertia: (vn * wNorm) / vw,
    bounds: {
      reactivityUpper: upper1,
      firstStepAttenuationLower: lower1,
      maxAmplificationUpper: upMax,
      maxAmplificationUpperTime: upT,
      maxAttenuationLower: lowMin,
      maxAttenuationLowerTime: lowT,
      inertiaUpper: (vMax * wNorm) / vw,
      inertiaLower: (vMin * wNorm) / vw,
    },
  };
}

/** Project an initial population n0 (individuals per stage) for `steps` projection intervals. */
export function project(A: readonly (readonly number[])[], n0: readonly number[], steps: number): Projection {
  const { n, data } = readSquareMatrix(A, "A");
  const x0 = readPopulationVector(n0, n);
  const count = readStepCount(steps, "steps", MAX_PROJECTION_STEPS);
  const eig = dominantEigenDense(data, n, { second: false });
  return projectDense(data, n, x0, count, eig.lambda > 0 ? eig.w : null);
}

/** Transient indices of n0 under A over `horizon` projection intervals (default 100); null when λ = 0 (nothing to standardise by). */
export function transientIndices(A: readonly (readonly number[])[], n0: readonly number[], horizon = DEFAULT_TRANSIENT_HORIZON): TransientIndices | null {
  const { n, data } = readSquareMatrix(A, "A");
  const x0 = readPopulationVector(n0, n);
  const h = readStepCount(horizon, "horizon", MAX_PROJECTION_STEPS);
  const eig = dominantEigenDense(data, n, { second: false });
  if (!(eig.lambda > 0)) return null;
  return transientIndicesDense(data, n, x0, eig, h);
}

function sumOf(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] as number;
  return s;
}

function keyfitz(x: Float64Array, w: ArrayLike<number> | null): number | null {
  if (w === null) return null;
  const s = sumOf(x);
  if (!(s > 0)) return null;
  let d = 0;
  for (let i = 0; i < x.length; i++) d += Math.abs((x[i] as number) / s - (w[i] as number));
  return 0.5 * d;
}
