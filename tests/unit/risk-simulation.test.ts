import { describe, expect, it } from "vitest";
import {
  analyzeMatrix,
  growthRateApproximation,
  mergeChunks,
  simulateChunk,
  SimulationError,
  wilsonInterval,
  type ChunkResult,
  type SimulationSettings,
  type SimulationTuning,
  type StochasticModel,
  type StochasticResult,
} from "../../shared/demography";

// Monte Carlo checks use a fixed seed and tolerances of Z standard errors
// (two-sided p ≈ 6e-5 per check), never exact digits.
const Z = 4;
const SEED = 20_240_601;

// ---- small factories ---------------------------------------------------------

function settings(overrides: Partial<SimulationSettings> & Pick<SimulationSettings, "initial">): SimulationSettings {
  return { horizon: 50, replicates: 100, demographic: false, threshold: { value: 1 }, ...overrides };
}

/** Equal chunks of consecutive replicates, as a plan would give. */
function plan(replicates: number, chunks: number): { chunkIndex: number; firstReplicate: number; replicateCount: number }[] {
  const out = [];
  let first = 0;
  for (let k = 0; k < chunks; k++) {
    const count = Math.floor(replicates / chunks) + (k < replicates % chunks ? 1 : 0);
    out.push({ chunkIndex: k, firstReplicate: first, replicateCount: count });
    first += count;
  }
  return out;
}

function run(model: StochasticModel, s: SimulationSettings, chunks = 1, seed = SEED, tuning: SimulationTuning = {}): StochasticResult {
  const partials = plan(s.replicates, chunks).map((c) => simulateChunk(model, s, { seed, ...c }, tuning));
  return mergeChunks(s, partials);
}

function matVec(A: number[][], x: number[]): number[] {
  return A.map((row) => row.reduce((s, a, j) => s + a * x[j]!, 0));
}
const sum = (x: number[]) => x.reduce((s, v) => s + v, 0);

// A declining 3-stage life cycle (invented for the tests).
const DECLINING = [
  [0, 0.5, 1.0],
  [0.3, 0.4, 0],
  [0, 0.3, 0.7],
];

// ---- deterministic case ------------------------------------------------------

