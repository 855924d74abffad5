import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { EDGE_TOLERANCE, responseValue, thermalModel } from "../../shared/climate";
import { createRandom } from "../../shared/demography";
import type { WarmingSettingsInput } from "../../shared/schemas/climate";
import { runs } from "../../server/db/schema";
import { warmableLifeCycle } from "../factories/climate";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
const workers: ReturnType<typeof startWorker>[] = [];
beforeAll(async () => {
  server = await startTestServer();
});
afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => w.stop()));
});
afterAll(async () => {
  await server?.close();
});

const fieldPaths = (res: { body: { error: { fields?: { path: string }[] } } }) => (res.body.error.fields ?? []).map((f) => f.path);

describe("POST /climate/lambda", () => {
  it("returns λ(T), the persistence window with edges at λ = 1, the optimum and dλ/dT", async () => {
    const a = await signUpAgent(server);
    const doc = warmableLifeCycle();
    const res = await a.post("/api/v1/climate/lambda", { document: doc, range: { min: 0, max: 40 }, points: 200, at: 25 });
    expect(res.status).toBe(200);
    expect(res.body.temperatures).toHaveLength(200);
    expect(res.body.window).toHaveLength(1);
    const model = thermalModel(doc);
    for (const edge of [res.body.window[0].lower, res.body.window[0].upper]) {
      expect(Math.abs(model.lambdaAt(edge.temperature) - 1)).toBeLessThanOrEqual(EDGE_TOLERANCE);
    }
    expect(res.body.optimum.lambda).toBeGreaterThan(1);
    expect(res.body.slope.temperature).toBe(25);
    expect(res.body.slope.slope).toBeLessThan(0);
    expect(res.body.rates.map((r: { name: string }) => r.name)).toEqual(["s_j", "f"]);
    expect(res.body.responseOptima).toEqual([
      { rateId: "vr_sj", name: "s_j", optimum: null },
      { rateId: "vr_f", name: "f", optimum: 21 },
    ]);
  });

  it.each([
    ["a reversed range", { range: { min: 30, max: 10 } }, "range.max"],
    ["an absurdly wide range", { range: { min: -60, max: 80 } }, "range.max"],
    ["too many points", { points: 1_000_000 }, "points"],
    ["an activation energy ≤ 0", { document: warmableLifeCycle({ s_a: { form: "arrhenius", appliesTo: "rate", activationEnergy: 0, referenceTemperature: 20, valueAtReference: 0.85 } }) }, "document.rates.3.thermal.activationEnergy"],
    ["an upper limit below the lower", { document: warmableLifeCycle({ f: { form: "briere", appliesTo: "rate", coefficient: 1e-4, lower: 30, upper: 10 } }) }, "document.rates.4.thermal.upper"],
    ["an optimum above the critical maximum", { document: warmableLifeCycle({ f: { form: "gaussian-quadratic", appliesTo: "rate", valueAtOptimum: 2, optimum: 30, width: 4, criticalMaximum: 25 } }) }, "document.rates.4.thermal.criticalMaximum"],
  ])("refuses %s with a 400 naming the field", async (_name, overrides, path) => {
    const a = await signUpAgent(server);
    const res = await a.post("/api/v1/climate/lambda", { document: warmableLifeCycle(), range: { min: 0, max: 40 }, ...overrides });
    expect(res.status).toBe(400);
    expect(fieldPaths(res)).toContain(path);
  });

  // Found by the fuzzer: both were 500s.
  it("refuses a response too large to compute λ from, naming the rate's response, and a slope where λ is 0, naming `at`", async () => {
    const a = await signUpAgent(server);
    const huge = warmableLifeCycle({ f: { form: "arrhenius", appliesTo: "rate", activationEnergy: 20, referenceTemperature: 20, valueAtReference: 1e308 } });
    const res = await a.post("/api/v1/climate/lambda", { document: huge, range: { min: 0, max: 40 } });
    expect(res.status).toBe(400);
    expect(fieldPaths(res)).toEqual(["document.rates.4.thermal"]);
    expect(res.body.error.message).toMatch(/temperature response of f gives Infinity/);
    const trajectory = await a.post("/api/v1/climate/trajectory", { document: huge, trajectory: { kind: "trend", startYear: 2026, years: 20, baseline: 30, trendPerDecade: 2, sd: 0 } });
    expect(trajectory.status).toBe(400);
    expect(fieldPaths(trajectory)).toEqual(["document.rates.4.thermal"]);

    // Above 31 °C nothing survives or reproduces: λ = 0, and dλ/dT means nothing there.
    const gone = { form: "gaussian-quadratic" as const, appliesTo: "rate" as const, valueAtOptimum: 0.8, optimum: 20, width: 5, criticalMaximum: 31 };
    const barren = warmableLifeCycle({ s_s: gone, s_a: gone });
    const zero = await a.post("/api/v1/climate/lambda", { document: barren, range: { min: 0, max: 40 }, at: 35 });
    expect(zero.status).toBe(400);
    expect(fieldPaths(zero)).toEqual(["at"]);
    expect(zero.body.error.message).toMatch(/λ is 0/);
    expect((await a.post("/api/v1/climate/lambda", { document: barren, range: { min: 0, max: 40 }, at: 15 })).status).toBe(200);
  });

  it("refuses a life cycle without stages", async () => {
    const a = await signUpAgent(server);
    const empty = { ...threeStageLifeCycle(), stages: [], transitions: [] };
    const res = await a.post("/api/v1/climate/lambda", { document: empty, range: { min: 0, max: 40 } });
    expect(res.status).toBe(400);
    expect(fieldPaths(res)).toEqual(["document.stages"]);
  });
});

