import { describe, expect, it } from "vitest";
import { createRandom, logFactorial, Random } from "../../shared/demography";

// Monte Carlo checks: a fixed seed per test, and tolerances of Z standard
// errors of the estimate (two-sided p ≈ 6e-5 each), never exact digits.
const Z = 4;
const SEED = 20_240_601;

function moments(draw: () => number, N: number): { mean: number; variance: number; m4: number } {
  let mean = 0;
  let m2 = 0;
  const xs = new Float64Array(N);
  for (let i = 0; i < N; i++) {
    const x = draw();
    xs[i] = x;
    const d = x - mean;
    mean += d / (i + 1);
    m2 += d * (x - mean);
  }
  let m4 = 0;
  for (let i = 0; i < N; i++) m4 += (xs[i]! - mean) ** 4;
  return { mean, variance: m2 / (N - 1), m4: m4 / N };
}

/** Sample mean within Z standard errors of μ, sample variance within Z (estimated) standard errors of σ². */
function expectMoments(draw: () => number, mu: number, sigma2: number, N = 100_000): void {
  const m = moments(draw, N);
  expect(Math.abs(m.mean - mu)).toBeLessThanOrEqual(Z * Math.sqrt(sigma2 / N));
  const seVariance = Math.sqrt(Math.max(m.m4 - m.variance ** 2, 0) / N);
  expect(Math.abs(m.variance - sigma2)).toBeLessThanOrEqual(Z * seVariance);
}

/** Upper 1e-4 point of χ² with df degrees of freedom (Wilson–Hilferty; z = 3.719). */
function chiSquareCritical(df: number): number {
  const a = 2 / (9 * df);
  return df * (1 - a + 3.719 * Math.sqrt(a)) ** 3;
}