// Matrix sets are applied year by year (maxBlockYears 1) or as tabulated
// products of blocks of years (the default): both must give the projection.
describe.each([
  ["year by year", 1],
  ["in blocks of years", 4],
])("one matrix, no demographic noise, %s", (_label, maxBlockYears) => {
  const initial = [40, 20, 10];
  const s = settings({ initial, horizon: 40, replicates: 30, threshold: { value: 15 }, burnIn: 10 });
  const result = run({ kind: "independent", matrices: [{ A: DECLINING }], weights: [1] }, s, 3, SEED, { maxBlockYears });

  // The projection by repeated A·n.
  const totals = [sum(initial)];
  let n = initial;
  for (let t = 1; t <= 40; t++) {
    n = matVec(DECLINING, n);
    totals.push(sum(n));
  }
  const crossing = totals.findIndex((N) => N <= 15);

  it("makes every replicate equal the projection A·A·…·n₀", () => {
    totals.forEach((N, t) => {
      expect(Math.abs(result.abundance.mean[t]! - N) / N).toBeLessThan(1e-12);
      expect(result.abundance.sd[t]!).toBeLessThan(1e-9 * N);
    });
    const final = totals[40]!;
    expect(Math.abs(result.finalAbundance.min - final) / final).toBeLessThan(1e-12);
    expect(result.finalAbundance.max).toBe(result.finalAbundance.min);
    for (const q of result.finalAbundance.quantiles) expect(q.value).toBe(result.finalAbundance.min);
  });

  it("goes quasi-extinct in the year the projection first falls to the threshold, in every replicate", () => {
    expect(crossing).toBeGreaterThan(0);
    result.quasiExtinction.byYear.probability.forEach((p, t) => expect(p).toBe(t < crossing ? 0 : 1));
    expect(result.quasiExtinction.medianTime).toBe(crossing);
    expect(result.quasiExtinction.share).toBe(1);
    expect(result.quasiExtinction.meanTimeAmongExtinct).toBe(crossing);
  });

  it("gives log λs = (1/(T−B)) log(N_T/N_B) with a zero-width interval, and τ² = 0", () => {
    const expected = Math.log(totals[40]! / totals[10]!) / 30;
    const sim = result.growthRate.simulated!;
    expect(Math.abs(sim.logLambdaS - expected)).toBeLessThan(1e-12);
    expect(sim.upper - sim.lower).toBeLessThan(1e-12);
    const approx = result.growthRate.approximation!;
    expect(approx.tau2).toBe(0);
    expect(approx.logLambdaS).toBeCloseTo(Math.log(analyzeMatrix({ A: DECLINING }).lambda), 12);
  });

  it("checks a threshold on chosen stages in every year, inside blocks too", () => {
    const staged = run({ kind: "independent", matrices: [{ A: DECLINING }], weights: [1] }, { ...s, threshold: { value: 6, stages: [2] } }, 1, SEED, { maxBlockYears });
    let x = initial;
    let year = -1;
    for (let t = 1; t <= 40 && year < 0; t++) {
      x = matVec(DECLINING, x);
      if (x[2]! <= 6) year = t;
    }
    expect(year).toBeGreaterThan(0);
    expect(year).not.toBe(crossing);
    expect(staged.quasiExtinction.medianTime).toBe(year);
    expect(staged.quasiExtinction.byYear.probability[year - 1]).toBe(0);
  });

  it("treats a Markov chain that never leaves its first state the same way", () => {
    const other = [
      [0, 2, 3],
      [0.5, 0.5, 0],
      [0, 0.5, 0.9],
    ];
    const markov = run({ kind: "markov", matrices: [{ A: DECLINING }, { A: other }], transition: [[1, 0], [0, 1]], initial: [1, 0] }, s, 2, SEED, { maxBlockYears });
    expect(markov.abundance.mean.map((m, t) => Math.abs(m - totals[t]!) / totals[t]!).every((e) => e < 1e-12)).toBe(true);
  });

  it("holds a growing population at the ceiling while log λs follows the unceiled matrix", () => {
    const growing = [
      [0, 1.5, 3],
      [0.5, 0.5, 0],
      [0, 0.4, 0.8],
    ];
    const ceiled = run({ kind: "independent", matrices: [{ A: growing }], weights: [1] }, settings({ initial, horizon: 60, replicates: 4, ceiling: 500, burnIn: 20 }));
    expect(ceiled.finalAbundance.max).toBeLessThanOrEqual(500 * (1 + 1e-12));
    expect(ceiled.finalAbundance.min).toBeCloseTo(500, 9);
    let x = initial;
    const free = [sum(x)];
    for (let t = 1; t <= 60; t++) {
      x = matVec(growing, x);
      free.push(sum(x));
    }
    expect(ceiled.growthRate.simulated!.logLambdaS).toBeCloseTo(Math.log(free[60]! / free[20]!) / 40, 12);
  });
});

// ---- stochastic growth rate --------------------------------------------------

