/**
 * Confidence intervals for field estimates: binomial proportions (Wilson and
 * Clopper–Pearson), and the t and χ² quantiles the count regression needs.
 * Quantiles come from jstat's inverse regularised incomplete beta and gamma
 * functions, so nothing here is tabulated by hand.
 */
import jStat from "jstat";
import { normalQuantile, wilsonInterval } from "../stats/normal";

export interface Interval {
  lower: number;
  upper: number;
  level: number;
}

export type BinomialMethod = "wilson" | "clopper-pearson";

/**
 * Wilson score interval for k successes in n trials (Wilson 1927, JASA 22:209):
 * (p̂ + z²/2n ± z √(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n).
 */
export function wilson(k: number, n: number, level = 0.95): Interval {
  checkTrials(k, n);
  return { ...wilsonInterval(k, n, normalQuantile(0.5 + level / 2)), level };
}

/**
 * Clopper–Pearson ("exact") interval (Clopper & Pearson 1934, Biometrika 26:404):
 * lower = B⁻¹(α/2; k, n−k+1), upper = B⁻¹(1−α/2; k+1, n−k), with 0 and 1 at the ends.
 */
export function clopperPearson(k: number, n: number, level = 0.95): Interval {
  checkTrials(k, n);
  const alpha = 1 - level;
  const lower = k === 0 ? 0 : jStat.ibetainv(alpha / 2, k, n - k + 1);
  const upper = k === n ? 1 : jStat.ibetainv(1 - alpha / 2, k + 1, n - k);
  return { lower, upper, level };
}

export function binomialInterval(method: BinomialMethod, k: number, n: number, level = 0.95): Interval {
  return method === "wilson" ? wilson(k, n, level) : clopperPearson(k, n, level);
}

function checkTrials(k: number, n: number): void {
  if (!(Number.isInteger(n) && n >= 1 && Number.isInteger(k) && k >= 0 && k <= n)) {
    throw new RangeError(`A binomial interval needs whole numbers 0 ≤ k ≤ n, n ≥ 1; got k = ${k}, n = ${n}.`);
  }
}

/**
 * Upper quantile of Student's t with ν degrees of freedom: the t with
 * P(|T| > t) = α, from P(|T| > t) = I_{ν/(ν+t²)}(ν/2, ½).
 */
export function studentTTwoSided(alpha: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`Student's t needs ν > 0; got ${df}.`);
  const x = jStat.ibetainv(alpha, df / 2, 0.5);
  return Math.sqrt(df * (1 / x - 1));
}

/** Quantile of the χ² distribution with ν degrees of freedom: 2 P⁻¹(ν/2, p). */
export function chiSquareQuantile(p: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`χ² needs ν > 0; got ${df}.`);
  return 2 * jStat.gammapinv(p, df / 2);
}
