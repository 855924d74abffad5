/**
 * Bootstrap of λ from stage-fate records: each resample draws, within every
 * stage, as many records as the stage has, with replacement, and rebuilds the
 * matrix exactly as estimateStageFates does (Caswell 2001 §12.1.4; Morris &
 * Doak 2002 ch. 8). Resamples are split into chunks; chunk k draws from its
 * own stream of the seed, so the result depends only on (seed, chunks).
 */
import { createRandom } from "../demography/random";
import { percentile } from "./counts";
import { fillMatrix, lambdaOf, type CensusTiming, type FateSample, type FateTallies } from "./estimate";

export const MIN_BOOTSTRAP_RESAMPLES = 2000;
export const MAX_BOOTSTRAP_RESAMPLES = 100_000;

export interface BootstrapSettings {
  census: CensusTiming;
  offspringSurvival: number;
  newbornStage: number;
}

/** Records grouped by stage, ready for resampling. */
export interface StageGroups {
  s: number;
  fate: Int32Array[];
  offspring: Float64Array[];
}

export function groupByStage(sample: FateSample): StageGroups {
  const s = sample.stages.length;
  const sizes = new Int32Array(s);
  for (let r = 0; r < sample.stage.length; r++) sizes[sample.stage[r]!]! += 1;
  const fate = Array.from(sizes, (n) => new Int32Array(n));
  const offspring = Array.from(sizes, (n) => new Float64Array(n));
  const at = new Int32Array(s);
  for (let r = 0; r < sample.stage.length; r++) {
    const j = sample.stage[r]!;
    const k = at[j]!++;
    fate[j]![k] = sample.fate[r]!;
    offspring[j]![k] = sample.offspring[r]!;
  }
  return { s, fate, offspring };
}

/** λ of `count` resamples drawn from stream `stream` of `seed`. */
export function bootstrapLambdas(groups: StageGroups, settings: BootstrapSettings, o: { seed: number; stream: number; count: number }): Float64Array {
  const s = groups.s;
  const rng = createRandom(o.seed, o.stream);
  const t: FateTallies = {
    s,
    counts: new Float64Array(s * s),
    deaths: new Float64Array(s),
    unknown: new Float64Array(s),
    offspringSum: new Float64Array(s),
    offspringSumSq: new Float64Array(s),
    offspringN: new Float64Array(s),
  };
  const a = new Float64Array(s * s);
  const out = new Float64Array(o.count);
  for (let b = 0; b < o.count; b++) {
    t.counts.fill(0);
    t.deaths.fill(0);
    t.unknown.fill(0);
    t.offspringSum.fill(0);
    t.offspringN.fill(0);
    for (let j = 0; j < s; j++) {
      const fate = groups.fate[j]!;
      const off = groups.offspring[j]!;
      const n = fate.length;
      for (let r = 0; r < n; r++) {
        const k = Math.floor(rng.uniform32() * n);
        const f = fate[k]!;
        if (f >= 0) t.counts[f * s + j]! += 1;
        else if (f === -1) t.deaths[j]! += 1;
        const m = off[k]!;
        if (m === m) {
          t.offspringSum[j]! += m;
          t.offspringN[j]! += 1;
        }
      }
    }
    fillMatrix(t, settings.census, settings.offspringSurvival, settings.newbornStage, a);
    out[b] = lambdaOf(a, s);
  }
  return out;
}

export interface BootstrapSummary {
  resamples: number;
  /** λ of the data themselves. */
  lambda: number;
  mean: number;
  sd: number;
  /** mean − λ̂: the small-sample bias the resamples suggest. */
  bias: number;
  level: number;
  /** Percentile interval. */
  lower: number;
  upper: number;
  /** Share of resamples with λ < 1. */
  shareBelowOne: number;
  /** Histogram of the resampled λ: equal-width bins. */
  histogram: { from: number; to: number; count: number }[];
}

/** Percentile interval and summary of resampled λ values. */
export function summarizeBootstrap(lambdas: ArrayLike<number>, lambdaHat: number, level = 0.95, bins = 30): BootstrapSummary {
  const sorted = Float64Array.from(lambdas).sort();
  const n = sorted.length;
  let sum = 0;
  let below = 0;
  for (let k = 0; k < n; k++) {
    sum += sorted[k]!;
    if (sorted[k]! < 1) below++;
  }
  const mean = sum / n;
  let ss = 0;
  for (let k = 0; k < n; k++) ss += (sorted[k]! - mean) ** 2;
  const lo = sorted[0]!;
  const hi = sorted[n - 1]!;
  const width = hi > lo ? (hi - lo) / bins : 1;
  const histogram = Array.from({ length: hi > lo ? bins : 1 }, (_, b) => ({ from: lo + b * width, to: lo + (b + 1) * width, count: 0 }));
  for (let k = 0; k < n; k++) {
    const b = Math.min(histogram.length - 1, Math.floor((sorted[k]! - lo) / width));
    histogram[b]!.count++;
  }
  const alpha = 1 - level;
  return {
    resamples: n,
    lambda: lambdaHat,
    mean,
    sd: n > 1 ? Math.sqrt(ss / (n - 1)) : 0,
    bias: mean - lambdaHat,
    level,
    lower: percentile(sorted, alpha / 2),
    upper: percentile(sorted, 1 - alpha / 2),
    shareBelowOne: below / n,
    histogram,
  };
}
