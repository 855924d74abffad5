import { describe, expect, it } from "vitest";
import {
  analyzeMatrix,
  createRandom,
  growthRateApproximation,
  mergeChunks,
  simulateChunk,
  SimulationError,
  type ChunkResult,
  type SampledMatrices,
  type StochasticModel,
  type StochasticResult,
} from "../../shared/demography";
import { LifeCycleSchema, type LifeCycle, type LifeCycleInput } from "../../shared/lifecycle";
import { buildRiskModel, iucnCriterionE, normalCdf, RiskModelError, yearsPerTimeStep } from "../../shared/risk";
import { RiskSettingsSchema, type RiskSettings, type RiskSettingsInput } from "../../shared/schemas/risk";

// Monte Carlo checks use a fixed seed and tolerances of Z standard errors
// (two-sided p ≈ 6e-5 per check), never exact digits.
const Z = 4;
const SEED = 20_240_601;

// ---- small factories ---------------------------------------------------------

const stage = (id: string, name = id) => ({ id, name, position: { x: 0, y: 0 } });

/** An invented three-stage life cycle: juveniles, subadults, adults. */
function lifeCycle(overrides: Partial<LifeCycleInput> = {}, values: Record<string, number> = {}): LifeCycle {
  const v = { s_j: 0.4, s_s: 0.6, g: 0.5, s_a: 0.8, f: 1.2, ...values };
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Test",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [stage("st_j", "Juvenile"), stage("st_s", "Subadult"), stage("st_a", "Adult")],
    rates: Object.entries(v).map(([name, value]) => ({ id: `vr_${name}`, name, value })),
    transitions: [
      { id: "tr_js", from: "st_j", to: "st_s", kind: "growth", rate: "s_j" },
      { id: "tr_ss", from: "st_s", to: "st_s", kind: "stasis", rate: "s_s * (1 - g)" },
      { id: "tr_sa", from: "st_s", to: "st_a", kind: "growth", rate: "s_s * g" },
      { id: "tr_aa", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_f", from: "st_a", to: "st_j", kind: "reproduction", rate: "f" },
    ],
    ...overrides,
  });
}

function settings(overrides: Partial<RiskSettingsInput> = {}): RiskSettings {
  return RiskSettingsSchema.parse({
    environment: { kind: "matrices", lifeCycleIds: ["lc_good", "lc_bad"], weights: [0.6, 0.4] },
    initial: [20, 10, 10],
    horizon: 30,
    replicates: 200,
    threshold: { value: 5 },
    ...overrides,
  });
}

/** Draw `N` matrices from a sampler model; returns A's entries per draw. */
function draws(model: StochasticModel, N: number): Float64Array[] {
  if (model.kind !== "sampler") throw new Error("not a sampler");
  const n = model.stageCount;
  const out: SampledMatrices = { A: new Float64Array(n * n), U: new Float64Array(n * n), F: new Float64Array(n * n) };
  const rng = createRandom(SEED, 5);
  return Array.from({ length: N }, () => {
    model.sample(rng, out);
    return Float64Array.from(out.A);
  });
}

const meanSd = (xs: number[]) => {
  const m = xs.reduce((s, x) => s + x, 0) / xs.length;
  const v = xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1);
  return { mean: m, sd: Math.sqrt(v) };
};

function ranks(xs: number[]): number[] {
  const order = xs.map((x, i) => [x, i] as const).sort((a, b) => a[0] - b[0]);
  const r = new Array<number>(xs.length);
  order.forEach(([, i], k) => (r[i] = k));
  return r;
}

function pearson(a: number[], b: number[]): number {
  const ma = meanSd(a).mean;
  const mb = meanSd(b).mean;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < a.length; i++) {
    sab += (a[i]! - ma) * (b[i]! - mb);
    saa += (a[i]! - ma) ** 2;
    sbb += (b[i]! - mb) ** 2;
  }
  return sab / Math.sqrt(saa * sbb);
}

// ---- life cycles of a Study as environments -------------------------------------

