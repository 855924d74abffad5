/**
 * Count-based growth and viability from a census series: the ratios
 * λ_t = N_{t+1}/N_t, their geometric mean, the diffusion-approximation
 * parameters μ and σ² by the regression of Dennis, Munholland & Scott 1991
 * (Ecol. Monogr. 61:115; Morris & Doak 2002 ch. 3), which copes with unequal
 * census intervals, and the probability of falling to a quasi-extinction
 * threshold by each horizon with a parametric-bootstrap interval.
 */
import { createRandom } from "../demography/random";
import { normalCdf } from "../stats/normal";
import { chiSquareQuantile, studentTTwoSided } from "./intervals";

export interface CountPoint {
  /** Census time in the series' unit (years), increasing. */
  t: number;
  /** Count, ≥ 0. */
  n: number;
}

export interface CountInterval {
  from: number;
  to: number;
  /** Length of the interval, t_{i+1} − t_i. */
  length: number;
  /** N_{t+1}/N_t, null when N_t = 0. */
  ratio: number | null;
  /** Whether the interval enters μ̂ and σ̂² (both counts above zero). */
  used: boolean;
  /** Why it is left out, when it is. */
  note: string | null;
}

export interface CountsNote {
  code: "single-count" | "no-usable-interval" | "one-interval" | "zero-count" | "missing-years" | "at-threshold" | "no-variance" | "short-series";
  message: string;
}

export interface QuasiExtinctionCurve {
  /** Threshold N_x and the starting count N_c (the last count unless given). */
  threshold: number;
  start: number;
  horizons: number[];
  /** G(T): probability of having fallen to N_x by horizon T. */
  probability: number[];
  /** Parametric-bootstrap percentile interval of G(T). */
  lower: number[];
  upper: number[];
  level: number;
  replicates: number;
  seed: number;
}

export interface CountsAnalysis {
  points: CountPoint[];
  intervals: CountInterval[];
  /** Number of intervals used (q). */
  q: number;
  /** Σ of the used interval lengths, t units. */
  totalTime: number;
  /** Geometric-mean growth factor per unit of time over the used intervals, exp(Σ ln λ_t / Σ Δt). */
  geometricMeanLambda: number | null;
  /** μ̂: mean of ln growth per unit of time; CI from t with q − 1 df. */
  mu: number | null;
  muSe: number | null;
  muCi: { lower: number; upper: number } | null;
  /** σ̂²: variance of ln growth per unit of time (residual mean square, q − 1 df); CI from χ². */
  sigma2: number | null;
  sigma2Ci: { lower: number; upper: number } | null;
  level: number;
  quasiExtinction: QuasiExtinctionCurve | null;
  notes: CountsNote[];
}

export interface CountsOptions {
  /** Quasi-extinction threshold N_x (> 0); no curve without it. */
  threshold?: number;
  /** Starting count N_c; the last count by default. */
  start?: number;
  /** Horizons 1..maxHorizon in the series' time unit. */
  maxHorizon?: number;
  level?: number;
  replicates?: number;
  seed?: number;
}

export const DEFAULT_MAX_HORIZON = 50;
export const DEFAULT_COUNT_BOOTSTRAP = 2000;
export const DEFAULT_COUNT_SEED = 20_261_202;

const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

/** log Φ(z), finite far into the lower tail (asymptotic series below z = −30). */
export function logNormalCdf(z: number): number {
  if (z > -30) return Math.log(normalCdf(z));
  const z2 = z * z;
  return -0.5 * z2 - Math.log(-z) - HALF_LOG_2PI + Math.log(1 - 1 / z2 + 3 / (z2 * z2));
}

/**
 * Probability that a diffusion with drift μ and variance σ² per unit time,
 * started d = ln(N_c/N_x) > 0 above the threshold, has reached it by time T
 * (Dennis et al. 1991, eq. 16; Morris & Doak 2002 eq. 3.5):
 * G(T) = Φ((−d − μT)/√(σ²T)) + exp(−2μd/σ²) Φ((−d + μT)/√(σ²T)).
 */