describe("POST /climate/fit", () => {
  const truth = { form: "briere" as const, appliesTo: "rate" as const, coefficient: 2e-4, lower: 8, upper: 36 };
  const csvOf = (seed: number) => {
    const rng = createRandom(seed);
    const rows = Array.from({ length: 20 }, (_, i) => 10 + i * 1.3).map((t) => `${t},${responseValue(truth, t) + 0.01 * rng.normal()}`);
    return `temperature_c,development_rate\n${rows.join("\n")}\n`;
  };

  it("fits a CSV and reports estimates with standard errors, residuals and a curve", async () => {
    const a = await signUpAgent(server);
    const res = await a.post("/api/v1/climate/fit", { form: "briere", csv: csvOf(3) });
    expect(res.status).toBe(200);
    expect(res.body.converged).toBe(true);
    expect(res.body.n).toBe(20);
    expect(res.body.residuals).toHaveLength(20);
    expect(res.body.curve.temperatures).toHaveLength(121);
    for (const e of res.body.estimates) {
      const t = (truth as Record<string, unknown>)[e.key] as number;
      expect(Math.abs(e.estimate - t)).toBeLessThanOrEqual(3 * e.se);
    }
    expect(res.body.response).toMatchObject({ form: "briere", appliesTo: "rate" });
  });

  it("names the line and column of text in a numeric column, and stores nothing", async () => {
    const a = await signUpAgent(server);
    const res = await a.post("/api/v1/climate/fit", { form: "arrhenius", csv: "t,r\n10,0.2\n15,n/a\n20,0.5\n25,0.8\n" });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('csv: Line 3, column 2 (value): "n/a" is not a number.');
    expect(fieldPaths(res)).toEqual(["csv"]);
  });

  it("reports a fit that does not converge as such, with the last estimate", async () => {
    const a = await signUpAgent(server);
    // A straight line is no Gaussian–quadratic curve: the width and CT_max are not determined.
    const measurements = [5, 10, 15, 20, 25, 30].map((t) => ({ temperature: t, value: 0.1 * t }));
    const res = await a.post("/api/v1/climate/fit", { form: "gaussian-quadratic", measurements });
    expect(res.status).toBe(200);
    expect(res.body.converged).toBe(false);
    expect(res.body.problem).toEqual(expect.any(String));
    expect(res.body.estimates.every((e: { estimate: number; se: number | null }) => Number.isFinite(e.estimate) && e.se === null)).toBe(true);
  });

  it("refuses too few measurements, both CSV and list, and an unknown form", async () => {
    const a = await signUpAgent(server);
    const few = await a.post("/api/v1/climate/fit", { form: "schoolfield", measurements: [10, 20, 30, 35].map((t) => ({ temperature: t, value: 1 })) });
    expect(few.status).toBe(400);
    expect(few.body.error.message).toMatch(/give at least 5 measurements/);
    expect(fieldPaths(await a.post("/api/v1/climate/fit", { form: "briere", csv: "1,2", measurements: [] }))).toEqual(["csv"]);
    expect(fieldPaths(await a.post("/api/v1/climate/fit", { form: "cubic", csv: "1,2" }))).toEqual(["form"]);
  });
});