describe("stochastic growth rate", () => {
  // Small noise: three matrices around a mean, drawn with weights 0.3/0.4/0.3.
  const base = [
    [0.1, 0.9, 1.4],
    [0.35, 0.45, 0],
    [0, 0.3, 0.8],
  ];
  const perturb = (d: number) => base.map((row, i) => row.map((a, j) => (a === 0 ? 0 : a * (1 + d * (i === 0 ? 1 : (i + j) % 2 === 0 ? 0.6 : -0.4)))));
  const model: StochasticModel = { kind: "independent", matrices: [{ A: perturb(-0.07) }, { A: perturb(0) }, { A: perturb(0.07) }], weights: [0.3, 0.4, 0.3] };

  it("agrees with Tuljapurkar's small-noise approximation within the interval, and resolves the noise term", () => {
    const result = run(model, settings({ initial: [100, 50, 30], horizon: 150, replicates: 6000 }), 3);
    const sim = result.growthRate.simulated!;
    const approx = result.growthRate.approximation!;
    const se = sim.standardError;
    expect(se).toBeGreaterThan(0);
    // log λs ≈ log λ̄ − τ²/(2λ̄²) (Tuljapurkar 1982): within Z standard errors …
    expect(Math.abs(sim.logLambdaS - approx.logLambdaS)).toBeLessThanOrEqual(Z * se);
    // … and the variance term is large enough that log λ̄ alone would be rejected.
    expect(Math.abs(sim.logLambdaS - approx.logLambdaMean)).toBeGreaterThan(Z * se);
    expect(approx.tau2).toBeGreaterThan(0);
  });

  it("computes τ² as the weighted variance of Σ s_ij a_ij at the mean matrix", () => {
    const mean = base.map((row, i) => row.map((_, j) => model.kind === "independent" ? model.matrices.reduce((s, m, k) => s + model.weights[k]! * m.A[i]![j]!, 0) : 0));
    const a = analyzeMatrix({ A: mean });
    const d = model.kind === "independent" ? model.matrices.map((m) => m.A.reduce((s, row, i) => s + row.reduce((t, x, j) => t + x * a.sensitivity![i]![j]!, 0), 0)) : [];
    const w = [0.3, 0.4, 0.3];
    const dMean = d.reduce((s, x, k) => s + w[k]! * x, 0);
    const tau2 = d.reduce((s, x, k) => s + w[k]! * (x - dMean) ** 2, 0);
    const approx = growthRateApproximation(model).value!;
    expect(approx.lambdaMean).toBeCloseTo(a.lambda, 12);
    expect(approx.tau2).toBeCloseTo(tau2, 14);
    expect(approx.logLambdaS).toBeCloseTo(Math.log(a.lambda) - tau2 / (2 * a.lambda ** 2), 14);
  });

  it("says why there is no approximation for a Markov environment", () => {
    const markov: StochasticModel = { kind: "markov", matrices: [{ A: base }, { A: perturb(0.1) }], transition: [[0.9, 0.1], [0.2, 0.8]], initial: [1, 0] };
    const r = growthRateApproximation(markov);
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/autocorrelated/);
  });

  it("uses a sampler's draws for the approximation, with a standard error for τ²", () => {
    // a_11 of a 1×1 model drawn uniformly on [0.9, 1.1]: λ̄ = 1, τ² = Var = 0.2²/12.
    const sampler: StochasticModel = {
      kind: "sampler",
      stageCount: 1,
      sample: (rng, out) => {
        out.A[0] = 0.9 + 0.2 * rng.uniform();
      },
    };
    const a = growthRateApproximation(sampler, SEED).value!;
    expect(a.samples).toBeGreaterThan(1000);
    expect(Math.abs(a.lambdaMean - 1)).toBeLessThanOrEqual(Z * Math.sqrt(0.04 / 12 / a.samples));
    expect(Math.abs(a.tau2 - 0.04 / 12)).toBeLessThanOrEqual(Z * a.tau2StandardError);
  });
});

// ---- reproducibility ------------------------------------------------------------