export function quasiExtinctionProbability(mu: number, sigma2: number, d: number, T: number): number {
  if (d <= 0) return 1;
  if (T <= 0) return 0;
  if (sigma2 <= 0) return mu * T <= -d ? 1 : 0;
  const s = Math.sqrt(sigma2 * T);
  const first = normalCdf((-d - mu * T) / s);
  const second = Math.exp((-2 * mu * d) / sigma2 + logNormalCdf((-d + mu * T) / s));
  return Math.min(1, Math.max(0, first + second));
}

const fmt = (x: number) => (Number.isInteger(x) ? String(x) : x.toFixed(2));

/** The whole counts analysis of one series (points sorted by time, validated upstream). */
export function analyzeCounts(points: readonly CountPoint[], options: CountsOptions = {}): CountsAnalysis {
  const level = options.level ?? 0.95;
  const notes: CountsNote[] = [];
  const intervals: CountInterval[] = [];
  for (let i = 0; i + 1 < points.length; i++) {
    const a = points[i]!;
    const b = points[i + 1]!;
    const length = b.t - a.t;
    const ratio = a.n > 0 ? b.n / a.n : null;
    let note: string | null = null;
    if (a.n === 0) note = `The count in ${fmt(a.t)} is zero: no growth ratio can start from it.`;
    else if (b.n === 0) note = `The count fell to zero in ${fmt(b.t)}: its logarithm is undefined, so the interval is left out of μ and σ².`;
    intervals.push({ from: a.t, to: b.t, length, ratio, used: note === null, note });
  }
  const used = intervals.filter((iv) => iv.used);
  const q = used.length;

  if (points.length === 1) {
    notes.push({ code: "single-count", message: "Only one count: growth needs at least two censuses, and μ and σ² at least three." });
  }
  const zeros = intervals.filter((iv) => !iv.used).length;
  if (zeros > 0) {
    notes.push({ code: "zero-count", message: `${zeros} interval${zeros === 1 ? "" : "s"} touch a count of zero and are left out of μ and σ² (a log ratio needs counts above zero). Consider whether those zeros are real absences or missed surveys.` });
  }
  const gaps = intervals.filter((iv) => iv.length > 1 + 1e-9);
  if (gaps.length > 0) {
    notes.push({
      code: "missing-years",
      message: `${gaps.length} gap${gaps.length === 1 ? "" : "s"} between censuses longer than one time unit (e.g. ${fmt(gaps[0]!.from)}–${fmt(gaps[0]!.to)}): the regression of Dennis et al. (1991) weights each interval by its length, so missing years are allowed.`,
    });
  }

  const base: CountsAnalysis = {
    points: [...points],
    intervals,
    q,
    totalTime: 0,
    geometricMeanLambda: null,
    mu: null,
    muSe: null,
    muCi: null,
    sigma2: null,
    sigma2Ci: null,
    level,
    quasiExtinction: null,
    notes,
  };
  if (q === 0) {
    if (points.length > 1) notes.push({ code: "no-usable-interval", message: "No interval with counts above zero at both ends: μ and σ² cannot be estimated." });
    return base;
  }

  // Regression through the origin of y_i = ln(N_{i+1}/N_i)/√Δt_i on x_i = √Δt_i.
  let sxx = 0;
  let sxy = 0;
  for (const iv of used) {
    const x = Math.sqrt(iv.length);
    const y = Math.log(iv.ratio!) / x;
    sxx += x * x;
    sxy += x * y;
  }
  const mu = sxy / sxx;
  base.totalTime = sxx;
  base.mu = mu;
  base.geometricMeanLambda = Math.exp(mu);
  if (q === 1) {
    notes.push({ code: "one-interval", message: "Only one usable interval: μ is its log growth rate, but σ² needs at least two intervals, so there are no intervals and no risk curve." });
    return base;
  }
  let rss = 0;
  for (const iv of used) {
    const x = Math.sqrt(iv.length);
    const r = Math.log(iv.ratio!) / x - mu * x;
    rss += r * r;
  }
  const df = q - 1;
  const sigma2 = rss / df;
  base.sigma2 = sigma2;
  const alpha = 1 - level;
  const muSe = Math.sqrt(sigma2 / sxx);
  base.muSe = muSe;
  const tq = studentTTwoSided(alpha, df);
  base.muCi = { lower: mu - tq * muSe, upper: mu + tq * muSe };
  base.sigma2Ci = { lower: (df * sigma2) / chiSquareQuantile(1 - alpha / 2, df), upper: (df * sigma2) / chiSquareQuantile(alpha / 2, df) };
  if (q < 10) {
    notes.push({ code: "short-series", message: `Only ${q} usable intervals: μ and σ² are poorly known and long-horizon risks even more so (Ludwig 1999). Read the intervals, not just the estimates.` });
  }
  if (sigma2 === 0) notes.push({ code: "no-variance", message: "Every interval shows the same growth rate: σ² = 0, so the model is deterministic and the risk is 0 or 1." });

  if (options.threshold !== undefined) {
    base.quasiExtinction = quasiExtinctionCurve(mu, sigma2, sxx, df, {
      threshold: options.threshold,
      start: options.start ?? points[points.length - 1]!.n,
      maxHorizon: options.maxHorizon ?? DEFAULT_MAX_HORIZON,
      level,
      replicates: options.replicates ?? DEFAULT_COUNT_BOOTSTRAP,
      seed: options.seed ?? DEFAULT_COUNT_SEED,
    });
    if (base.quasiExtinction.start <= options.threshold) {
      notes.push({ code: "at-threshold", message: `The starting count (${fmt(base.quasiExtinction.start)}) is already at or below the threshold (${fmt(options.threshold)}): the probability is 1 at every horizon.` });
    }
  }
  return base;
}

