/**
 * A projection matrix from stage-fate records of marked individuals
 * (Caswell 2001 ch. 6; Morris & Doak 2002 ch. 8): a_ij = n_ij/n_j for
 * survival and growth, fertility from the offspring each individual produced,
 * built for the census timing chosen, with binomial intervals and sample sizes.
 * Small samples bias λ (Fiske, Bruna & Bolker 2008, PLoS ONE 3:e3080).
 */
import { dominantEigenDense } from "../demography/eigen";
import { binomialInterval, type BinomialMethod, type Interval } from "./intervals";

/** Fate codes beside the stage indices 0..s−1. */
export const FATE_DEAD = -1;
export const FATE_UNKNOWN = -2;

/** Records in columns: one entry per individual and census (Float64Array/Int32Array for 100,000s of rows). */
export interface FateSample {
  stages: readonly string[];
  /** Stage index at the census. */
  stage: Int32Array;
  /** Stage index at the next census, FATE_DEAD, or FATE_UNKNOWN (not seen again, not known dead). */
  fate: Int32Array;
  /** Offspring produced in the breeding season of this census row; NaN when not recorded. */
  offspring: Float64Array;
}

export type CensusTiming = "pre-breeding" | "post-breeding";

export interface EstimateOptions {
  census: CensusTiming;
  /**
   * Pre-breeding census only: survival of offspring from birth to their first census
   * (1 when the offspring column already counts young seen at the next census).
   */
  offspringSurvival?: number;
  /** Stage that newborns enter (index), 0 by default. */
  newbornStage?: number;
  method?: BinomialMethod;
  level?: number;
}

export interface TransitionEstimate {
  from: number;
  to: number;
  /** n_ij individuals of stage j found in stage i at the next census, of n_j with a known fate. */
  k: number;
  n: number;
  p: number;
  se: number;
  ci: Interval | null;
  /** Not observed (k = 0) although the stage had individuals: the estimate is 0 but the CI says how large it could be. */
  zeroCount: boolean;
}

export interface FecundityEstimate {
  stage: number;
  /** Individuals of the stage with offspring recorded. */
  n: number;
  /** Mean offspring per individual per breeding season, m̄_j. */
  mean: number | null;
  se: number | null;
}

export interface FertilityEstimate {
  /** Column (parent's stage at t) and row (newborn stage). */
  from: number;
  to: number;
  value: number;
  se: number | null;
}

export interface StageFateNote {
  code: "empty-stage" | "zero-count" | "unknown-fates" | "small-sample" | "no-offspring" | "column-above-one";
  message: string;
  stage?: number;
}

export interface StageFateEstimate {
  stages: string[];
  census: CensusTiming;
  offspringSurvival: number;
  newbornStage: number;
  method: BinomialMethod;
  level: number;
  /** Individuals at each stage with a known fate (the n behind each column). */
  n: number[];
  /** Records of each stage whose fate is unknown (left out of the transitions). */
  unknown: number[];
  /** Deaths by stage. */
  deaths: number[];
  /** n_ij: row i (stage at t+1), column j (stage at t). */
  counts: number[][];
  survival: { stage: number; k: number; n: number; p: number | null; se: number | null; ci: Interval | null }[];
  transitions: TransitionEstimate[];
  fecundity: FecundityEstimate[];
  fertility: FertilityEstimate[];
  U: number[][];
  F: number[][];
  A: number[][];
  lambda: number | null;
  notes: StageFateNote[];
}

const SMALL_SAMPLE = 10;

/** Tallies of one sample: n_ij, deaths, unknown fates, offspring sums and counts per stage. */
export interface FateTallies {
  s: number;
  /** counts[i * s + j]. */
  counts: Float64Array;
  deaths: Float64Array;
  unknown: Float64Array;
  offspringSum: Float64Array;
  offspringSumSq: Float64Array;
  offspringN: Float64Array;
}

