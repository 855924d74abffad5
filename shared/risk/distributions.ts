// Year-to-year distributions of vital rates, given by their mean and SD, and
// the Gaussian copula that correlates them.
//
// Parameters from mean m and SD s (method of moments):
// - beta (probabilities): α = m·k, β = (1 − m)·k, k = m(1 − m)/s² − 1; needs s² < m(1 − m).
// - gamma (positive rates): shape (m/s)², scale s²/m.
// - lognormal (positive rates): σ² = ln(1 + s²/m²), μ = ln m − σ²/2.
//
// Correlated rates: z = L ε (L the Cholesky factor of the correlation
// matrix, ε independent standard normals), then x = F⁻¹(Φ(z)) for each
// rate's distribution F. The requested correlation is that of the normal
// scores z; the rates themselves then have Spearman rank correlation
// (6/π)·arcsin(r/2) (exact for a Gaussian copula) and a Pearson
// correlation close to r.
//
// F⁻¹(Φ(z)) of a beta or gamma has no closed form, and inverting the
// incomplete beta or gamma function for every draw costs microseconds. It is
// tabulated once per rate instead: at z = −8, −8 + 1/16, …, 8 the quantile is
// computed with jstat's inverse incomplete beta/gamma functions (relative
// accuracy about 1e-7, their continued fractions' tolerance) and transformed
// (logit for beta, log for gamma), and a draw interpolates with cubic
// Hermite polynomials using the exact derivative dx/dz = φ(z)/f(x). The
// interpolation error is far below that of the tabulated values; normal
// scores beyond ±8 (probability 1.2e-15) are clamped.
import jStat from "jstat";
import type { Random } from "../demography/random";
import { logNormalDensity, normalUpperTail as upperTail } from "../stats/normal";

export type RateDistribution = "beta" | "lognormal" | "gamma";

/** One rate's distribution with derived parameters. */
export type RateLaw =
  | { readonly kind: "constant"; readonly value: number }
  | { readonly kind: "beta"; readonly alpha: number; readonly beta: number }
  | { readonly kind: "gamma"; readonly shape: number; readonly scale: number }
  | { readonly kind: "lognormal"; readonly mu: number; readonly sigma: number };

/** Parameters of a distribution from its mean and SD (sd = 0: the constant mean). Throws RangeError when impossible. */
export function rateLaw(distribution: RateDistribution, mean: number, sd: number): RateLaw {
  if (!Number.isFinite(mean) || !Number.isFinite(sd) || sd < 0) throw new RangeError(`The mean and SD must be finite and the SD ≥ 0; got mean ${mean}, SD ${sd}.`);
  if (sd === 0) return { kind: "constant", value: mean };
  if (distribution === "beta") {
    const v = mean * (1 - mean);
    if (!(mean > 0 && mean < 1) || !(sd * sd < v)) {
      throw new RangeError(`A beta distribution with mean ${mean} needs 0 < mean < 1 and SD < √(mean(1 − mean)); got SD ${sd}.`);
    }
    const k = v / (sd * sd) - 1;
    return { kind: "beta", alpha: mean * k, beta: (1 - mean) * k };
  }
  if (!(mean > 0)) throw new RangeError(`A ${distribution} distribution needs a mean above 0; got ${mean}.`);
  if (distribution === "gamma") return { kind: "gamma", shape: (mean / sd) ** 2, scale: (sd * sd) / mean };
  const sigma2 = Math.log1p((sd / mean) ** 2);
  return { kind: "lognormal", mu: Math.log(mean) - sigma2 / 2, sigma: Math.sqrt(sigma2) };
}

/** A direct draw (no copula). */
export function drawRate(law: RateLaw, rng: Random): number {
  switch (law.kind) {
    case "constant":
      return law.value;
    case "beta":
      return rng.beta(law.alpha, law.beta);
    case "gamma":
      return law.scale * rng.gamma(law.shape);
    case "lognormal":
      return rng.lognormal(law.mu, law.sigma);
  }
}

const TABLE_MIN = -8;
const TABLE_STEP = 1 / 16;
const TABLE_POINTS = 257;

/** x = F⁻¹(Φ(z)) for one beta or gamma law, tabulated in z (see the file comment). */
export class NormalScoreQuantile {
  private readonly h: Float64Array;
  private readonly dh: Float64Array;
  private readonly logit: boolean;
  private readonly scale: number;

