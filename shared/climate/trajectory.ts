/**
 * Projection through a warming trajectory: one temperature per year, the
 * matrix A(T_t) of that year, N(t+1) = A(T_t) N(t). The population starts in
 * the stable stage distribution of the first year's matrix. Deterministic
 * projections use the trajectory's mean temperatures; stochastic replicates
 * add independent normal year-to-year deviations (SD in °C). Pure maths.
 */
import { dominantEigenDense } from "../demography/eigen";
import { matvec } from "../demography/matrix";
import { createRandom } from "../demography/random";
import type { WarmingTrajectory } from "../lifecycle/thermal";
import type { ThermalModel } from "./lambda";

/** Years and mean temperatures (°C) of a trajectory. */
export function trajectoryTemperatures(t: WarmingTrajectory): { years: number[]; temperatures: number[] } {
  if (t.kind === "series") return { years: t.points.map((p) => p.year), temperatures: t.points.map((p) => p.temperature) };
  const years = Array.from({ length: t.years }, (_, i) => t.startYear + i);
  return { years, temperatures: years.map((_, i) => t.baseline + (t.trendPerDecade * i) / 10) };
}

export interface TrajectoryProjection {
  years: number[];
  temperatures: number[];
  /** λ_t of each year's matrix A(T_t). */
  annualLambda: number[];
  /** Total N at the start of each year and after the last (years.length + 1 values). */
  total: number[];
  /** The first year whose λ_t < 1, or null. */
  firstYearBelowOne: number | null;
  /** Stable stage distribution of the first year's matrix (the starting structure). */
  initialStructure: number[];
}

/** Deterministic projection of `initialTotal` individuals through the temperatures. */
export function projectTrajectory(model: ThermalModel, years: readonly number[], temperatures: readonly number[], initialTotal: number): TrajectoryProjection {
  const { n } = model;
  if (years.length !== temperatures.length || years.length === 0) throw new RangeError("Give one temperature per year.");
  const first = dominantEigenDense(model.matrixAt(temperatures[0]!), n, { second: false });
  let N = Float64Array.from(first.w, (w) => w * initialTotal);
  let next = new Float64Array(n);
  const a = new Float64Array(n * n);
  const total = [initialTotal];
  const annualLambda: number[] = [];
  let firstYearBelowOne: number | null = null;
  temperatures.forEach((T, i) => {
    model.matrixAt(T, a);
    const lambda = model.lambdaOf(a);
    annualLambda.push(lambda);
    if (firstYearBelowOne === null && lambda < 1) firstYearBelowOne = years[i]!;
    matvec(a, n, N, next);
    [N, next] = [next, N];
    let s = 0;
    for (let j = 0; j < n; j++) s += N[j]!;
    total.push(s);
  });
  return { years: [...years], temperatures: [...temperatures], annualLambda, total, firstYearBelowOne, initialStructure: Array.from(first.w) };
}

export interface ReplicateChunk {
  /** Total N per replicate: replicates × (years + 1), row-major. */
  totals: number[];
  /** For each replicate, the index of the first year with λ_t < 1, or −1. */
  firstBelow: number[];
  /** Per year, how many replicates had λ_t < 1. */
  belowCount: number[];
  /** Per year, sum and sum of squares of the drawn temperatures. */
  tempSum: number[];
  tempSumSq: number[];
  replicates: number;
}

/**
 * `replicates` stochastic trajectories: temperature T_t + σ·Z_t (Z standard
 * normal, independent by year), projected from the same start. The random
 * stream is (seed, stream), so chunk k of a Run depends only on its input.
 */
