import { describe, expect, it } from "vitest";
import type { z } from "zod";
import { MAX_HORIZON, MAX_REPLICATES, MAX_WORK, RiskSettingsSchema, riskWork, type RiskSettingsInput } from "../../shared/schemas/risk";
import { MAX_CHUNKS, planChunks, secondsPerReplicateYear, TARGET_CHUNK_SECONDS } from "../../shared/risk";

// ---- small factories ---------------------------------------------------------

function settings(overrides: Partial<RiskSettingsInput> = {}): RiskSettingsInput {
  return {
    environment: { kind: "matrices", lifeCycleIds: ["lc_a", "lc_b"], weights: [0.5, 0.5] },
    initial: [20, 10, 5],
    horizon: 50,
    replicates: 1000,
    threshold: { value: 5 },
    ...overrides,
  };
}

/** The issues of a failed parse as "path: message". */
function issues(input: unknown): string[] {
  const r = RiskSettingsSchema.safeParse(input);
  if (r.success) return [];
  return (r.error as z.ZodError).issues.map((i) => `${i.path.join(".")}: ${i.message}`);
}

describe("RiskSettingsSchema", () => {
  it("accepts a complete payload and fills the defaults", () => {
    const s = RiskSettingsSchema.parse(settings({ seed: 42, horizons: [10, 50], ceiling: 1000 }));
    expect(s.demographic).toBe(false);
    expect(s.seed).toBe(42);
  });

  it("refuses weights that do not sum to 1 (tolerance 1e-9), at environment.weights", () => {
    expect(issues(settings({ environment: { kind: "matrices", lifeCycleIds: ["a", "b"], weights: [0.5, 0.49] } }))).toEqual([
      "environment.weights: The weights must sum to 1; they sum to 0.99.",
    ]);
    expect(issues(settings({ environment: { kind: "matrices", lifeCycleIds: ["a", "b", "c"], weights: [0.1, 0.2, 0.7 + 5e-10] } }))).toEqual([]);
    expect(issues(settings({ environment: { kind: "matrices", lifeCycleIds: ["a", "b"], weights: [1] } }))[0]).toMatch(/^environment\.weights: Give one weight per life cycle/);
    expect(issues(settings({ environment: { kind: "matrices", lifeCycleIds: ["a", "a"], weights: [0.5, 0.5] } }))[0]).toMatch(/^environment\.lifeCycleIds\.1: Life cycle "a" is listed twice/);
  });

  it("refuses a Markov chain whose rows do not sum to 1 or whose initial state is not a state", () => {
    const env = { kind: "markov" as const, lifeCycleIds: ["a", "b"], transition: [[0.9, 0.1], [0.3, 0.6]], initialState: "c" };
    expect(issues(settings({ environment: env }))).toEqual([
      "environment.transition.1: The probabilities of leaving state 2 (row 2) must sum to 1; they sum to 0.9.",
      'environment.initialState: The initial state "c" is not one of the chosen life cycles.',
    ]);
    expect(issues(settings({ environment: { ...env, transition: [[1, 0]], initialState: "a" } }))[0]).toMatch(/^environment\.transition: The transition matrix needs one row per environment state/);
  });

  it("refuses an SD impossible for a beta distribution with the given mean (sd² ≥ mean(1 − mean))", () => {
    const env = (mean: number, sd: number) => ({ kind: "vital-rates" as const, rates: [{ rateId: "vr_s", distribution: "beta" as const, mean, sd }] });
    expect(issues(settings({ environment: env(0.8, 0.4) }))).toEqual([
      "environment.rates.0.sd: For a beta distribution with mean 0.8 the SD must be below √(mean·(1 − mean)) = 0.4; got 0.4.",
    ]);
    expect(issues(settings({ environment: env(0.8, 0.399) }))).toEqual([]);
    expect(issues(settings({ environment: env(1, 0.1) }))[0]).toMatch(/^environment\.rates\.0\.sd: A probability with mean 1 cannot vary/);
    expect(issues(settings({ environment: env(1.2, 0) }))[0]).toMatch(/^environment\.rates\.0\.mean: A beta distribution describes a probability/);
    expect(issues(settings({ environment: { kind: "vital-rates", rates: [{ rateId: "vr_f", distribution: "gamma", mean: 0, sd: 1 }] } }))[0]).toMatch(/^environment\.rates\.0\.mean: A gamma distribution describes a positive rate/);
  });

  it("refuses correlations that name unknown or equal rates, repeat a pair, or are not positive definite", () => {
    const rates = ["a", "b", "c"].map((rateId) => ({ rateId, distribution: "lognormal" as const, mean: 1, sd: 0.2 }));
    const env = (correlations: { a: string; b: string; r: number }[]) => ({ kind: "vital-rates" as const, rates, correlations });
    expect(issues(settings({ environment: env([{ a: "a", b: "x", r: 0.5 }]) }))).toEqual(['environment.correlations.0.b: "x" is not one of the vital rates being varied.']);
    expect(issues(settings({ environment: env([{ a: "a", b: "a", r: 0.5 }]) }))[0]).toMatch(/^environment\.correlations\.0\.b: A rate's correlation with itself is 1/);
    expect(issues(settings({ environment: env([{ a: "a", b: "b", r: 0.5 }, { a: "b", b: "a", r: 0.4 }]) }))[0]).toMatch(/^environment\.correlations\.1: The correlation of "b" and "a" is already given in entry 1/);
    // r_ab = r_bc = 0.9 force a and c together, r_ac = −0.9 pulls them apart: impossible.
    expect(issues(settings({ environment: env([{ a: "a", b: "b", r: 0.9 }, { a: "b", b: "c", r: 0.9 }, { a: "a", b: "c", r: -0.9 }]) }))[0]).toMatch(
      /^environment\.correlations: These correlations are not mutually consistent \(the correlation matrix is not positive definite/,
    );
    expect(issues(settings({ environment: env([{ a: "a", b: "b", r: 1 }]) }))[0]).toMatch(/^environment\.correlations: These correlations are not mutually consistent/);
    expect(issues(settings({ environment: env([{ a: "a", b: "b", r: 0.9 }, { a: "b", b: "c", r: 0.9 }, { a: "a", b: "c", r: 0.7 }]) }))).toEqual([]);
  });

  it("refuses non-positive or fractional horizons and replicate counts, and runs above the limits", () => {
    expect(issues(settings({ horizon: 0 }))).toEqual(["horizon: The horizon is at least 1."]);
    expect(issues(settings({ horizon: 2.5 }))).toEqual(["horizon: The horizon is a whole number."]);
    expect(issues(settings({ replicates: -3 }))).toEqual(["replicates: The number of replicates is at least 1."]);
    expect(issues(settings({ replicates: MAX_REPLICATES + 1 }))[0]).toMatch(/^replicates: The number of replicates is at most 100,000/);
    expect(issues(settings({ horizon: MAX_HORIZON + 1 }))[0]).toMatch(/^horizon: The horizon is at most 1,000/);
    // 100,000 × 1,000 × 20² = 4e10 work units > MAX_WORK.
    const big = settings({ replicates: 100_000, horizon: 1000, initial: new Array<number>(20).fill(1) });
    expect(riskWork(RiskSettingsSchema.parse({ ...big, replicates: 10 }))).toBe(10 * 1000 * 400);
    expect(issues(big)).toEqual([`replicates: This Run is too large: 100,000 replicates × 1000 years × 20² stages = 4.00e+10 work units, above the limit of ${MAX_WORK.toExponential(0)}. Use fewer replicates or a shorter horizon.`]);
  });

  it("checks the initial population, threshold, ceiling, reporting years and burn-in against each other", () => {
    expect(issues(settings({ initial: [0, 0, 0] }))).toEqual(["initial: The initial population is all zeros: give at least one individual."]);
    expect(issues(settings({ demographic: true, initial: [20, 10.5, 5] }))).toEqual(["initial.1: With demographic stochasticity every stage holds whole individuals; got 10.5."]);
    expect(issues(settings({ threshold: { value: 35 } }))).toEqual(["threshold.value: The initial population (35) is already at or below the threshold (35)."]);
    expect(issues(settings({ ceiling: 5 }))).toEqual(["ceiling: The ceiling (5) must be above the quasi-extinction threshold (5)."]);
    expect(issues(settings({ horizons: [10, 60] }))).toEqual(["horizons.1: Year 60 is beyond the 50-year horizon."]);
    expect(issues(settings({ burnIn: 50 }))).toEqual(["burnIn: The burn-in (50 years) must be shorter than the horizon (50 years)."]);
    expect(issues(settings({ threshold: { value: 1, stages: ["st_a", "st_a"] } }))).toEqual(['threshold.stages.1: Stage "st_a" is listed twice (entries 1 and 2).']);
    expect(issues({ ...settings(), colour: "red" })[0]).toMatch(/^: Unrecognized key/);
  });
});

describe("planChunks", () => {
  const parsed = (o: Partial<RiskSettingsInput>) => RiskSettingsSchema.parse(settings(o));

  it("covers every replicate once, in consecutive chunks of nearly equal size", () => {
    const s = parsed({ replicates: 100_000, horizon: 1000, initial: new Array<number>(10).fill(5) });
    const plan = planChunks(s, 10);
    expect(plan.chunks.length).toBeGreaterThan(1);
    let next = 0;
    plan.chunks.forEach((c, k) => {
      expect(c.chunkIndex).toBe(k);
      expect(c.firstReplicate).toBe(next);
      next += c.replicateCount;
    });
    expect(next).toBe(100_000);
    const sizes = plan.chunks.map((c) => c.replicateCount);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
    expect(plan.workUnits).toBe(100_000 * 1000 * 100);
  });

  it("sizes chunks to the target duration from the cost model", () => {
    const s = parsed({ replicates: 50_000, horizon: 500, initial: new Array<number>(20).fill(5), demographic: true, environment: { kind: "vital-rates", rates: [{ rateId: "r", distribution: "beta", mean: 0.5, sd: 0.1 }] } });
    const plan = planChunks(s, 20);
    const perReplicate = secondsPerReplicateYear(s, 20) * 500;
    expect(plan.estimatedSecondsPerChunk).toBeLessThanOrEqual(TARGET_CHUNK_SECONDS * 1.01);
    // As few chunks as the target allows: with one chunk fewer, some chunk would need
    // more whole replicates than fit in the target duration.
    const count = plan.chunks.length;
    const fit = Math.floor(TARGET_CHUNK_SECONDS / perReplicate);
    expect(count).toBeGreaterThan(1);
    expect((count - 1) * fit).toBeLessThan(50_000);
    expect(plan.chunks.length).toBeLessThanOrEqual(MAX_CHUNKS);
  });

  it("keeps a small Run in one chunk and is a pure function of its input", () => {
    const s = parsed({ replicates: 500, horizon: 20 });
    expect(planChunks(s, 3).chunks).toEqual([{ chunkIndex: 0, firstReplicate: 0, replicateCount: 500 }]);
    expect(planChunks(s, 3)).toEqual(planChunks(s, 3));
  });
});
