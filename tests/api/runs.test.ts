import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { analyzeMatrix } from "../../shared/demography";
import type { RiskSettingsInput } from "../../shared/schemas/risk";
import { auditEvents, runChunks, runs } from "../../server/db/schema";
import { THREE_STAGE_MATRIX, threeStageLifeCycle } from "../factories/life-cycles";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
const workers: ReturnType<typeof startWorker>[] = [];
const worker = () => {
  const w = startWorker(server.databaseUrl);
  workers.push(w);
  return w;
};
beforeAll(async () => {
  server = await startTestServer();
});
afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => w.stop()));
});
afterAll(async () => {
  await server?.close();
});

async function setup() {
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Risk" })).body.id as string;
  const lc = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle() })).body;
  return { owner, studyId, lifeCycleId: lc.id as string };
}

const vitalRateSettings = (overrides: Partial<RiskSettingsInput> = {}): RiskSettingsInput => ({
  environment: {
    kind: "vital-rates",
    rates: [
      { rateId: "vr_sa", distribution: "beta", mean: 0.85, sd: 0.05 },
      { rateId: "vr_f", distribution: "lognormal", mean: 1.6, sd: 0.4 },
    ],
  },
  initial: [20, 10, 8],
  horizon: 50,
  replicates: 500,
  threshold: { value: 5 },
  seed: 7,
  ...overrides,
});

