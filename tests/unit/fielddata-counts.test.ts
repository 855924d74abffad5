import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { createRandom } from "../../shared/demography";
import { analyzeCounts, chiSquareQuantile, quasiExtinctionProbability, studentTTwoSided } from "../../shared/fielddata";

const ln = Math.log;

describe("count regression of Dennis et al. (1991)", () => {
  it("equal intervals: μ̂ is the mean log ratio and σ̂² their sample variance (hand-computed)", () => {
    // N = 100, 120, 90, 108 in consecutive years: log ratios ln 1.2, ln 0.75, ln 1.2.
    const r = [ln(1.2), ln(0.75), ln(1.2)];
    const mean = (r[0]! + r[1]! + r[2]!) / 3;
    const variance = ((r[0]! - mean) ** 2 + (r[1]! - mean) ** 2 + (r[2]! - mean) ** 2) / 2;
    const a = analyzeCounts([
      { t: 2000, n: 100 },
      { t: 2001, n: 120 },
      { t: 2002, n: 90 },
      { t: 2003, n: 108 },
    ]);
    expect(a.q).toBe(3);
    expect(a.mu).toBeCloseTo(mean, 12);
    expect(a.sigma2).toBeCloseTo(variance, 12);
    expect(a.intervals.map((i) => i.ratio)).toEqual([1.2, 0.75, 1.2]);
    // Geometric mean of the yearly ratios = (1.2 · 0.75 · 1.2)^(1/3).
    expect(a.geometricMeanLambda).toBeCloseTo((1.2 * 0.75 * 1.2) ** (1 / 3), 12);
  });

  it("unequal intervals: μ̂ = ln(N_q/N_0)/(t_q − t_0), the identity of the regression through the origin", () => {
    const points = [
      { t: 1990, n: 50 },
      { t: 1991, n: 60 },
      { t: 1994, n: 40 },
      { t: 1996, n: 45 },
      { t: 1997, n: 52 },
    ];
    const a = analyzeCounts(points);
    expect(a.mu).toBeCloseTo(ln(52 / 50) / (1997 - 1990), 13);
    // σ̂²: residual mean square of y_i = ln(N_{i+1}/N_i)/√Δt on x_i = √Δt, q − 1 = 3 df (by hand).
    const iv = [
      [1, 60 / 50],
      [3, 40 / 60],
      [2, 45 / 40],
      [1, 52 / 45],
    ] as const;
    const mu = a.mu!;
    const rss = iv.reduce((s, [dt, ratio]) => s + (ln(ratio) / Math.sqrt(dt) - mu * Math.sqrt(dt)) ** 2, 0);
    expect(a.sigma2).toBeCloseTo(rss / 3, 13);
    expect(a.notes.map((n) => n.code)).toContain("missing-years");
    // CI for μ: μ̂ ± t(0.975, 3) √(σ̂²/Σ Δt).
    const t3 = 3.182446; // t quantile 0.975 with 3 df, standard t table (common practice)
    const half = t3 * Math.sqrt(a.sigma2! / 7);
    expect(a.muCi!.lower).toBeCloseTo(mu - half, 5);
    expect(a.muCi!.upper).toBeCloseTo(mu + half, 5);
    // CI for σ²: 3σ̂²/χ²(0.975, 3), 3σ̂²/χ²(0.025, 3); χ² table values 9.348404 and 0.2157953 (common practice).
    expect(a.sigma2Ci!.lower).toBeCloseTo((3 * a.sigma2!) / 9.348404, 6);
    expect(a.sigma2Ci!.upper).toBeCloseTo((3 * a.sigma2!) / 0.2157953, 5);
  });

  it("t and χ² quantiles agree with jstat's own distribution objects (an independent code path)", () => {
    const j = jStat as unknown as { studentt: { inv(p: number, df: number): number }; chisquare: { inv(p: number, df: number): number } };
    for (const df of [1, 2, 5, 14, 60]) {
      expect(studentTTwoSided(0.05, df)).toBeCloseTo(j.studentt.inv(0.975, df), 6);
      expect(chiSquareQuantile(0.025, df)).toBeCloseTo(j.chisquare.inv(0.025, df), 6);
      expect(chiSquareQuantile(0.975, df)).toBeCloseTo(j.chisquare.inv(0.975, df), 6);
    }
  });

  it("explains a single count, a zero, and one interval instead of failing", () => {
    const single = analyzeCounts([{ t: 2010, n: 30 }], { threshold: 5 });
    expect(single.mu).toBeNull();
    expect(single.notes.map((n) => n.code)).toEqual(["single-count"]);
    expect(single.quasiExtinction).toBeNull();

    const zero = analyzeCounts([
      { t: 1, n: 10 },
      { t: 2, n: 0 },
      { t: 3, n: 4 },
      { t: 4, n: 6 },
      { t: 5, n: 9 },
    ]);
    expect(zero.intervals.map((i) => i.used)).toEqual([false, false, true, true]);
    expect(zero.notes.map((n) => n.code)).toContain("zero-count");
    expect(zero.mu).toBeCloseTo(ln(9 / 4) / 2, 12);

    const one = analyzeCounts([
      { t: 1, n: 10 },
      { t: 2, n: 12 },
    ]);
    expect(one.mu).toBeCloseTo(ln(1.2), 12);
    expect(one.sigma2).toBeNull();
    expect(one.notes.map((n) => n.code)).toContain("one-interval");
  });

  it("probability is 1 when the start is at the threshold, and grows with the horizon", () => {
    expect(quasiExtinctionProbability(0.01, 0.05, 0, 10)).toBe(1);
    const curve = analyzeCounts(
      [100, 80, 95, 70, 85, 60, 72, 66, 58, 61].map((n, k) => ({ t: 2000 + k, n })),
      { threshold: 20, maxHorizon: 40, replicates: 2000, seed: 7 },
    ).quasiExtinction!;
    for (let k = 1; k < curve.probability.length; k++) expect(curve.probability[k]!).toBeGreaterThanOrEqual(curve.probability[k - 1]!);
    for (let k = 0; k < curve.probability.length; k++) {
      expect(curve.lower[k]!).toBeLessThanOrEqual(curve.upper[k]!);
      expect(curve.lower[k]!).toBeGreaterThanOrEqual(0);
      expect(curve.upper[k]!).toBeLessThanOrEqual(1);
    }
    // Seeded: the same seed gives the same band.
    const again = analyzeCounts([100, 80, 95, 70, 85, 60, 72, 66, 58, 61].map((n, k) => ({ t: 2000 + k, n })), { threshold: 20, maxHorizon: 40, replicates: 2000, seed: 7 }).quasiExtinction!;
    expect(again.upper).toEqual(curve.upper);
  });
});