describe("chunks and seeds", () => {
  const model: StochasticModel = {
    kind: "independent",
    matrices: [{ A: DECLINING }, { A: DECLINING.map((r) => r.map((a) => a * 1.25)) }],
    weights: [0.5, 0.5],
  };
  const s = settings({ initial: [30, 10, 5], horizon: 30, replicates: 900, threshold: { value: 20 } });
  const chunks = plan(900, 4);

  it("gives the same result for the same seed however the chunks are scheduled", () => {
    const inOrder = chunks.map((c) => simulateChunk(model, s, { seed: SEED, ...c }));
    const reversed = [...chunks].reverse().map((c) => simulateChunk(model, s, { seed: SEED, ...c }));
    reversed.sort((a, b) => a.chunkIndex - b.chunkIndex);
    // A partial travels as JSON between worker and database.
    const throughJson = inOrder.map((c) => JSON.parse(JSON.stringify(c)) as ChunkResult);
    const a = mergeChunks(s, inOrder);
    expect(mergeChunks(s, reversed)).toEqual(a);
    expect(mergeChunks(s, throughJson)).toEqual(a);
    expect(a.quasiExtinction.share).toBeGreaterThan(0);
    expect(a.quasiExtinction.share).toBeLessThan(1);
  });

  it("depends on the seed", () => {
    const a = run(model, s, 4, SEED);
    const b = run(model, s, 4, SEED + 1);
    expect(b.quasiExtinction.byYear.probability).not.toEqual(a.quasiExtinction.byYear.probability);
  });

  it("gives statistically equivalent results for another plan (the plan is part of the input)", () => {
    const a = run(model, s, 4);
    const b = run(model, s, 3);
    expect(b).not.toEqual(a);
    const p = (a.quasiExtinction.share + b.quasiExtinction.share) / 2;
    expect(Math.abs(a.quasiExtinction.share - b.quasiExtinction.share)).toBeLessThanOrEqual(Z * Math.sqrt((2 * p * (1 - p)) / 900));
  });

  it("gives the same futures year by year and in blocks for the same environment sequence", () => {
    // A Markov chain draws one number per year on both paths, so the matrix
    // sequences agree and only rounding differs.
    const markov: StochasticModel = { kind: "markov", matrices: model.matrices, transition: [[0.7, 0.3], [0.4, 0.6]], initial: [0.5, 0.5] };
    const staged = { ...s, threshold: { value: 8, stages: [0, 2] } };
    const a = run(markov, staged, 2, SEED, { maxBlockYears: 1 });
    const b = run(markov, staged, 2, SEED);
    expect(b.quasiExtinction.byYear.probability).toEqual(a.quasiExtinction.byYear.probability);
    b.abundance.mean.forEach((m, t) => expect(Math.abs(m - a.abundance.mean[t]!) / a.abundance.mean[t]!).toBeLessThan(1e-12));
    expect(Math.abs(b.growthRate.simulated!.logLambdaS - a.growthRate.simulated!.logLambdaS)).toBeLessThan(1e-12);
    expect(a.quasiExtinction.share).toBeGreaterThan(0);
  });

  it("gives statistically equivalent results year by year and in blocks for independent years", () => {
    const a = run(model, s, 2, SEED, { maxBlockYears: 1 });
    const b = run(model, s, 2, SEED);
    const p = (a.quasiExtinction.share + b.quasiExtinction.share) / 2;
    expect(Math.abs(a.quasiExtinction.share - b.quasiExtinction.share)).toBeLessThanOrEqual(Z * Math.sqrt((2 * p * (1 - p)) / 900));
    const ga = a.growthRate.simulated!;
    const gb = b.growthRate.simulated!;
    expect(Math.abs(ga.logLambdaS - gb.logLambdaS)).toBeLessThanOrEqual(Z * Math.hypot(ga.standardError, gb.standardError));
  });

  it("refuses chunks out of order, missing or from other settings", () => {
    const parts = chunks.map((c) => simulateChunk(model, s, { seed: SEED, ...c }));
    expect(() => mergeChunks(s, [parts[1]!, parts[0]!, parts[2]!, parts[3]!])).toThrow(/ordered by chunkIndex/);
    expect(() => mergeChunks(s, parts.slice(0, 3))).toThrow(/hold 675 of the 900 replicates/);
    expect(mergeChunks(s, parts.slice(0, 3), { allowIncomplete: true }).complete).toBe(false);
    expect(() => mergeChunks({ ...s, horizon: 31 }, parts)).toThrow(/over 30 years, not 31/);
    const otherSeed = simulateChunk(model, s, { seed: SEED + 1, ...chunks[3]! });
    expect(() => mergeChunks(s, [...parts.slice(0, 3), otherSeed])).toThrow(/chunks of one Run share its seed/);
  });
});