async function waitFor(owner: Awaited<ReturnType<typeof signUpAgent>>, runId: string, done: (run: { status: string; progress: number }) => boolean, timeoutMs = 120_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const run = (await owner.get(`/api/v1/runs/${runId}`)).body;
    if (done(run)) return run;
    if (Date.now() > until) throw new Error(`run ${runId} still ${run.status} at ${run.progress} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe("starting a Risk run", () => {
  it.each([
    ["weights that do not sum to 1", { environment: { kind: "matrices", lifeCycleIds: ["x", "y"], weights: [0.5, 0.6] } }, "settings.environment.weights"],
    ["an SD impossible for a beta", { environment: { kind: "vital-rates", rates: [{ rateId: "vr_sa", distribution: "beta", mean: 0.85, sd: 0.4 }] } }, "settings.environment.rates.0.sd"],
    ["a non-positive horizon", { horizon: 0 }, "settings.horizon"],
    ["no replicates", { replicates: 0 }, "settings.replicates"],
    ["an unknown vital rate", { environment: { kind: "vital-rates", rates: [{ rateId: "vr_nope", distribution: "beta", mean: 0.5, sd: 0.1 }] } }, "settings.environment.rates.0.rateId"],
    ["the wrong number of initial stages", { initial: [10, 20] }, "settings.initial"],
  ])("refuses %s with a 400 naming the field, queuing nothing", async (_name, overrides, path) => {
    const { owner, lifeCycleId } = await setup();
    const res = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings: vitalRateSettings(overrides as Partial<RiskSettingsInput>) });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain(path);
    expect(await server.db.select().from(runs).where(eq(runs.lifeCycleId, lifeCycleId))).toHaveLength(0);
  });

  it("refuses matrices of different sizes", async () => {
    const { owner, studyId, lifeCycleId } = await setup();
    const small = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, {
      document: threeStageLifeCycle({ name: "Two stages", stages: threeStageLifeCycle().stages.slice(0, 2), transitions: threeStageLifeCycle().transitions.slice(0, 2) }),
    });
    const res = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, {
      kind: "risk",
      settings: vitalRateSettings({ environment: { kind: "matrices", lifeCycleIds: [lifeCycleId, small.body.id], weights: [0.5, 0.5] } }),
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toMatch(/^settings\.environment\.lifeCycleIds/);
  });
});

describe("a Risk run through the real worker", () => {
  it("with one matrix and no demographic noise, every replicate follows the deterministic projection", async () => {
    const { owner, lifeCycleId } = await setup();
    worker();
    const initial = [20, 10, 8];
    const start = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, {
      kind: "risk",
      settings: { environment: { kind: "matrices", lifeCycleIds: [lifeCycleId], weights: [1] }, initial, horizon: 200, replicates: 50, threshold: { value: 1 }, seed: 1 },
    });
    expect(start.status).toBe(201);
    const run = await waitFor(owner, start.body.id, (r) => r.status === "succeeded" || r.status === "failed");
    expect(run.status).toBe("succeeded");
    let n = initial;
    for (let t = 0; t < 200; t++) n = THREE_STAGE_MATRIX.map((row) => row.reduce((s, a, j) => s + a * n[j]!, 0));
    const total = n.reduce((a, b) => a + b, 0);
    expect(run.result.finalAbundance.mean).toBeCloseTo(total, 8);
    expect(run.result.finalAbundance.sd).toBeLessThan(1e-9 * total);
    expect(run.result.quasiExtinction.share).toBe(0);
    // The simulated log λs of a constant environment is log λ (after 200 years the transient has died out).
    expect(run.result.growthRate.simulated.logLambdaS).toBeCloseTo(Math.log(analyzeMatrix({ A: THREE_STAGE_MATRIX }).lambda), 6);
    expect(run.result.criterionE.checks.map((c: { category: string }) => c.category)).toEqual(["CR", "EN", "VU"]);
    const events = await server.db.select().from(auditEvents).where(eq(auditEvents.action, "run.created"));
    expect(events.some((e) => (e.details as { runId: string }).runId === start.body.id)).toBe(true);
  });

  it("gives the same result for the same seed, with one worker or two", async () => {
    const { owner, lifeCycleId } = await setup();
    worker();
    const settings = vitalRateSettings({ replicates: 3000, horizon: 60, demographic: true });
    const a = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings });
    const runA = await waitFor(owner, a.body.id, (r) => r.status === "succeeded" || r.status === "failed");
    worker();
    const b = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings });
    const runB = await waitFor(owner, b.body.id, (r) => r.status === "succeeded" || r.status === "failed");
    expect(runA.status).toBe("succeeded");
    expect(runB.result).toEqual(runA.result);
  });

  it("survives kill -9 of the worker past 30 %: the run completes as if uninterrupted, without recomputing finished chunks", async () => {
    const { owner, lifeCycleId } = await setup();
    // Demographic noise and drawn rates make each replicate-year costly: enough chunks to interrupt.
    const settings = vitalRateSettings({ replicates: 20_000, horizon: 200, demographic: true, initial: [200, 100, 80] });
    const first = worker();
    const start = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings });
    expect(start.status).toBe(201);
    expect(start.body.chunksTotal).toBeGreaterThanOrEqual(4);
    await waitFor(owner, start.body.id, (r) => r.progress > 0.3 && r.progress < 1);
    await first.kill9();
    const finishedBefore = (await server.db.select().from(runChunks).where(eq(runChunks.runId, start.body.id))).filter((c) => c.finishedAt);
    expect(finishedBefore.length).toBeGreaterThan(0);

    worker();
    const interrupted = await waitFor(owner, start.body.id, (r) => r.status === "succeeded" || r.status === "failed", 240_000);
    expect(interrupted.status).toBe("succeeded");
    const after = await server.db.select().from(runChunks).where(eq(runChunks.runId, start.body.id));
    for (const c of finishedBefore) {
      const now = after.find((a) => a.chunkIndex === c.chunkIndex)!;
      expect(now.attempts, `chunk ${c.chunkIndex} was computed again`).toBe(1);
      expect(now.finishedAt).toEqual(c.finishedAt);
    }

    const again = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings });
    const uninterrupted = await waitFor(owner, again.body.id, (r) => r.status === "succeeded" || r.status === "failed", 240_000);
    expect(uninterrupted.result).toEqual(interrupted.result);
  }, 600_000);

  it("cancels: the run stops within a few seconds and no further chunk is computed", async () => {
    const { owner, lifeCycleId } = await setup();
    worker();
    const start = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "risk", settings: vitalRateSettings({ replicates: 60_000, horizon: 200, demographic: true, initial: [200, 100, 80] }) });
    await waitFor(owner, start.body.id, (r) => r.progress > 0);
    const cancelled = await owner.post(`/api/v1/runs/${start.body.id}/cancel`);
    expect(cancelled.status).toBe(200);
    expect(cancelled.body.status).toBe("cancelled");
    // Liveness with a wide margin: at most the chunk in progress finishes after the cancel.
    await new Promise((r) => setTimeout(r, 6000));
    const done1 = (await owner.get(`/api/v1/runs/${start.body.id}`)).body.chunksDone;
    await new Promise((r) => setTimeout(r, 4000));
    const final = (await owner.get(`/api/v1/runs/${start.body.id}`)).body;
    expect(final.status).toBe("cancelled");
    expect(final.chunksDone).toBe(done1);
    expect(final.chunksDone).toBeLessThan(final.chunksTotal);
    expect((await owner.post(`/api/v1/runs/${start.body.id}/cancel`)).status).toBe(409);
  }, 60_000);
});