describe("POST /climate/trajectory", () => {
  it("projects through a trend and names the first year with λ_t below 1", async () => {
    const a = await signUpAgent(server);
    const doc = warmableLifeCycle();
    const trajectory = { kind: "trend", startYear: 2025, years: 80, baseline: 20, trendPerDecade: 1.5, sd: 0.8 };
    const res = await a.post("/api/v1/climate/trajectory", { document: doc, trajectory, initialTotal: 400 });
    expect(res.status).toBe(200);
    expect(res.body.total).toHaveLength(81);
    expect(res.body.total[0]).toBe(400);
    const model = thermalModel(doc);
    const firstIndex = res.body.temperatures.findIndex((T: number) => model.lambdaAt(T) < 1);
    expect(res.body.firstYearBelowOne).toBe(2025 + firstIndex);
  });

  it("refuses years that skip in a series", async () => {
    const a = await signUpAgent(server);
    const res = await a.post("/api/v1/climate/trajectory", {
      document: warmableLifeCycle(),
      trajectory: { kind: "series", points: [{ year: 2020, temperature: 18 }, { year: 2021, temperature: 18.4 }, { year: 2023, temperature: 19 }] },
    });
    expect(res.status).toBe(400);
    expect(fieldPaths(res)).toEqual(["trajectory.points.2.year"]);
  });
});

describe("a warming Run", () => {
  const settings = (overrides: Partial<WarmingSettingsInput> = {}): WarmingSettingsInput => ({
    trajectory: { kind: "trend", startYear: 2025, years: 40, baseline: 19, trendPerDecade: 2, sd: 1 },
    replicates: 200,
    initialTotal: 500,
    threshold: 50,
    seed: 11,
    ...overrides,
  });

  async function setup(doc = warmableLifeCycle()) {
    const owner = await signUpAgent(server);
    const studyId = (await owner.post("/api/v1/studies", { name: "Warming" })).body.id as string;
    const lc = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body;
    return { owner, lifeCycleId: lc.id as string };
  }

  it("refuses bad settings and a life cycle without thermal responses, queuing nothing", async () => {
    const { owner, lifeCycleId } = await setup();
    const few = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "warming", settings: settings({ replicates: 1 }) });
    expect(few.status).toBe(400);
    expect(fieldPaths(few)).toEqual(["settings.replicates"]);
    const plain = await setup(threeStageLifeCycle());
    const none = await plain.owner.post(`/api/v1/life-cycles/${plain.lifeCycleId}/runs`, { kind: "warming", settings: settings() });
    expect(none.status).toBe(400);
    expect(fieldPaths(none)).toEqual(["settings.trajectory"]);
    expect(await server.db.select().from(runs).where(eq(runs.lifeCycleId, lifeCycleId))).toHaveLength(0);
  });

  it("computes replicates in a real worker: quantiles of N(t), the share below the threshold and the deterministic path", async () => {
    const { owner, lifeCycleId } = await setup();
    const created = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "warming", settings: settings() });
    expect(created.status).toBe(201);
    workers.push(startWorker(server.databaseUrl));
    const until = Date.now() + 90_000;
    let run = created.body;
    while (run.status !== "succeeded") {
      if (run.status === "failed" || Date.now() > until) throw new Error(`run ${run.status}: ${run.error}`);
      await new Promise((r) => setTimeout(r, 200));
      run = (await owner.get(`/api/v1/runs/${run.id}`)).body;
    }
    const r = run.result;
    expect(r.replicates).toBe(200);
    expect(r.years).toHaveLength(40);
    const median = r.quantiles.find((q: { q: number }) => q.q === 0.5).values;
    expect(median).toHaveLength(41);
    expect(median[0]).toBe(500);
    expect(r.belowThreshold).toHaveLength(41);
    expect(r.deterministic.total).toHaveLength(41);
    // Warming of 2 °C a decade from 19 °C leaves the window within the horizon.
    expect(r.deterministic.firstYearBelowOne).not.toBeNull();
    expect(r.shareEverBelowOne).toBeGreaterThan(0.9);
    expect(r.seed).toBe(11);
  });
});
