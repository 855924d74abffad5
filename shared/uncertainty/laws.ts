/**
 * The sampling uncertainty of each vital rate as a distribution ("law"), from
 * what the document gives (first found wins):
 *
 * 1. `distribution`: an explicit beta(α, β), lognormal(meanlog, sdlog) or
 *    gamma(shape, rate), used as given.
 * 2. `counts` k of n (probabilities): the Jeffreys beta(k + ½, n − k + ½),
 *    the posterior of a binomial proportion under the Jeffreys prior (Brown,
 *    Cai & DasGupta 2001, Stat. Sci. 16:101); it stays proper at k = 0 and
 *    k = n, where the plug-in SE √(p(1 − p)/n) would be 0.
 * 3. `se`, or else `ci` converted to an SE as (upper − lower)/(2 z), z the
 *    normal quantile of the CI's level (common practice): a beta with the
 *    rate's value as mean for a probability, a lognormal for a non-negative
 *    rate, a normal for an unbounded one — so draws respect each scale's
 *    bounds.
 *
 * A problem (an SE no beta with that mean can have, a lognormal for a
 * probability, correlations that contradict one another…) is reported with
 * the rate's name and the document path of the field.
 */
import { choleskyLower } from "../demography/index";
import { rateScale, type RateScale } from "../lifecycle/index";
import { rateLaw, type RateLaw } from "../risk/distributions";
import { normalQuantile } from "../stats/normal";


/** The fields of a vital rate this file reads (structural, so v1 and v2 documents both fit). */
export interface UncertainRateFields {
  readonly id: string;
  readonly name: string;
  readonly value: number;
  readonly scale?: RateScale | undefined;
  readonly se?: number | undefined;
  readonly ci?: { readonly lower: number; readonly upper: number; readonly level: number } | undefined;
  readonly counts?: { readonly k: number; readonly n: number } | undefined;
  readonly distribution?:
    | { readonly family: "beta"; readonly alpha: number; readonly beta: number }
    | { readonly family: "lognormal"; readonly meanlog: number; readonly sdlog: number }
    | { readonly family: "gamma"; readonly shape: number; readonly rate: number }
    | undefined;
}

export interface UncertaintyDocument {
  readonly rates: readonly UncertainRateFields[];
  readonly correlations?: readonly { readonly a: string; readonly b: string; readonly r: number }[] | undefined;
}

export type { RateScale };

/** A law for sampling: the Risk laws plus the normal (unbounded rates). */
export type SamplingLaw = RateLaw | { readonly kind: "normal"; readonly mean: number; readonly sd: number };

export type UncertaintySource = "distribution" | "counts" | "se" | "ci";

/** One rate's uncertainty, ready for the delta method and for draws. */
export interface RateUncertainty {
  readonly rateId: string;
  readonly name: string;
  /** Index in `doc.rates`. */
  readonly index: number;
  readonly source: UncertaintySource;
  readonly law: SamplingLaw;
  /** The law's mean and SD (units of the rate). */
  readonly mean: number;
  readonly sd: number;
  /** Bounds every draw respects. */
  readonly lower: number;
  readonly upper: number;
}

/** A problem with the uncertainty a document gives, tied to its field. */
export interface UncertaintyIssue {
  readonly rateId: string | null;
  /** Document path, e.g. ["rates", 2, "se"]. */
  readonly path: (string | number)[];
  readonly message: string;
  /** "error": the rate's uncertainty cannot be used; "warning": used, but worth a look. */
  readonly severity: "error" | "warning";
}

export interface UncertaintyModel {
  readonly rates: RateUncertainty[];
  /** Correlation matrix of the normal scores of `rates` (row-major, rates.length²). */
  readonly correlation: Float64Array;
  /** Lower Cholesky factor of `correlation`, or null when no correlation is given. */
  readonly cholesky: Float64Array | null;
  readonly issues: UncertaintyIssue[];
}

/** The scale of a rate: as given, or inferred from its value (schema.ts's rateScale). */
export function inferredScale(rate: Pick<UncertainRateFields, "value" | "scale">): RateScale {
  return rateScale(rate);
}

const fmt = (x: number) => (Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(4))) : x.toExponential(3));

