// Seeded random numbers for Stagewright's Monte Carlo work.
//
// Generator: xoshiro128** (Blackman & Vigna 2018, "Scrambled linear
// pseudorandom number generators"), 128 bits of state, period 2^128 − 1,
// 32-bit outputs from 32-bit integer arithmetic (Math.imul), which V8 runs
// without allocating. The state lives in a Uint32Array so that updates never
// box numbers.
//
// Streams. A stream is fully determined by (seed, stream): the first 64 state
// bits are SplitMix64's output function applied to the seed, the other 64 to
// the stream number (each a bijection on 64-bit words), so distinct
// (seed, stream) pairs start from distinct states; 16 outputs are then
// discarded to mix the two halves. Distinct starting points of one 2^128-long
// cycle overlap within a run only with negligible probability. Chunks of a
// Run use stream = chunk index (see stochastic.ts).
//
// Distributions (all exact samplers, up to floating-point rounding):
// - uniform: 53 random bits, [0, 1); uniformOpen: (0, 1).
// - normal: Marsaglia's polar method (Marsaglia & Bray 1964), the second
//   variate of each pair kept for the next call.
// - gamma: Marsaglia & Tsang 2000 (ACM TOMS 26:363) for shape ≥ 1; for
//   shape < 1, Gamma(shape + 1)·U^(1/shape).
// - beta: X/(X + Y) with X ~ Gamma(a), Y ~ Gamma(b).
// - lognormal: exp(μ + σZ) (μ, σ of the logarithm).
// - binomial: inversion by sequential search when n·min(p, 1−p) < 10
//   (expected cost O(np)); otherwise Hörmann's transformed rejection with
//   squeeze, "BTRS" (Hörmann 1993, J. Statist. Comput. Simul. 46:101), whose
//   expected number of uniform pairs per variate is bounded (about 1.15 for
//   np ≥ 10); the acceptance test uses Stirling's series for log k!.
// - Poisson: inversion by sequential search for mean < 10; otherwise
//   Hörmann's "PTRS" transformed rejection (Hörmann 1993, Insurance Math.
//   Econom. 12:39), bounded expected cost.

const TWO_POW_M32 = 2 ** -32;
const TWO_POW_M53 = 2 ** -53;
const TWO_POW_26 = 2 ** 26;
const MASK64 = (1n << 64n) - 1n;
const LOG_SQRT_2PI = 0.5 * Math.log(2 * Math.PI);

/** Largest seed or stream number accepted (Number.MAX_SAFE_INTEGER). */
export const MAX_SEED = Number.MAX_SAFE_INTEGER;