export function tallyFates(sample: FateSample, rows?: ArrayLike<number>): FateTallies {
  const s = sample.stages.length;
  const t: FateTallies = {
    s,
    counts: new Float64Array(s * s),
    deaths: new Float64Array(s),
    unknown: new Float64Array(s),
    offspringSum: new Float64Array(s),
    offspringSumSq: new Float64Array(s),
    offspringN: new Float64Array(s),
  };
  const m = rows ? rows.length : sample.stage.length;
  for (let r = 0; r < m; r++) {
    const row = rows ? rows[r]! : r;
    const j = sample.stage[row]!;
    const f = sample.fate[row]!;
    if (f >= 0) t.counts[f * s + j]! += 1;
    else if (f === FATE_DEAD) t.deaths[j]! += 1;
    else t.unknown[j]! += 1;
    const o = sample.offspring[row]!;
    if (o === o) {
      t.offspringSum[j]! += o;
      t.offspringSumSq[j]! += o * o;
      t.offspringN[j]! += 1;
    }
  }
  return t;
}

/**
 * Fills `a` (s × s, row-major, a[i*s+j]) with A = U + F from tallies.
 * Pre-breeding census: F_{0j} = s₀ m̄_j (breed right after the census; young survive to the next one).
 * Post-breeding census: F_{0j} = Σ_i u_ij m̄_i (parents survive to the next census and breed as stage i).
 * Caswell 2001 §2.3. A stage without offspring records contributes m̄ = 0.
 */
export function fillMatrix(t: FateTallies, census: CensusTiming, offspringSurvival: number, newborn: number, a: Float64Array): void {
  const s = t.s;
  const mean = new Float64Array(s);
  for (let j = 0; j < s; j++) mean[j] = t.offspringN[j]! > 0 ? t.offspringSum[j]! / t.offspringN[j]! : 0;
  for (let j = 0; j < s; j++) {
    let known = t.deaths[j]!;
    for (let i = 0; i < s; i++) known += t.counts[i * s + j]!;
    let fert = census === "pre-breeding" ? offspringSurvival * mean[j]! : 0;
    for (let i = 0; i < s; i++) {
      const u = known > 0 ? t.counts[i * s + j]! / known : 0;
      a[i * s + j] = u;
      if (census === "post-breeding") fert += u * mean[i]!;
    }
    a[newborn * s + j]! += fert;
  }
}

/** λ of a dense s × s matrix (row-major). */
export function lambdaOf(a: Float64Array, s: number): number {
  return dominantEigenDense(a, s, { second: false }).lambda;
}