describe("diffusion approximation against a seeded Monte Carlo simulation", () => {
  // log N follows Brownian motion with drift μ and variance σ² per year, simulated on
  // steps of Δt = 0.01 year. Between grid points a crossing is also counted with the
  // Brownian-bridge probability exp(−2(x_k − b)(x_{k+1} − b)/(σ²Δt)), so the simulation
  // watches the path continuously, as the formula does (checking only at grid points
  // undershoots it). Agreement within 4 binomial standard errors.
  const cases = [
    { mu: -0.02, sigma2: 0.04, start: 100, threshold: 20 },
    { mu: 0.01, sigma2: 0.09, start: 60, threshold: 15 },
  ];
  for (const c of cases) {
    it(`μ = ${c.mu}, σ² = ${c.sigma2}, from ${c.start} to ${c.threshold}`, () => {
      const horizons = [5, 10, 20];
      const dt = 0.01;
      const steps = Math.round(20 / dt);
      const R = 20_000;
      const rng = createRandom(20_261_202, c.mu < 0 ? 1 : 2);
      const b = 0;
      const x0 = Math.log(c.start / c.threshold);
      const sd = Math.sqrt(c.sigma2 * dt);
      const hitBy = new Float64Array(horizons.length);
      for (let r = 0; r < R; r++) {
        let x = x0;
        let hitStep = -1;
        for (let k = 1; k <= steps; k++) {
          const next = x + c.mu * dt + sd * rng.normal();
          const exponent = (-2 * (x - b) * (next - b)) / (c.sigma2 * dt);
          if (next <= b || (exponent > -40 && rng.uniform() < Math.exp(exponent))) {
            hitStep = k;
            break;
          }
          x = next;
        }
        if (hitStep < 0) continue;
        horizons.forEach((T, h) => {
          if (hitStep * dt <= T + 1e-9) hitBy[h]! += 1;
        });
      }
      horizons.forEach((T, h) => {
        const p = hitBy[h]! / R;
        const g = quasiExtinctionProbability(c.mu, c.sigma2, x0, T);
        const se = Math.sqrt((g * (1 - g)) / R);
        expect(Math.abs(p - g), `T = ${T}: simulated ${p}, formula ${g}`).toBeLessThan(4 * se + 1e-12);
      });
    }, 120_000);
  }
});