export function simulateTrajectoryReplicates(
  model: ThermalModel,
  temperatures: readonly number[],
  sd: number,
  initialTotal: number,
  replicates: number,
  seed: number,
  stream: number,
): ReplicateChunk {
  const { n } = model;
  const years = temperatures.length;
  const rng = createRandom(seed, stream);
  const start = dominantEigenDense(model.matrixAt(temperatures[0]!), n, { second: false }).w;
  const a = new Float64Array(n * n);
  let N = new Float64Array(n);
  let next = new Float64Array(n);
  const totals = new Array<number>(replicates * (years + 1));
  const firstBelow = new Array<number>(replicates).fill(-1);
  const belowCount = new Array<number>(years).fill(0);
  const tempSum = new Array<number>(years).fill(0);
  const tempSumSq = new Array<number>(years).fill(0);
  for (let r = 0; r < replicates; r++) {
    for (let j = 0; j < n; j++) N[j] = start[j]! * initialTotal;
    totals[r * (years + 1)] = initialTotal;
    for (let t = 0; t < years; t++) {
      const T = temperatures[t]! + sd * rng.normal();
      tempSum[t]! += T;
      tempSumSq[t]! += T * T;
      model.matrixAt(T, a);
      const lambda = model.lambdaOf(a);
      if (lambda < 1) {
        belowCount[t]!++;
        if (firstBelow[r] === -1) firstBelow[r] = t;
      }
      matvec(a, n, N, next);
      [N, next] = [next, N];
      let s = 0;
      for (let j = 0; j < n; j++) s += N[j]!;
      totals[r * (years + 1) + t + 1] = s;
    }
  }
  return { totals, firstBelow, belowCount, tempSum, tempSumSq, replicates };
}

export const REPLICATE_QUANTILES = [0.05, 0.25, 0.5, 0.75, 0.95] as const;

export interface ReplicateSummary {
  replicates: number;
  /** Quantiles of total N per time (years + 1 values each), for REPLICATE_QUANTILES. */
  quantiles: { q: number; values: number[] }[];
  /** Share of replicates with N_t below the threshold, per time; null without a threshold. */
  belowThreshold: number[] | null;
  /** Share of replicates whose λ_t < 1, per year. */
  shareLambdaBelowOne: number[];
  /** Share of replicates with at least one year of λ_t < 1, and the median first such year index (null when fewer than half have one). */
  shareEverBelowOne: number;
  medianFirstBelowIndex: number | null;
  /** Mean and SD of the drawn temperatures per year. */
  temperatureMean: number[];
  temperatureSd: number[];
}

/** Type-7 quantile (linear interpolation) of sorted values. */
function quantileSorted(sorted: Float64Array, q: number): number {
  const h = (sorted.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

/** Merges chunks (in order) into quantiles of N(t) and shares below thresholds. */
export function summariseReplicates(chunks: readonly ReplicateChunk[], years: number, threshold: number | null): ReplicateSummary {
  const R = chunks.reduce((s, c) => s + c.replicates, 0);
  const column = new Float64Array(R);
  const quantiles = REPLICATE_QUANTILES.map((q) => ({ q, values: new Array<number>(years + 1) }));
  const belowThreshold = threshold === null ? null : new Array<number>(years + 1).fill(0);
  for (let t = 0; t <= years; t++) {
    let k = 0;
    for (const c of chunks) for (let r = 0; r < c.replicates; r++) column[k++] = c.totals[r * (years + 1) + t]!;
    if (belowThreshold) {
      let below = 0;
      for (let i = 0; i < R; i++) if (column[i]! < threshold!) below++;
      belowThreshold[t] = below / R;
    }
    column.sort();
    quantiles.forEach((qq) => (qq.values[t] = quantileSorted(column, qq.q)));
  }
  const shareLambdaBelowOne = Array.from({ length: years }, (_, t) => chunks.reduce((s, c) => s + c.belowCount[t]!, 0) / R);
  const firsts = chunks.flatMap((c) => c.firstBelow);
  const ever = firsts.filter((f) => f >= 0).sort((x, y) => x - y);
  // The median first year over all replicates (never = +∞) exists when at least half have one.
  const medianFirstBelowIndex = ever.length * 2 >= R && R > 0 ? (() => {
    const all = firsts.map((f) => (f < 0 ? Infinity : f)).sort((x, y) => x - y);
    const m = all[Math.floor((R - 1) / 2)]!;
    return Number.isFinite(m) ? m : null;
  })() : null;
  const temperatureMean = Array.from({ length: years }, (_, t) => chunks.reduce((s, c) => s + c.tempSum[t]!, 0) / R);
  const temperatureSd = Array.from({ length: years }, (_, t) => {
    const ss = chunks.reduce((s, c) => s + c.tempSumSq[t]!, 0);
    const m = temperatureMean[t]!;
    return R > 1 ? Math.sqrt(Math.max(0, (ss - R * m * m) / (R - 1))) : 0;
  });
  return { replicates: R, quantiles, belowThreshold, shareLambdaBelowOne, shareEverBelowOne: R ? ever.length / R : 0, medianFirstBelowIndex, temperatureMean, temperatureSd };
}