// ---- quasi-extinction with a known answer ------------------------------------------

describe("quasi-extinction of a random walk (exact by dynamic programming)", () => {
  // 1×1 model: N is multiplied by 1.2 or 1/1.2 with probability ½ each, so
  // log N is a symmetric random walk with steps ±log 1.2. With the threshold
  // 3.5 steps below N₀, quasi-extinction is the first visit of the walk to −4.
  const up = 1.2;
  const N0 = 100;
  const threshold = N0 * up ** -3.5;
  const T = 60;
  const R = 20_000;
  const result = run(
    { kind: "independent", matrices: [{ A: [[up]] }, { A: [[1 / up]] }], weights: [0.5, 0.5] },
    settings({ initial: [N0], horizon: T, replicates: R, threshold: { value: threshold } }),
    4,
  );

  // P(first passage to −4 by year t): walk on −3..+T with −4 absorbing.
  const exact: number[] = [0];
  let dist = new Map<number, number>([[0, 1]]);
  let absorbed = 0;
  for (let t = 1; t <= T; t++) {
    const next = new Map<number, number>();
    for (const [k, p] of dist) {
      for (const step of [1, -1]) {
        const j = k + step;
        if (j <= -4) absorbed += p / 2;
        else next.set(j, (next.get(j) ?? 0) + p / 2);
      }
    }
    dist = next;
    exact.push(absorbed);
  }

  it("matches the exact cumulative probability by year", () => {
    for (const t of [4, 6, 10, 20, 40, 60]) {
      const p = exact[t]!;
      expect(Math.abs(result.quasiExtinction.byYear.probability[t]! - p)).toBeLessThanOrEqual(Z * Math.sqrt((p * (1 - p)) / R) + 1e-12);
    }
    expect(result.quasiExtinction.byYear.probability[3]).toBe(0);
  });

  it("gives Wilson bands that cover the exact values in most years", () => {
    // 95 % bands, one per year: with strongly correlated years, most should cover.
    let covered = 0;
    for (let t = 4; t <= T; t++) if (result.quasiExtinction.byYear.lower[t]! <= exact[t]! && exact[t]! <= result.quasiExtinction.byYear.upper[t]!) covered++;
    expect(covered / (T - 3)).toBeGreaterThan(0.6);
  });

  it("puts the median time where the exact probability reaches one half, and says so when it is not reached", () => {
    const se = Math.sqrt(0.25 / R);
    const exactMedian = exact.findIndex((p) => p >= 0.5);
    // Years whose exact probability is within Z standard errors of ½ are all plausible answers.
    const plausible = exact.map((p, t) => (Math.abs(p - 0.5) <= Z * se || t === exactMedian ? t : -1)).filter((t) => t >= 0);
    expect(plausible).toContain(result.quasiExtinction.medianTime);
    const short = run(
      { kind: "independent", matrices: [{ A: [[up]] }, { A: [[1 / up]] }], weights: [0.5, 0.5] },
      settings({ initial: [N0], horizon: 8, replicates: 2000, threshold: { value: threshold } }),
    );
    expect(short.quasiExtinction.medianTime).toBeNull();
    expect(short.quasiExtinction.medianTimeReason).toMatch(/Fewer than half .* within the 8-year horizon/);
    expect(short.nullReasons["quasiExtinction.medianTime"]).toBe(short.quasiExtinction.medianTimeReason);
  });

  it("reports the table at the requested years", () => {
    const s = settings({ initial: [N0], horizon: T, replicates: 100, threshold: { value: threshold }, reportYears: [5, 25, 60] });
    const r = run({ kind: "independent", matrices: [{ A: [[up]] }, { A: [[1 / up]] }], weights: [0.5, 0.5] }, s);
    expect(r.quasiExtinction.table.map((row) => row.year)).toEqual([5, 25, 60]);
    const row = r.quasiExtinction.table[1]!;
    expect(row.probability).toBe(r.quasiExtinction.byYear.probability[25]);
    expect(row).toMatchObject(wilsonInterval(row.count, 100));
  });
});