function lawMoments(law: SamplingLaw): { mean: number; sd: number } {
  switch (law.kind) {
    case "constant":
      return { mean: law.value, sd: 0 };
    case "normal":
      return { mean: law.mean, sd: law.sd };
    case "beta": {
      const s = law.alpha + law.beta;
      return { mean: law.alpha / s, sd: Math.sqrt((law.alpha * law.beta) / (s * s * (s + 1))) };
    }
    case "gamma":
      return { mean: law.shape * law.scale, sd: Math.sqrt(law.shape) * law.scale };
    case "lognormal":
      return { mean: Math.exp(law.mu + (law.sigma * law.sigma) / 2), sd: Math.exp(law.mu + (law.sigma * law.sigma) / 2) * Math.sqrt(Math.expm1(law.sigma * law.sigma)) };
  }
}

function boundsOf(law: SamplingLaw): { lower: number; upper: number } {
  switch (law.kind) {
    case "constant":
      return { lower: law.value, upper: law.value };
    case "normal":
      return { lower: -Infinity, upper: Infinity };
    case "beta":
      return { lower: 0, upper: 1 };
    default:
      return { lower: 0, upper: Infinity };
  }
}

/**
 * One rate's uncertainty, or null when the rate gives none (or an SE of 0).
 * Throws nothing: problems go to `issues`, and a rate with an error has no law.
 */
export function rateUncertainty(rate: UncertainRateFields, index: number, issues: UncertaintyIssue[]): RateUncertainty | null {
  const scale = inferredScale(rate);
  const name = rate.name;
  const error = (field: string, message: string) => {
    issues.push({ rateId: rate.id, path: ["rates", index, field], message, severity: "error" });
    return null;
  };
  const make = (source: UncertaintySource, law: SamplingLaw): RateUncertainty => ({ rateId: rate.id, name, index, source, law, ...lawMoments(law), ...boundsOf(law) });
  const warnMean = (field: string, mean: number, what: string) => {
    const tolerance = 0.05 * Math.max(Math.abs(rate.value), 1e-9);
    if (Math.abs(mean - rate.value) > tolerance) {
      issues.push({
        rateId: rate.id,
        path: ["rates", index, field],
        severity: "warning",
        message: `${name}: ${what} has mean ${fmt(mean)} but the rate's value is ${fmt(rate.value)}; draws follow the ${what}, the delta method is centred on the value.`,
      });
    }
  };

  const d = rate.distribution;
  if (d) {
    if (d.family === "beta") {
      if (scale !== "probability") return error("distribution", `${name} is a ${scale} rate; a beta distribution only fits a probability (0 to 1). Use a lognormal or gamma.`);
      const u = make("distribution", { kind: "beta", alpha: d.alpha, beta: d.beta });
      warnMean("distribution", u.mean, "its beta distribution");
      return u;
    }
    if (scale === "probability") return error("distribution", `${name} is a probability; a ${d.family} distribution can exceed 1. Use a beta distribution, counts or an SE.`);
    if (scale === "unbounded") return error("distribution", `${name} can be negative; a ${d.family} distribution is for positive rates. Give an SE instead (drawn from a normal).`);
    const law: SamplingLaw = d.family === "lognormal" ? { kind: "lognormal", mu: d.meanlog, sigma: d.sdlog } : { kind: "gamma", shape: d.shape, scale: 1 / d.rate };
    const u = make("distribution", law);
    warnMean("distribution", u.mean, `its ${d.family} distribution`);
    return u;
  }

  if (rate.counts) {
    const { k, n } = rate.counts;
    if (k > n) return error("counts", `${name}: k (${k}) cannot exceed n (${n}).`);
    if (scale !== "probability") return error("counts", `${name}: counts (k of n) describe a probability, but ${name} is a ${scale} rate. Give an SE instead.`);
    const u = make("counts", { kind: "beta", alpha: k + 0.5, beta: n - k + 0.5 });
    const p = k / n;
    if (Math.abs(p - rate.value) > Math.max(0.5 / n, 0.005)) {
      issues.push({
        rateId: rate.id,
        path: ["rates", index, "value"],
        severity: "warning",
        message: `${name}: the counts give ${k}/${n} = ${fmt(p)} but the rate's value is ${fmt(rate.value)}; draws follow the counts.`,
      });
    }
    return u;
  }

  let sd: number | null = null;
  let source: UncertaintySource = "se";
  let field = "se";
  if (rate.se !== undefined) {
    if (!(rate.se >= 0) || !Number.isFinite(rate.se)) return error("se", `${name}: a standard error is a finite number ≥ 0; got ${rate.se}.`);
    sd = rate.se;
  } else if (rate.ci !== undefined) {
    const { lower, upper, level } = rate.ci;
    source = "ci";
    field = "ci";
    if (!(upper >= lower)) return error("ci", `${name}: the CI's upper bound is below its lower bound.`);
    if (!(level > 0 && level < 1)) return error("ci", `${name}: the CI's level is a proportion between 0 and 1, such as 0.95.`);
    if (rate.value < lower || rate.value > upper) return error("ci", `${name}: the value ${fmt(rate.value)} lies outside its CI ${fmt(lower)}–${fmt(upper)}.`);
    sd = (upper - lower) / (2 * normalQuantile(0.5 + level / 2));
  }
  if (sd === null || sd === 0) return null;

  if (scale === "unbounded") return make(source, { kind: "normal", mean: rate.value, sd });
  const what = source === "ci" ? `An SE of ${fmt(sd)} (from the CI)` : `An SE of ${fmt(sd)}`;
  if (scale === "probability") {
    const v = rate.value * (1 - rate.value);
    if (!(rate.value > 0 && rate.value < 1)) return error(field, `${what} is impossible for ${name} = ${fmt(rate.value)}: a probability of exactly 0 or 1 has no spread. Give counts (k of n) instead.`);
    if (!(sd * sd < v)) return error(field, `${what} is impossible for ${name}: a beta distribution with mean ${fmt(rate.value)} needs an SE below √(p(1 − p)) = ${fmt(Math.sqrt(v))}.`);
    return make(source, rateLaw("beta", rate.value, sd));
  }
  if (!(rate.value > 0)) return error(field, `${what} cannot be used for ${name} = 0: a lognormal needs a mean above 0. Give an explicit distribution instead.`);
  return make(source, rateLaw("lognormal", rate.value, sd));
}