describe("buildRiskModel with matrices of other life cycles", () => {
  const doc = lifeCycle();
  const docs = { lc_good: lifeCycle({}, { s_a: 0.9, f: 1.5 }), lc_bad: lifeCycle({}, { s_a: 0.6, f: 0.6 }) };

  it("draws the life cycles' matrices with the weights, and takes the generation length from the mean matrices", () => {
    const rm = buildRiskModel(doc, settings(), docs);
    expect(rm.model.kind).toBe("independent");
    if (rm.model.kind !== "independent") return;
    expect(rm.model.weights).toEqual([0.6, 0.4]);
    expect(rm.model.matrices[0]!.A[2]![2]).toBe(0.9);
    expect(rm.model.matrices[1]!.F![0]![2]).toBe(0.6);
    expect(rm.meanMatrices.A[2]![2]).toBeCloseTo(0.6 * 0.9 + 0.4 * 0.6, 15);
    const a = analyzeMatrix(rm.meanMatrices);
    expect(rm.generationLength).toBe(a.lifeHistory!.meanAgeOfParents);
    expect(rm.simulation).toMatchObject({ horizon: 30, replicates: 200, initial: [20, 10, 10], demographic: false, ceiling: null, threshold: { value: 5, stages: null } });
  });

  it("builds a Markov chain starting in the chosen state", () => {
    const rm = buildRiskModel(doc, settings({ environment: { kind: "markov", lifeCycleIds: ["lc_good", "lc_bad"], transition: [[0.8, 0.2], [0.5, 0.5]], initialState: "lc_bad" } }), docs);
    expect(rm.model).toMatchObject({ kind: "markov", initial: [0, 1], transition: [[0.8, 0.2], [0.5, 0.5]] });
    // Stationary distribution (5/7, 2/7) weights the mean matrix.
    expect(rm.meanMatrices.A[2]![2]).toBeCloseTo((5 / 7) * 0.9 + (2 / 7) * 0.6, 12);
  });

  it("refuses a life cycle whose stages differ, naming the stage and the field", () => {
    const swapped = lifeCycle({ stages: [stage("st_j", "Juvenile"), stage("st_a", "Adult"), stage("st_s", "Subadult")] });
    const err = (() => {
      try {
        buildRiskModel(doc, settings(), { ...docs, lc_bad: swapped });
      } catch (e) {
        return e;
      }
      return null;
    })();
    expect(err).toBeInstanceOf(RiskModelError);
    const e = err as RiskModelError;
    expect(e.path).toEqual(["environment", "lifeCycleIds", 1]);
    expect(e.status).toBe(400);
    expect(e.message).toBe(
      'Stage 2 of "Test" (lc_bad) is "Adult" (st_a) but stage 2 of "Test" is "Subadult" (st_s) (it is stage 3 there): the matrices of one Risk run must have the same stages, by id, in the same order. Duplicate the life cycle to make a variant with the same stages.',
    );
    expect(e.fields).toEqual([{ path: "environment.lifeCycleIds.1", message: e.message }]);
    const two = lifeCycle({ stages: [stage("st_j"), stage("st_s")], transitions: [{ id: "tr_js", from: "st_j", to: "st_s", kind: "growth", rate: "s_j" }] });
    expect(() => buildRiskModel(doc, settings(), { ...docs, lc_good: two })).toThrow(/has 2 stages but "Test" has 3/);
    expect(() => buildRiskModel(doc, settings(), { lc_good: docs.lc_good })).toThrow(/The life cycle "lc_bad" was not found in this Study/);
  });

  it("checks the initial vector and threshold stages against the life cycle", () => {
    expect(() => buildRiskModel(doc, settings({ initial: [10, 20] }), docs)).toThrow(/one initial abundance per stage: the life cycle has 3 stages/);
    const unknown = (() => {
      try {
        buildRiskModel(doc, settings({ threshold: { value: 1, stages: ["st_x"] } }), docs);
      } catch (e) {
        return e as RiskModelError;
      }
      return null;
    })();
    expect(unknown?.path).toEqual(["threshold", "stages", 0]);
    expect(() => buildRiskModel(doc, settings({ threshold: { value: 10, stages: ["st_a"] } }), docs)).toThrow(/start with 10 individuals, already at or below the threshold/);
    const rm = buildRiskModel(doc, settings({ threshold: { value: 2, stages: ["st_a", "st_s"] } }), docs);
    expect(rm.simulation.threshold.stages).toEqual([2, 1]);
  });

  it("refuses demographic stochasticity when survival out of a stage exceeds 1", () => {
    const greedy = lifeCycle({}, { s_s: 1.2 });
    expect(() => buildRiskModel(doc, settings({ demographic: true }), { ...docs, lc_bad: greedy })).toThrow(/survival out of "Subadult" sums to 1.200 > 1/);
  });
});