/**
 * G(T) for T = 1..maxHorizon with a parametric-bootstrap interval: μ* ~ N(μ̂, σ̂²/Σ Δt),
 * σ²* ~ σ̂² χ²_{q−1}/(q − 1) (the sampling distributions of the regression estimates;
 * Dennis et al. 1991 §"confidence intervals"), percentiles of G over the replicates.
 */
export function quasiExtinctionCurve(
  mu: number,
  sigma2: number,
  totalTime: number,
  df: number,
  o: { threshold: number; start: number; maxHorizon: number; level: number; replicates: number; seed: number },
): QuasiExtinctionCurve {
  const d = Math.log(o.start / o.threshold);
  const H = o.maxHorizon;
  const horizons = Array.from({ length: H }, (_, k) => k + 1);
  const probability = horizons.map((T) => quasiExtinctionProbability(mu, sigma2, d, T));
  const R = o.replicates;
  const draws = new Float64Array(R * H);
  const rng = createRandom(o.seed, 0);
  const muSe = Math.sqrt(sigma2 / totalTime);
  for (let b = 0; b < R; b++) {
    const m = mu + muSe * rng.normal();
    const s2 = (sigma2 * 2 * rng.gamma(df / 2)) / df;
    for (let h = 0; h < H; h++) draws[h * R + b] = quasiExtinctionProbability(m, s2, d, h + 1);
  }
  const lower: number[] = [];
  const upper: number[] = [];
  const alpha = 1 - o.level;
  for (let h = 0; h < H; h++) {
    const col = draws.subarray(h * R, (h + 1) * R).sort();
    lower.push(percentile(col, alpha / 2));
    upper.push(percentile(col, 1 - alpha / 2));
  }
  return { threshold: o.threshold, start: o.start, horizons, probability, lower, upper, level: o.level, replicates: R, seed: o.seed };
}

/** Percentile of sorted values by linear interpolation between order statistics (type 7). */
export function percentile(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}