// ---- demographic stochasticity ----------------------------------------------------

describe("demographic stochasticity", () => {
  it("has the mean of the deterministic projection and the binomial + Poisson variance", () => {
    // One stage: survivors ~ Binomial(N, s), newborns ~ Poisson(f N).
    const s = 0.6;
    const f = 0.5;
    const N0 = 50;
    const R = 20_000;
    const r = run(
      { kind: "independent", matrices: [{ A: [[s + f]], U: [[s]], F: [[f]] }], weights: [1] },
      settings({ initial: [N0], horizon: 6, replicates: R, demographic: true, threshold: { value: 0 } }),
      2,
    );
    // Year 1: mean N₀(s + f), variance N₀ s(1 − s) + N₀ f.
    const variance = N0 * s * (1 - s) + N0 * f;
    expect(Math.abs(r.abundance.mean[1]! - N0 * (s + f))).toBeLessThanOrEqual(Z * Math.sqrt(variance / R));
    // SE of a sample variance of nearly normal data: σ² √(2/R).
    expect(Math.abs(r.abundance.sd[1]! ** 2 - variance)).toBeLessThanOrEqual(Z * variance * Math.sqrt(2 / R));
    // Later years: E N_t = N₀ (s + f)^t (a branching process's mean follows the matrix).
    for (const t of [3, 6]) {
      const expected = N0 * (s + f) ** t;
      expect(Math.abs(r.abundance.mean[t]! - expected)).toBeLessThanOrEqual((Z * r.abundance.sd[t]!) / Math.sqrt(R));
    }
  });

  it("moves individuals between stages with the multinomial fates of U's columns", () => {
    const U = [
      [0.2, 0],
      [0.5, 0.7],
    ];
    const F = [
      [0, 1.1],
      [0, 0],
    ];
    const A = U.map((row, i) => row.map((u, j) => u + F[i]![j]!));
    const R = 10_000;
    const r = run({ kind: "independent", matrices: [{ A, U, F }], weights: [1] }, settings({ initial: [30, 20], horizon: 5, replicates: R, demographic: true, threshold: { value: 0 } }), 2);
    let x = [30, 20];
    for (let t = 1; t <= 5; t++) {
      x = matVec(A, x);
      expect(Math.abs(r.abundance.mean[t]! - sum(x))).toBeLessThanOrEqual((Z * r.abundance.sd[t]!) / Math.sqrt(R));
    }
  });

  it("gives the extinction probability of a subcritical branching process", () => {
    // One individual; each year it survives with probability 0.5 and has
    // Poisson(0.3) young. Extinction by year t is G∘…∘G(0), G(x) = (0.5 + 0.5x)e^(0.3(x−1)).
    const R = 20_000;
    const r = run(
      { kind: "independent", matrices: [{ A: [[0.8]], U: [[0.5]], F: [[0.3]] }], weights: [1] },
      settings({ initial: [1], horizon: 10, replicates: R, demographic: true, threshold: { value: 0 } }),
      2,
    );
    let q = 0;
    for (let t = 1; t <= 10; t++) {
      q = (0.5 + 0.5 * q) * Math.exp(0.3 * (q - 1));
      expect(Math.abs(r.quasiExtinction.byYear.probability[t]! - q)).toBeLessThanOrEqual(Z * Math.sqrt((q * (1 - q)) / R));
    }
    expect(r.finalAbundance.zeroCount).toBe(Math.round(r.quasiExtinction.shareBelowAtHorizon * R));
  });

  it("refuses fates that do not form a distribution, and fractional individuals", () => {
    const bad = { kind: "independent" as const, matrices: [{ A: [[1.3]], U: [[1.1]], F: [[0.2]] }], weights: [1] };
    const s = settings({ initial: [5], demographic: true, threshold: { value: 0 } });
    expect(() => simulateChunk(bad, s, { seed: 1, chunkIndex: 0, firstReplicate: 0, replicateCount: 1 })).toThrow(/sums to 1.10000 > 1/);
    const ok = { kind: "independent" as const, matrices: [{ A: [[1]], U: [[0.5]], F: [[0.5]] }], weights: [1] };
    expect(() => simulateChunk(ok, { ...s, initial: [2.5] }, { seed: 1, chunkIndex: 0, firstReplicate: 0, replicateCount: 1 })).toThrow(/whole individuals/);
  });

  it("stops a sampler whose draw is unusable, with the replicate and year", () => {
    const sampler: StochasticModel = {
      kind: "sampler",
      stageCount: 1,
      sample: (_rng, out) => {
        out.A[0] = NaN;
      },
    };
    expect(() => simulateChunk(sampler, settings({ initial: [5] }), { seed: 1, chunkIndex: 0, firstReplicate: 0, replicateCount: 1 })).toThrow(SimulationError);
  });
});