/** SplitMix64's output function (a bijection on 64-bit words). */
function mix64(x: bigint): bigint {
  let z = (x + 0x9e3779b97f4a7c15n) & MASK64;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

function checkInteger(value: number, what: string): void {
  if (!Number.isSafeInteger(value) || value < 0) {
    throw new RangeError(`The ${what} must be a whole number from 0 to ${MAX_SEED}; got ${value}.`);
  }
}

/** A seeded generator: one independent stream per (seed, stream). */
export class Random {
  private readonly s = new Uint32Array(4);
  /** The second normal variate of the last polar pair, NaN when none is kept. */
  private readonly spare = new Float64Array([NaN]);

  constructor(seed: number, stream = 0) {
    checkInteger(seed, "seed");
    checkInteger(stream, "stream number");
    const a = mix64(BigInt(seed));
    const b = mix64(BigInt(stream) ^ 0x5851f42d4c957f2dn);
    this.s[0] = Number(a & 0xffffffffn);
    this.s[1] = Number(a >> 32n);
    this.s[2] = Number(b & 0xffffffffn);
    this.s[3] = Number(b >> 32n);
    if ((this.s[0]! | this.s[1]! | this.s[2]! | this.s[3]!) === 0) this.s[0] = 1;
    for (let k = 0; k < 16; k++) this.nextUint32();
  }

  /** Next 32 random bits as an unsigned integer in [0, 2^32). */
  nextUint32(): number {
    const s = this.s;
    const s0 = s[0]!;
    const s1 = s[1]!;
    const s2 = s[2]!;
    const s3 = s[3]!;
    const m = Math.imul(s1, 5);
    const result = Math.imul((m << 7) | (m >>> 25), 9) >>> 0;
    const t = s1 << 9;
    const n2 = s2 ^ s0;
    const n3 = s3 ^ s1;
    s[1] = s1 ^ n2;
    s[0] = s0 ^ n3;
    s[2] = n2 ^ t;
    s[3] = (n3 << 11) | (n3 >>> 21);
    return result;
  }

  /** Uniform on [0, 1) with 32 bits of resolution (cheapest; for choices among a few options). */
  uniform32(): number {
    return this.nextUint32() * TWO_POW_M32;
  }

  /** Uniform on [0, 1) with 53 bits of resolution. */
  uniform(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * TWO_POW_26 + lo) * TWO_POW_M53;
  }

  /** Uniform on the open interval (0, 1). */
  uniformOpen(): number {
    const hi = this.nextUint32() >>> 5;
    const lo = this.nextUint32() >>> 6;
    return (hi * TWO_POW_26 + lo + 0.5) * TWO_POW_M53;
  }

  /** Standard normal variate (mean 0, SD 1). */
  normal(): number {
    const kept = this.spare[0]!;
    if (kept === kept) {
      this.spare[0] = NaN;
      return kept;
    }
    let x: number;
    let y: number;
    let r: number;
    do {
      x = 2 * this.uniform() - 1;
      y = 2 * this.uniform() - 1;
      r = x * x + y * y;
    } while (r >= 1 || r === 0);
    const f = Math.sqrt((-2 * Math.log(r)) / r);
    this.spare[0] = y * f;
    return x * f;
  }

  /** Gamma variate with the given shape (> 0) and scale 1 (mean = variance = shape). */
  gamma(shape: number): number {
    if (!(shape > 0) || !Number.isFinite(shape)) throw new RangeError(`A gamma shape must be a finite number > 0; got ${shape}.`);
    if (shape < 1) {
      // Gamma(a) = Gamma(a + 1)·U^(1/a) (Marsaglia & Tsang 2000, §6).
      return this.gammaAtLeastOne(shape + 1) * Math.pow(this.uniformOpen(), 1 / shape);
    }
    return this.gammaAtLeastOne(shape);
  }

  private gammaAtLeastOne(shape: number): number {
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number;
      let v: number;
      do {
        x = this.normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = this.uniformOpen();
      const x2 = x * x;
      if (u < 1 - 0.0331 * x2 * x2) return d * v;
      if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v;
    }
  }

  /** Beta(a, b) variate on [0, 1] (a, b > 0). */
  beta(a: number, b: number): number {
    const x = this.gamma(a);
    const y = this.gamma(b);
    const s = x + y;
    // Both gammas can underflow to 0 for tiny shapes; the limit law then puts
    // mass a/(a+b) on 1 and the rest on 0.
    if (s === 0) return this.uniform() < a / (a + b) ? 1 : 0;
    return x / s;
  }

  /** Lognormal variate exp(μ + σZ); μ and σ are the mean and SD of the logarithm. */
  lognormal(mu: number, sigma: number): number {
    return Math.exp(mu + sigma * this.normal());
  }

  /** Binomial(n, p) variate: the number of successes in n trials of probability p. */
  binomial(n: number, p: number): number {
    if (!(n >= 0) || !Number.isSafeInteger(n)) throw new RangeError(`A binomial count must be a whole number ≥ 0; got ${n}.`);
    if (!(p >= 0 && p <= 1)) throw new RangeError(`A binomial probability must lie in [0, 1]; got ${p}.`);
    if (n === 0 || p === 0) return 0;
    if (p === 1) return n;
    if (p > 0.5) return n - this.binomialLow(n, 1 - p);
    return this.binomialLow(n, p);
  }

  /** Binomial for p ≤ 0.5. */
  private binomialLow(n: number, p: number): number {
    if (n * p < 10) return this.binomialInversion(n, p);
    return this.binomialBtrs(n, p);
  }

  private binomialInversion(n: number, p: number): number {
    const q = 1 - p;
    const s = p / q;
    const a = (n + 1) * s;
    const f0 = Math.pow(q, n);
    for (;;) {
      let u = this.uniform();
      let f = f0;
      let x = 0;
      while (u > f) {
        u -= f;
        x += 1;
        if (x > n) break; // rounding left u above the total mass: draw again
        f *= a / x - s;
      }
      if (x <= n) return x;
    }
  }

  private binomialBtrs(n: number, p: number): number {
    const spq = Math.sqrt(n * p * (1 - p));
    const b = 1.15 + 2.53 * spq;
    const a = -0.0873 + 0.0248 * b + 0.01 * p;
    const c = n * p + 0.5;
    const vr = 0.92 - 4.2 / b;
    const r = p / (1 - p);
    const alpha = (2.83 + 5.1 / b) * spq;
    const m = Math.floor((n + 1) * p);
    const logHead = (m + 0.5) * Math.log((m + 1) / (r * (n - m + 1))) + stirlingTail(m) + stirlingTail(n - m);
    for (;;) {
      const u = this.uniform() - 0.5;
      let v = this.uniform();
      const us = 0.5 - Math.abs(u);
      const k = Math.floor(((2 * a) / us + b) * u + c);
      if (us >= 0.07 && v <= vr) return k;
      if (k < 0 || k > n) continue;
      v = Math.log((v * alpha) / (a / (us * us) + b));
      const bound =
        logHead +
        (n + 1) * Math.log((n - m + 1) / (n - k + 1)) +
        (k + 0.5) * Math.log(((n - k + 1) * r) / (k + 1)) -
        stirlingTail(k) -
        stirlingTail(n - k);
      if (v <= bound) return k;
    }
  }

  /** Poisson variate with the given mean (≥ 0). */
  poisson(mean: number): number {
    if (!(mean >= 0) || !Number.isFinite(mean)) throw new RangeError(`A Poisson mean must be a finite number ≥ 0; got ${mean}.`);
    if (mean === 0) return 0;
    if (mean < 10) return this.poissonInversion(mean);
    return this.poissonPtrs(mean);
  }

  private poissonInversion(mean: number): number {
    const f0 = Math.exp(-mean);
    for (;;) {
      let u = this.uniform();
      let f = f0;
      let k = 0;
      while (u > f) {
        u -= f;
        k += 1;
        f *= mean / k;
        if (f === 0) break; // rounding left u above the total mass: draw again
      }
      if (u <= f) return k;
    }
  }

  private poissonPtrs(mean: number): number {
    const logMean = Math.log(mean);
    const b = 0.931 + 2.53 * Math.sqrt(mean);
    const a = -0.059 + 0.02483 * b;
    const invAlpha = 1.1239 + 1.1328 / (b - 3.4);
    const vr = 0.9277 - 3.6224 / (b - 2);
    for (;;) {
      const u = this.uniform() - 0.5;
      const v = this.uniform();
      const us = 0.5 - Math.abs(u);
      const k = Math.floor(((2 * a) / us + b) * u + mean + 0.43);
      if (us >= 0.07 && v <= vr) return k;
      if (k < 0 || (us < 0.013 && v > us)) continue;
      const lhs = Math.log((v * invAlpha) / (a / (us * us) + b));
      if (lhs <= -mean + k * logMean - logFactorial(k)) return k;
    }
  }
}