/** Pearson χ² of `N` draws against a pmf, pooling cells with expected count < 20. */
function chiSquare(draw: () => number, pmf: (k: number) => number, support: number, N: number): { statistic: number; df: number } {
  const counts = new Map<number, number>();
  for (let i = 0; i < N; i++) {
    const k = draw();
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  let statistic = 0;
  let cells = 0;
  let restObserved = N;
  let restExpected = N;
  for (let k = 0; k <= support; k++) {
    const e = pmf(k) * N;
    if (e < 20) continue;
    const o = counts.get(k) ?? 0;
    statistic += (o - e) ** 2 / e;
    cells++;
    restObserved -= o;
    restExpected -= e;
  }
  if (restExpected >= 5) {
    statistic += (restObserved - restExpected) ** 2 / restExpected;
    cells++;
  }
  return { statistic, df: cells - 1 };
}

const binomialPmf = (n: number, p: number) => (k: number) =>
  k > n ? 0 : Math.exp(logFactorial(n) - logFactorial(k) - logFactorial(n - k) + k * Math.log(p) + (n - k) * Math.log1p(-p));
const poissonPmf = (m: number) => (k: number) => Math.exp(-m + k * Math.log(m) - logFactorial(k));

describe("seeded streams", () => {
  it("repeats the same sequence for the same (seed, stream)", () => {
    const a = createRandom(SEED, 3);
    const b = createRandom(SEED, 3);
    const xs = Array.from({ length: 50 }, () => a.nextUint32());
    expect(Array.from({ length: 50 }, () => b.nextUint32())).toEqual(xs);
  });

  it("gives different streams for different chunks and seeds", () => {
    const first = (seed: number, stream: number) => {
      const r = createRandom(seed, stream);
      return Array.from({ length: 4 }, () => r.nextUint32()).join(",");
    };
    const seen = new Set<string>();
    for (let seed = 0; seed < 20; seed++) for (let stream = 0; stream < 20; stream++) seen.add(first(seed, stream));
    expect(seen.size).toBe(400);
  });

  it("refuses seeds that are not whole numbers from 0 to 2^53 − 1", () => {
    expect(() => new Random(-1)).toThrow(/seed must be a whole number/);
    expect(() => new Random(1.5)).toThrow(/seed must be a whole number/);
    expect(() => new Random(2 ** 53)).toThrow(/seed must be a whole number/);
    expect(() => new Random(1, -2)).toThrow(/stream number/);
  });

  it("draws 32-bit integers with uniform bits", () => {
    // Each of the 32 bits is set with probability ½.
    const r = createRandom(SEED, 1);
    const N = 50_000;
    const ones = new Array<number>(32).fill(0);
    let outside = 0;
    for (let i = 0; i < N; i++) {
      const x = r.nextUint32();
      if (!(Number.isInteger(x) && x >= 0 && x < 2 ** 32)) outside++;
      for (let b = 0; b < 32; b++) if ((x >>> b) & 1) ones[b]! += 1;
    }
    expect(outside).toBe(0);
    for (const c of ones) expect(Math.abs(c / N - 0.5)).toBeLessThanOrEqual(Z * Math.sqrt(0.25 / N));
  });
});

describe("continuous distributions", () => {
  it("uniform on [0, 1): mean ½, variance 1/12; open variant never 0", () => {
    const r = createRandom(SEED, 10);
    expectMoments(() => r.uniform(), 0.5, 1 / 12);
    let outside = 0;
    for (let i = 0; i < 10_000; i++) {
      const u = r.uniformOpen();
      if (!(u > 0 && u < 1)) outside++;
    }
    expect(outside).toBe(0);
  });

  it("standard normal: mean 0, variance 1, and P(Z ≤ 1) = Φ(1) = 0.841345 [derived]", () => {
    const r = createRandom(SEED, 11);
    expectMoments(() => r.normal(), 0, 1);
    const N = 100_000;
    let below = 0;
    for (let i = 0; i < N; i++) if (r.normal() <= 1) below++;
    const p = 0.8413447460685429;
    expect(Math.abs(below / N - p)).toBeLessThanOrEqual(Z * Math.sqrt((p * (1 - p)) / N));
  });

  it.each([0.3, 1, 2.5, 40])("gamma(shape %s): mean = variance = shape", (shape) => {
    const r = createRandom(SEED, 12);
    expectMoments(() => r.gamma(shape), shape, shape);
  });

  it.each([
    [0.5, 0.5],
    [2, 5],
    [30, 3],
  ])("beta(%s, %s): mean a/(a+b), variance ab/((a+b)²(a+b+1))", (a, b) => {
    const r = createRandom(SEED, 13);
    const s = a + b;
    expectMoments(() => r.beta(a, b), a / s, (a * b) / (s * s * (s + 1)));
  });

  it("lognormal(μ, σ): mean e^(μ+σ²/2), variance (e^(σ²) − 1)e^(2μ+σ²)", () => {
    const r = createRandom(SEED, 14);
    const mu = 0.4;
    const sigma = 0.3;
    expectMoments(() => r.lognormal(mu, sigma), Math.exp(mu + sigma ** 2 / 2), (Math.exp(sigma ** 2) - 1) * Math.exp(2 * mu + sigma ** 2));
  });

  it("refuses impossible parameters", () => {
    const r = createRandom(SEED);
    expect(() => r.gamma(0)).toThrow(/gamma shape/);
    expect(() => r.binomial(3.5, 0.2)).toThrow(/binomial count/);
    expect(() => r.binomial(3, 1.2)).toThrow(/binomial probability/);
    expect(() => r.poisson(-1)).toThrow(/Poisson mean/);
  });
});

describe("binomial", () => {
  it.each([
    [7, 0.2],
    [40, 0.4],
    [1000, 0.3],
    [30, 0.9],
    [200_000, 0.02],
  ])("Binomial(%s, %s) matches the pmf (χ², p = 1e-4) and its mean and variance", (n, p) => {
    // n·min(p, 1−p) < 10 uses inversion, ≥ 10 the transformed rejection (BTRS).
    const r = createRandom(SEED, 20);
    const { statistic, df } = chiSquare(() => r.binomial(n, p), binomialPmf(n, p), n, 100_000);
    expect(statistic).toBeLessThan(chiSquareCritical(df));
    expectMoments(() => r.binomial(n, p), n * p, n * p * (1 - p), 50_000);
  });

  it("handles the edges exactly", () => {
    const r = createRandom(SEED);
    expect(r.binomial(0, 0.5)).toBe(0);
    expect(r.binomial(12, 0)).toBe(0);
    expect(r.binomial(12, 1)).toBe(12);
  });
});

describe("Poisson", () => {
  it.each([0.05, 3.5, 12, 250, 10_000])("Poisson(%s) matches the pmf (χ², p = 1e-4) and its mean and variance", (m) => {
    // mean < 10 uses inversion, ≥ 10 the transformed rejection (PTRS).
    const r = createRandom(SEED, 30);
    const { statistic, df } = chiSquare(() => r.poisson(m), poissonPmf(m), Math.ceil(m + 20 * Math.sqrt(m) + 20), 100_000);
    if (df > 0) expect(statistic).toBeLessThan(chiSquareCritical(df));
    expectMoments(() => r.poisson(m), m, m, 50_000);
  });

  it("log k! agrees with the sum of logarithms below the table and with Stirling's series above it", () => {
    expect(logFactorial(0)).toBe(0);
    expect(logFactorial(5)).toBeCloseTo(Math.log(120), 12);
    let s = 0;
    for (let k = 1; k <= 3000; k++) s += Math.log(k);
    expect(Math.abs(logFactorial(3000) - s) / s).toBeLessThan(1e-12);
  });
});