// ---- extreme ranges -------------------------------------------------------------------

describe("populations far beyond floating-point range", () => {
  it.each([
    ["year by year", 1],
    ["in blocks of years", 4],
  ])("keeps log λs and quasi-extinction exact when N falls to 1e-396 or rises to 1e400 (%s)", (_label, maxBlockYears) => {
    // N_t = 100 · a^t over 1000 years; 0.4^1000 ≈ 1e-398 and 2.5^1000 ≈ 1e398 are outside doubles.
    const T = 1000;
    for (const a of [0.4, 2.5]) {
      const r = run({ kind: "independent", matrices: [{ A: [[a]] }], weights: [1] }, settings({ initial: [100], horizon: T, replicates: 3, threshold: { value: 1 }, burnIn: 100 }), 1, SEED, { maxBlockYears });
      expect(r.growthRate.simulated!.logLambdaS).toBeCloseTo(Math.log(a), 12);
      const crossing = a < 1 ? Math.ceil(Math.log(100) / -Math.log(a)) : -1;
      expect(r.quasiExtinction.medianTime).toBe(a < 1 ? crossing : null);
      expect(r.finalAbundance.zeroCount).toBe(0);
      expect(r.finalAbundance.quantiles[4]!.censored).toBe(a < 1 ? "below" : "above");
      if (a > 1) expect(r.nullReasons["finalAbundance.mean"]).toMatch(/beyond 1.8e308 individuals/);
    }
  });
});

// ---- final abundance ----------------------------------------------------------------

describe("final abundance", () => {
  it("has quantiles within the histogram's resolution of the exact ones", () => {
    // N_T = N₀ · 1.2^(2U − T), U ~ Binomial(T, ½): exact quantiles from the binomial distribution.
    const T = 20;
    const R = 4000;
    const r = run({ kind: "independent", matrices: [{ A: [[1.2]] }, { A: [[1 / 1.2]] }], weights: [0.5, 0.5] }, settings({ initial: [100], horizon: T, replicates: R, threshold: { value: 0 } }));
    const median = r.finalAbundance.quantiles.find((q) => q.p === 0.5)!;
    // The median of U is 10 (P(U ≤ 9) ≈ 0.41, P(U ≤ 10) ≈ 0.59), so N_T's median is N₀ within one bin (2.3 %).
    expect(Math.abs(median.value / 100 - 1)).toBeLessThan(0.024);
    const h = r.finalAbundance.histogram;
    expect(h.counts.reduce((s, c) => s + c, 0)).toBe(R);
    expect(h.edges.length).toBe(h.counts.length + 1);
    expect(h.edges[0]!).toBeLessThanOrEqual(r.finalAbundance.min);
    expect(h.edges[h.edges.length - 1]!).toBeGreaterThan(r.finalAbundance.max);
  });
});