  constructor(law: Extract<RateLaw, { kind: "beta" | "gamma" }>) {
    this.logit = law.kind === "beta";
    this.scale = law.kind === "gamma" ? law.scale : 1;
    this.h = new Float64Array(TABLE_POINTS);
    this.dh = new Float64Array(TABLE_POINTS);
    const TINY = 1e-300;
    for (let k = 0; k < TABLE_POINTS; k++) {
      const z = TABLE_MIN + k * TABLE_STEP;
      const logPhi = logNormalDensity(z);
      if (law.kind === "beta") {
        const { alpha: a, beta: b } = law;
        // x and 1 − x, each computed from the tail it is small in.
        let x: number;
        let y: number;
        if (z <= 0) {
          x = jStat.ibetainv(upperTail(-z), a, b);
          y = 1 - x;
        } else {
          y = jStat.ibetainv(upperTail(z), b, a);
          x = 1 - y;
        }
        const lx = Math.log(Math.max(x, TINY));
        const ly = Math.log(Math.max(y, TINY));
        this.h[k] = lx - ly;
        // dh/dz = φ(z)/(x(1 − x) f(x)) = φ(z) B(a, b)/(x^a (1 − x)^b)
        const lnB = jStat.gammaln(a) + jStat.gammaln(b) - jStat.gammaln(a + b);
        this.dh[k] = Math.exp(logPhi + lnB - a * lx - b * ly);
      } else {
        const a = law.shape;
        const p = z <= 0 ? upperTail(-z) : 1 - upperTail(z);
        const x = jStat.gammapinv(p, a);
        const lx = Math.log(Math.max(x, TINY));
        this.h[k] = lx;
        // dh/dz = φ(z)/(x f(x)) = φ(z) Γ(a)/(x^a e^(−x))
        this.dh[k] = Math.exp(logPhi + jStat.gammaln(a) - a * lx + x);
      }
    }
    // Where a derivative over- or underflowed, use the neighbours' slope.
    for (let k = 0; k < TABLE_POINTS; k++) {
      if (!Number.isFinite(this.dh[k]!) || !Number.isFinite(this.h[k]!)) {
        const lo = Math.max(0, k - 1);
        const hi = Math.min(TABLE_POINTS - 1, k + 1);
        this.dh[k] = (this.h[hi]! - this.h[lo]!) / ((hi - lo) * TABLE_STEP);
      }
    }
  }

  /** The rate whose normal score is z. */
  at(z: number): number {
    let u = (z - TABLE_MIN) / TABLE_STEP;
    if (!(u > 0)) u = 0;
    if (u > TABLE_POINTS - 1) u = TABLE_POINTS - 1;
    let k = Math.floor(u);
    if (k === TABLE_POINTS - 1) k -= 1;
    const t = u - k;
    const t2 = t * t;
    const t3 = t2 * t;
    const h0 = this.h[k]!;
    const h1 = this.h[k + 1]!;
    const d0 = this.dh[k]! * TABLE_STEP;
    const d1 = this.dh[k + 1]! * TABLE_STEP;
    const v = (2 * t3 - 3 * t2 + 1) * h0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * h1 + (t3 - t2) * d1;
    if (this.logit) return 1 / (1 + Math.exp(-v));
    return this.scale * Math.exp(v);
  }
}

/** x = F⁻¹(Φ(z)) computed directly (slow; the reference for the table). */
export function quantileOfNormalScore(law: RateLaw, z: number): number {
  switch (law.kind) {
    case "constant":
      return law.value;
    case "lognormal":
      return Math.exp(law.mu + law.sigma * z);
    case "beta":
      return z <= 0 ? jStat.ibetainv(upperTail(-z), law.alpha, law.beta) : 1 - jStat.ibetainv(upperTail(z), law.beta, law.alpha);
    case "gamma":
      return law.scale * jStat.gammapinv(z <= 0 ? upperTail(-z) : 1 - upperTail(z), law.shape);
  }
}

/** Maps a normal score to a rate for any law (table for beta and gamma, closed form otherwise). */
export function normalScoreMap(law: RateLaw): (z: number) => number {
  switch (law.kind) {
    case "constant": {
      const v = law.value;
      return () => v;
    }
    case "lognormal": {
      const { mu, sigma } = law;
      return (z) => Math.exp(mu + sigma * z);
    }
    default: {
      const table = new NormalScoreQuantile(law);
      return (z) => table.at(z);
    }
  }
}
