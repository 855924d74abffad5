/**
 * The standard normal distribution and the intervals built on it, written
 * once for every area (Risk, Uncertainty, Field data, the numerical core).
 * Pure maths, no dependencies.
 */

/** z of a two-sided 95 % interval, Φ⁻¹(0.975). */
export const Z95 = 1.959963984540054;

const SQRT_2PI = Math.sqrt(2 * Math.PI);
const LOG_SQRT_2PI = Math.log(SQRT_2PI);

/** Standard normal density φ(z). */
export function normalDensity(z: number): number {
  return Math.exp(-0.5 * z * z) / SQRT_2PI;
}

/** ln φ(z), finite where φ(z) underflows. */
export function logNormalDensity(z: number): number {
  return -0.5 * z * z - LOG_SQRT_2PI;
}

/**
 * Upper tail Q(x) = 1 − Φ(x) for x ≥ 0, to about 1e-15 relative: the series
 * Φ(x) − ½ = φ(x) Σ x^(2k+1)/(2k+1)!! below 2, Laplace's continued fraction
 * Q(x) = φ(x)/(x + 1/(x + 2/(x + 3/(x + …)))) (300 terms) from 2 on.
 */
export function normalUpperTail(x: number): number {
  if (x < 2) {
    let term = x;
    let sum = x;
    for (let k = 1; k < 500; k++) {
      term *= (x * x) / (2 * k + 1);
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return 0.5 - normalDensity(x) * sum;
  }
  let f = x;
  for (let k = 300; k >= 1; k--) f = x + k / f;
  return normalDensity(x) / f;
}

/** Standard normal distribution function Φ(z), accurate in both tails. */
export function normalCdf(z: number): number {
  return z >= 0 ? 1 - normalUpperTail(z) : normalUpperTail(-z);
}

/** Normal quantile z with Φ(z) = p (0 < p < 1): bisection to bracket, then Newton steps on Φ. */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`A normal quantile needs a probability strictly between 0 and 1; got ${p}.`);
  let lo = -40;
  let hi = 40;
  for (let k = 0; k < 60; k++) {
    const mid = (lo + hi) / 2;
    if (normalCdf(mid) < p) lo = mid;
    else hi = mid;
  }
  let z = (lo + hi) / 2;
  for (let k = 0; k < 3; k++) z -= (normalCdf(z) - p) / normalDensity(z);
  return z;
}

/**
 * Wilson score interval for k successes in n trials (Wilson 1927, JASA 22:209):
 * (p̂ + z²/2n ± z √(p̂(1−p̂)/n + z²/4n²)) / (1 + z²/n), exactly 0 at k = 0 and
 * 1 at k = n; [0, 1] when there are no trials.
 */
export function wilsonInterval(k: number, n: number, z = Z95): { lower: number; upper: number } {
  if (n <= 0) return { lower: 0, upper: 1 };
  const p = k / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
  return { lower: k <= 0 ? 0 : Math.max(0, centre - half), upper: k >= n ? 1 : Math.min(1, centre + half) };
}