/**
 * Every rate's uncertainty and the correlations between them. Correlations
 * name rates by id; a correlation with a rate that has no uncertainty is
 * reported and ignored. The correlation matrix must be positive definite.
 */
export function uncertaintyModel(doc: UncertaintyDocument): UncertaintyModel {
  const issues: UncertaintyIssue[] = [];
  const rates: RateUncertainty[] = [];
  doc.rates.forEach((r, i) => {
    const u = rateUncertainty(r, i, issues);
    if (u) rates.push(u);
  });
  const m = rates.length;
  const correlation = new Float64Array(m * m);
  for (let i = 0; i < m; i++) correlation[i * m + i] = 1;
  const slot = new Map(rates.map((r, i) => [r.rateId, i]));
  const nameOf = new Map(doc.rates.map((r) => [r.id, r.name]));
  let any = false;
  (doc.correlations ?? []).forEach((c, k) => {
    const i = slot.get(c.a);
    const j = slot.get(c.b);
    if (i === undefined || j === undefined) {
      const missing = i === undefined ? c.a : c.b;
      const label = nameOf.get(missing);
      issues.push({
        rateId: missing,
        path: ["correlations", k, i === undefined ? "a" : "b"],
        severity: label === undefined ? "error" : "warning",
        message: label === undefined ? `A correlation names the rate id "${missing}", which does not exist.` : `${label} has no uncertainty, so its correlation with ${nameOf.get(missing === c.a ? c.b : c.a) ?? "another rate"} is ignored.`,
      });
      return;
    }
    if (i === j || c.r === 0) return;
    correlation[i * m + j] = c.r;
    correlation[j * m + i] = c.r;
    any = true;
  });
  let cholesky: Float64Array | null = null;
  if (any) {
    const rows = Array.from({ length: m }, (_, i) => Array.from(correlation.subarray(i * m, (i + 1) * m)));
    const chol = choleskyLower(rows);
    if (chol.ok) cholesky = chol.L;
    else {
      const at = rates[chol.row]!;
      issues.push({
        rateId: at.rateId,
        path: ["correlations"],
        severity: "error",
        message: `The correlations are not mutually consistent: the correlation matrix is not positive definite (the check fails at ${at.name}). Correlations of ±1, or strong correlations with incompatible signs, cause this; weaken some of them.`,
      });
    }
  }
  return { rates, correlation, cholesky, issues };
}

/** Issues that stop the uncertainty from being used. */
export function blockingIssues(model: UncertaintyModel): UncertaintyIssue[] {
  return model.issues.filter((i) => i.severity === "error");
}