/** The estimated matrix with sample sizes, intervals and plain-language notes. */
export function estimateStageFates(sample: FateSample, options: EstimateOptions): StageFateEstimate {
  const s = sample.stages.length;
  const census = options.census;
  const s0 = census === "pre-breeding" ? (options.offspringSurvival ?? 1) : 1;
  const newborn = options.newbornStage ?? 0;
  const method = options.method ?? "wilson";
  const level = options.level ?? 0.95;
  const t = tallyFates(sample);
  const notes: StageFateNote[] = [];
  const name = (j: number) => sample.stages[j]!;

  const n: number[] = [];
  const counts: number[][] = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  const U: number[][] = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  const F: number[][] = Array.from({ length: s }, () => new Array<number>(s).fill(0));
  for (let j = 0; j < s; j++) {
    let known = t.deaths[j]!;
    for (let i = 0; i < s; i++) {
      counts[i]![j] = t.counts[i * s + j]!;
      known += t.counts[i * s + j]!;
    }
    n.push(known);
  }

  const transitions: TransitionEstimate[] = [];
  const survival: StageFateEstimate["survival"] = [];
  for (let j = 0; j < s; j++) {
    const nj = n[j]!;
    const alive = nj - t.deaths[j]!;
    survival.push(
      nj > 0
        ? { stage: j, k: alive, n: nj, p: alive / nj, se: Math.sqrt(((alive / nj) * (1 - alive / nj)) / nj), ci: binomialInterval(method, alive, nj, level) }
        : { stage: j, k: 0, n: 0, p: null, se: null, ci: null },
    );
    if (nj === 0) {
      const seen = t.unknown[j]! > 0 ? ` (${t.unknown[j]} record${t.unknown[j] === 1 ? "" : "s"} with unknown fate)` : "";
      notes.push({ stage: j, code: "empty-stage", message: `No ${name(j)} individual with a known fate${seen}: the ${name(j)} column is unknown, not zero. Add records or set these rates by hand.` });
      continue;
    }
    if (nj < SMALL_SAMPLE) {
      notes.push({ stage: j, code: "small-sample", message: `Only ${nj} ${name(j)} individual${nj === 1 ? "" : "s"} with a known fate: its rates are rough, and small samples bias λ (Fiske et al. 2008).` });
    }
    for (let i = 0; i < s; i++) {
      const k = counts[i]![j]!;
      const p = k / nj;
      U[i]![j] = p;
      transitions.push({ from: j, to: i, k, n: nj, p, se: Math.sqrt((p * (1 - p)) / nj), ci: binomialInterval(method, k, nj, level), zeroCount: k === 0 });
    }
  }
  const zeroCounts = transitions.filter((tr) => tr.zeroCount);
  if (zeroCounts.length > 0) {
    notes.push({
      code: "zero-count",
      message: `${zeroCounts.length} transition${zeroCounts.length === 1 ? " was" : "s were"} never observed (0 of n). They are set to 0 in the matrix, but the interval beside each says how large they could be; decide whether each is impossible or just unseen.`,
    });
  }
  const unknownTotal = t.unknown.reduce((a, b) => a + b, 0);
  if (unknownTotal > 0) {
    notes.push({ code: "unknown-fates", message: `${unknownTotal} record${unknownTotal === 1 ? " has" : "s have"} no fate (not seen at the next census and not known dead): left out of the transitions, kept for offspring.` });
  }

  const fecundity: FecundityEstimate[] = [];
  const mean: number[] = [];
  const meanSe: number[] = [];
  for (let j = 0; j < s; j++) {
    const k = t.offspringN[j]!;
    if (k === 0) {
      fecundity.push({ stage: j, n: 0, mean: null, se: null });
      mean.push(0);
      meanSe.push(0);
      continue;
    }
    const m = t.offspringSum[j]! / k;
    const variance = k > 1 ? Math.max(0, (t.offspringSumSq[j]! - k * m * m) / (k - 1)) : 0;
    const se = k > 1 ? Math.sqrt(variance / k) : null;
    fecundity.push({ stage: j, n: k, mean: m, se });
    mean.push(m);
    meanSe.push(se ?? 0);
  }
  if (fecundity.every((f) => f.n === 0)) notes.push({ code: "no-offspring", message: "No offspring recorded: the matrix has no reproduction, so λ only reflects survival." });

  const fertility: FertilityEstimate[] = [];
  for (let j = 0; j < s; j++) {
    let value: number;
    let se: number | null;
    if (census === "pre-breeding") {
      value = s0 * mean[j]!;
      se = fecundity[j]!.n > 1 ? s0 * meanSe[j]! : null;
    } else {
      // F_0j = Σ_i u_ij m̄_i; delta method with the multinomial covariance of the u_ij.
      const nj = n[j]!;
      let sum = 0;
      let sum2 = 0;
      let varM = 0;
      for (let i = 0; i < s; i++) {
        const u = U[i]![j]!;
        sum += u * mean[i]!;
        sum2 += u * mean[i]! * mean[i]!;
        varM += u * u * meanSe[i]! * meanSe[i]!;
      }
      value = sum;
      se = nj > 0 ? Math.sqrt(Math.max(0, (sum2 - sum * sum) / nj + varM)) : null;
    }
    if (value > 0) {
      fertility.push({ from: j, to: newborn, value, se });
      F[newborn]![j] = value;
    }
  }
  const A = U.map((row, i) => row.map((u, j) => u + F[i]![j]!));
  const dense = new Float64Array(s * s);
  for (let i = 0; i < s; i++) for (let j = 0; j < s; j++) dense[i * s + j] = A[i]![j]!;
  const lambda = s > 0 ? lambdaOf(dense, s) : null;
  return {
    stages: [...sample.stages],
    census,
    offspringSurvival: s0,
    newbornStage: newborn,
    method,
    level,
    n,
    unknown: Array.from(t.unknown),
    deaths: Array.from(t.deaths),
    counts,
    survival,
    transitions,
    fecundity,
    fertility,
    U,
    F,
    A,
    lambda: lambda !== null && Number.isFinite(lambda) ? lambda : null,
    notes,
  };
}