/** A generator for one stream of one seed (see Random). */
export function createRandom(seed: number, stream = 0): Random {
  return new Random(seed, stream);
}

// log k! exactly (by summation) for small k; Stirling's series beyond.
const LOG_FACTORIAL_TABLE_SIZE = 1024;
const LOG_FACTORIAL = (() => {
  const t = new Float64Array(LOG_FACTORIAL_TABLE_SIZE);
  for (let k = 1; k < LOG_FACTORIAL_TABLE_SIZE; k++) t[k] = t[k - 1]! + Math.log(k);
  return t;
})();

/**
 * fc(k) = log k! − [(k + ½) log(k + 1) − (k + 1) + ½ log 2π], the remainder
 * of Stirling's formula written at k + 1: exact from the table for k < 10,
 * the series 1/12 − 1/360 x⁻² + 1/1260 x⁻⁴ over x = k + 1 beyond (error below
 * 1e-10 there).
 */
function stirlingTail(k: number): number {
  if (k < 10) return LOG_FACTORIAL[k]! - ((k + 0.5) * Math.log(k + 1) - (k + 1) + LOG_SQRT_2PI);
  const x = k + 1;
  const x2 = x * x;
  return (1 / 12 - (1 / 360 - 1 / (1260 * x2)) / x2) / x;
}

/** log k! for a whole number k ≥ 0. */
export function logFactorial(k: number): number {
  if (k < LOG_FACTORIAL_TABLE_SIZE) return LOG_FACTORIAL[k]!;
  return (k + 0.5) * Math.log(k + 1) - (k + 1) + LOG_SQRT_2PI + stirlingTail(k);
}