// ---- vital rates drawn each year ------------------------------------------------

describe("buildRiskModel with vital rates drawn each year", () => {
  const doc = lifeCycle();
  const vital = (rates: unknown[], correlations?: unknown[]) => settings({ environment: { kind: "vital-rates", rates, ...(correlations ? { correlations } : {}) } as RiskSettingsInput["environment"] });

  it("draws each rate from its distribution with the given mean and SD, leaving the others at their values", () => {
    const rm = buildRiskModel(
      doc,
      vital([
        { rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.1 },
        { rateId: "vr_f", distribution: "gamma", mean: 1.2, sd: 0.4 },
        { rateId: "vr_s_j", distribution: "lognormal", mean: 0.4, sd: 0.05 },
      ]),
    );
    const N = 20_000;
    const A = draws(rm.model, N);
    const check = (cell: number, mean: number, sd: number) => {
      const xs = A.map((a) => a[cell]!);
      const m = meanSd(xs);
      expect(Math.abs(m.mean - mean)).toBeLessThanOrEqual((Z * sd) / Math.sqrt(N));
      // SE of an SD ≈ SD/√(2N) for near-normal data; these are skewed, so allow twice that.
      expect(Math.abs(m.sd - sd)).toBeLessThanOrEqual((2 * Z * sd) / Math.sqrt(2 * N));
    };
    check(2 * 3 + 2, 0.8, 0.1); // a_33 = s_a
    check(0 * 3 + 2, 1.2, 0.4); // a_13 = f
    check(1 * 3 + 0, 0.4, 0.05); // a_21 = s_j
    expect(new Set(A.map((a) => a[1 * 3 + 1])).size).toBe(1); // s_s (1 − g) is not drawn
    expect(A[0]![1 * 3 + 1]).toBeCloseTo(0.3, 15);
    expect(rm.model.kind === "sampler" && rm.model.cells?.length).toBe(5);
  });

  it("correlates rates through a Gaussian copula: Spearman ρ = (6/π) arcsin(r/2)", () => {
    // Spearman's ρ of a Gaussian copula with correlation r is (6/π) arcsin(r/2) [derived, Kruskal 1958].
    const r = 0.7;
    const rm = buildRiskModel(
      doc,
      vital(
        [
          { rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.1 },
          { rateId: "vr_f", distribution: "gamma", mean: 1.2, sd: 0.4 },
          { rateId: "vr_s_j", distribution: "lognormal", mean: 0.4, sd: 0.05 },
        ],
        [
          { a: "vr_s_a", b: "vr_f", r },
          { a: "vr_f", b: "vr_s_j", r: -0.3 },
        ],
      ),
    );
    const N = 20_000;
    const A = draws(rm.model, N);
    const sa = A.map((a) => a[8]!);
    const f = A.map((a) => a[2]!);
    const sj = A.map((a) => a[3]!);
    const spearman = (x: number[], y: number[]) => pearson(ranks(x), ranks(y));
    // Fisher-transformed Spearman ρ has SE ≈ √(1.06/(N − 3)) (Fieller, Hartley & Pearson 1957).
    const se = Math.sqrt(1.06 / (N - 3));
    const expectRho = (x: number[], y: number[], rho: number) => expect(Math.abs(Math.atanh(spearman(x, y)) - Math.atanh((6 / Math.PI) * Math.asin(rho / 2)))).toBeLessThanOrEqual(Z * se);
    expectRho(sa, f, r);
    expectRho(f, sj, -0.3);
    expectRho(sa, sj, 0);
    // The copula leaves the marginal distributions alone.
    expect(Math.abs(meanSd(sa).mean - 0.8)).toBeLessThanOrEqual((Z * 0.1) / Math.sqrt(N));
    expect(Math.abs(meanSd(f).mean - 1.2)).toBeLessThanOrEqual((Z * 0.4) / Math.sqrt(N));
  });

  it("refuses correlations that are not positive definite, and unknown rates", () => {
    const rates = [
      { rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.1 },
      { rateId: "vr_f", distribution: "gamma", mean: 1.2, sd: 0.4 },
      { rateId: "vr_s_j", distribution: "beta", mean: 0.4, sd: 0.1 },
    ] as const;
    // The schema catches this first; a settings object that skipped it is still refused.
    const bad = {
      ...settings(),
      environment: { kind: "vital-rates" as const, rates: [...rates], correlations: [{ a: "vr_s_a", b: "vr_f", r: 0.9 }, { a: "vr_f", b: "vr_s_j", r: 0.9 }, { a: "vr_s_a", b: "vr_s_j", r: -0.9 }] },
    };
    expect(() => buildRiskModel(doc, bad)).toThrow(RiskModelError);
    expect(() => buildRiskModel(doc, bad)).toThrow(/not positive definite/);
    expect(() => buildRiskModel(doc, vital([{ rateId: "s_a", distribution: "beta", mean: 0.8, sd: 0.1 }]))).toThrow('No vital rate of this life cycle has the id "s_a" ("s_a" is a rate name; use its id "vr_s_a").');
  });

  it("stops a Run whose drawn rates make an arrow negative, saying which values did it", () => {
    const risky = lifeCycle({}, {});
    const rm = buildRiskModel(risky, vital([{ rateId: "vr_g", distribution: "lognormal", mean: 0.8, sd: 0.5 }]));
    expect(() => simulateChunk(rm.model, rm.simulation, { seed: SEED, chunkIndex: 0, firstReplicate: 0, replicateCount: 200 })).toThrow(SimulationError);
    expect(() => simulateChunk(rm.model, rm.simulation, { seed: SEED, chunkIndex: 0, firstReplicate: 0, replicateCount: 200 })).toThrow(/With the drawn vital rates \(g = 1\.\d+\)/);
  });

  it("gives log λs by simulation that agrees with Tuljapurkar's approximation", () => {
    // Small noise on adult survival (beta) and fecundity (gamma), independent years.
    // Both enter A linearly, so Ā = A(means) and τ² = sd(s_a)² s₃₃² + sd(f)² s₁₃² exactly [derived].
    const rm = buildRiskModel(
      doc,
      settings({
        environment: {
          kind: "vital-rates",
          rates: [
            { rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.04 },
            { rateId: "vr_f", distribution: "gamma", mean: 1.2, sd: 0.12 },
          ],
        },
        horizon: 120,
        replicates: 3000,
        threshold: { value: 1 },
      }),
    );
    expect(rm.model.kind === "sampler" && rm.model.meanMatrixExact).toBe(true);
    const a = analyzeMatrix({ A: rm.meanMatrices.A });
    const S = a.sensitivity!;
    const tau2 = 0.04 ** 2 * S[2]![2]! ** 2 + 0.12 ** 2 * S[0]![2]! ** 2;
    const exact = Math.log(a.lambda) - tau2 / (2 * a.lambda ** 2);

    const parts = [0, 1].map((k) => simulateChunk(rm.model, rm.simulation, { seed: SEED, chunkIndex: k, firstReplicate: 1500 * k, replicateCount: 1500 }));
    const result = mergeChunks(rm.simulation, parts);
    const sim = result.growthRate.simulated!;
    const approx = result.growthRate.approximation!;
    // The approximation from sampled matrices matches the exact one within its standard error …
    expect(approx.exactMean).toBe(true);
    expect(approx.lambdaMean).toBeCloseTo(a.lambda, 12);
    expect(Math.abs(approx.tau2 - tau2)).toBeLessThanOrEqual(Z * approx.tau2StandardError);
    // … the simulation matches it within the combined interval …
    expect(Math.abs(sim.logLambdaS - exact)).toBeLessThanOrEqual(Z * sim.standardError);
    expect(Math.abs(sim.logLambdaS - approx.logLambdaS)).toBeLessThanOrEqual(Z * Math.hypot(sim.standardError, approx.standardError));
    // … and resolves the variance term: log λ̄ alone is rejected.
    expect(Math.abs(sim.logLambdaS - Math.log(a.lambda))).toBeGreaterThan(Z * sim.standardError);
  });

  it("knows when the expected matrix is not the matrix at the rates' means", () => {
    // s_s enters squared here, and E[s²] > E[s]²; correlated s_a and f multiplied together likewise.
    const squared = lifeCycle({
      transitions: [
        { id: "tr_js", from: "st_j", to: "st_s", kind: "growth", rate: "s_j" },
        { id: "tr_ss", from: "st_s", to: "st_s", kind: "stasis", rate: "s_s^2" },
        { id: "tr_aa", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
        { id: "tr_sa", from: "st_s", to: "st_a", kind: "growth", rate: "0.3" },
        { id: "tr_f", from: "st_a", to: "st_j", kind: "reproduction", rate: "f * s_a" },
      ],
    });
    const exactOf = (s: RiskSettings) => {
      const m = buildRiskModel(squared, s).model;
      return m.kind === "sampler" ? m.meanMatrixExact : undefined;
    };
    expect(exactOf(vital([{ rateId: "vr_s_s", distribution: "beta", mean: 0.5, sd: 0.1 }]))).toBe(false);
    expect(exactOf(vital([{ rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.1 }, { rateId: "vr_f", distribution: "gamma", mean: 1, sd: 0.2 }]))).toBe(true);
    expect(
      exactOf(vital([{ rateId: "vr_s_a", distribution: "beta", mean: 0.8, sd: 0.1 }, { rateId: "vr_f", distribution: "gamma", mean: 1, sd: 0.2 }], [{ a: "vr_s_a", b: "vr_f", r: 0.5 }])),
    ).toBe(false);
    // Without an exact mean, the approximation's standard error includes the sampling of Ā.
    const m = buildRiskModel(squared, vital([{ rateId: "vr_s_s", distribution: "beta", mean: 0.5, sd: 0.1 }])).model;
    const approx = growthRateApproximation(m, SEED).value!;
    expect(approx.exactMean).toBe(false);
    expect(approx.standardError).toBeGreaterThan(approx.tau2StandardError / (2 * approx.lambdaMean ** 2));
  });
});

// ---- distributions --------------------------------------------------------------

describe("normal distribution function", () => {
  it("matches known values in the centre and both tails", () => {
    // Φ(1) = 0.8413447460685429, Φ(−3) = 0.0013498980316300946, Φ(−8) = 6.22096057427178e-16 [derived; standard tables].
    expect(normalCdf(0)).toBe(0.5);
    expect(normalCdf(1)).toBeCloseTo(0.8413447460685429, 15);
    expect(Math.abs(normalCdf(-3) / 0.0013498980316300946 - 1)).toBeLessThan(1e-13);
    expect(Math.abs(normalCdf(-8) / 6.22096057427178e-16 - 1)).toBeLessThan(1e-12);
  });
});

// ---- IUCN criterion E -----------------------------------------------------------

/** A merged result whose replicates first go quasi-extinct in the given years (counts). */
function resultWith(firstPassage: Record<number, number>, replicates: number, horizon: number, threshold = 10): StochasticResult {
  const counts = new Array<number>(horizon + 1).fill(0);
  for (const [year, c] of Object.entries(firstPassage)) counts[Number(year)] = c;
  const chunk: ChunkResult = {
    format: "stagewright-risk-chunk-1",
    seed: 1,
    chunkIndex: 0,
    firstReplicate: 0,
    replicateCount: replicates,
    horizon,
    burnIn: 0,
    firstPassage: counts,
    belowAtHorizon: 0,
    abundanceMean: new Array<number>(horizon + 1).fill(100),
    abundanceM2: new Array<number>(horizon + 1).fill(0),
    final: { count: replicates, mean: 100, m2: 0, min: 100, max: 100, zero: 0, below: 0, above: 0, bins: [[800, replicates]] },
    growth: { count: replicates, mean: 0, m2: 0, zeroReplicates: 0 },
    approximation: null,
  };
  return mergeChunks({ horizon, replicates, initial: [1], demographic: false, threshold: { value: threshold } }, [chunk]);
}

describe("iucnCriterionE", () => {
  it("sets the horizons from 3 and 5 generations when longer than 10 and 20 years", () => {
    // All replicates quasi-extinct in year 40; the run covers 50 years; generation length 12 years.
    const a = iucnCriterionE(resultWith({ 40: 1000 }, 1000, 50), 12);
    const [cr, en, vu] = a.checks;
    expect(cr).toMatchObject({ category: "CR", horizonYears: 36, covered: true, evaluatedAt: 36, probability: 0, status: "not-met" });
    expect(cr!.horizonBasis).toBe("3 generations of 12 years = 36 years");
    // EN needs 60 years, beyond the run; but P = 1 by year 50 already settles it.
    expect(en).toMatchObject({ category: "EN", horizonYears: 60, covered: false, evaluatedAt: 50, probability: 1, status: "met" });
    expect(en!.explanation).toMatch(/already gives 100.0 % by year 50, and the probability can only grow/);
    expect(vu).toMatchObject({ category: "VU", horizonYears: 100, covered: false, status: "met" });
    expect(a.highestMet).toBe("EN");
    expect(a.caution).toMatch(/Red List listing is the responsible authority's process/);
    expect(a.notes.join(" ")).toMatch(/cap on the generation-based horizons is recalled from memory/);
    expect(a.notes.join(" ")).toMatch(/quasi-extinction\), which are higher than those of extinction itself/);
  });

  it("says plainly when the run is too short to decide", () => {
    const a = iucnCriterionE(resultWith({}, 1000, 50), 12);
    expect(a.checks.map((c) => c.status)).toEqual(["not-met", "undetermined", "undetermined"]);
    expect(a.checks[1]!.explanation).toBe(
      "Endangered (EN) needs a probability of at least 20.0 % within 60 years, but the run covers only 50 years (0.0 % by then). Run again with a horizon of at least 60 years.",
    );
    expect(a.checks[2]!.explanation).toMatch(/within 100 years, but the run covers only 50 years .* at least 100 years/);
    expect(a.highestMet).toBeNull();
  });

  it("caps generation-based horizons at 100 years and uses 10 and 20 years for short generations", () => {
    const long = iucnCriterionE(resultWith({ 90: 600 }, 1000, 100), 40);
    expect(long.checks[0]).toMatchObject({ horizonYears: 100, status: "met", probability: 0.6 });
    expect(long.checks[0]!.horizonBasis).toMatch(/3 generations = 120 years, capped at 100 years \(the cap is recalled/);
    expect(long.checks[1]).toMatchObject({ horizonYears: 100 });
    const short = iucnCriterionE(resultWith({ 15: 250 }, 1000, 100), 2);
    expect(short.checks[0]).toMatchObject({ horizonYears: 10, probability: 0, status: "not-met" });
    expect(short.checks[0]!.horizonBasis).toBe("10 years (longer than 3 generations = 6 years)");
    expect(short.checks[1]).toMatchObject({ horizonYears: 20, probability: 0.25, status: "met" });
    expect(short.highestMet).toBe("EN");
  });

  it("flags a probability whose interval straddles the threshold, and handles an unknown generation length", () => {
    const a = iucnCriterionE(resultWith({ 8: 48 }, 100, 100), null);
    const cr = a.checks[0]!;
    expect(cr.status).toBe("undetermined");
    expect(cr.explanation).toMatch(/generation length is unknown/);
    const b = iucnCriterionE(resultWith({ 8: 48 }, 100, 100), 3);
    expect(b.checks[0]).toMatchObject({ status: "not-met", uncertain: true, probability: 0.48 });
    expect(b.checks[0]!.explanation).toMatch(/interval straddles the threshold: more replicates could change this/);
    expect(b.checks[1]).toMatchObject({ status: "met", uncertain: false });
    const c = iucnCriterionE(resultWith({ 8: 60 }, 100, 100), null);
    expect(c.checks[0]!.status).toBe("met");
  });

  it("reads the years in a time step from the life cycle's unit", () => {
    expect(yearsPerTimeStep("year")).toBe(1);
    expect(yearsPerTimeStep("2 years")).toBe(2);
    expect(yearsPerTimeStep("5-year")).toBe(5);
    expect(yearsPerTimeStep("Month")).toBeCloseTo(1 / 12, 15);
    expect(yearsPerTimeStep("decade")).toBe(10);
    expect(yearsPerTimeStep("breeding season")).toBeNull();
    expect(yearsPerTimeStep("generation")).toBeNull();
  });

  it("converts projection intervals to years", () => {
    // Matrices with a 5-year interval: 100 years are 20 intervals; generation length 4 intervals = 20 years.
    const a = iucnCriterionE(resultWith({ 12: 300 }, 1000, 20), 4, { yearsPerInterval: 5 });
    expect(a.generationLength).toEqual({ intervals: 4, years: 20 });
    expect(a.checks[0]).toMatchObject({ horizonYears: 60, horizonIntervals: 12, covered: true, probability: 0.3 });
    expect(a.checks[2]).toMatchObject({ horizonYears: 100, horizonIntervals: 20, covered: true });
  });
});
