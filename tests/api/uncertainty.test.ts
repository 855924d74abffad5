import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import type { LifeCycle } from "../../shared/lifecycle";
import { memberships, runs } from "../../server/db/schema";
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

/** The factory's life cycle with SEs and counts on three of its rates. */
function uncertainLifeCycle(rates: Record<string, Partial<LifeCycle["rates"][number]>> = { vr_sa: { se: 0.03 }, vr_f: { se: 0.2 }, vr_sj: { counts: { k: 30, n: 100 } } }): LifeCycle {
  const base = threeStageLifeCycle();
  return { ...base, rates: base.rates.map((r) => ({ ...r, ...rates[r.id] })) };
}

async function setup(document: LifeCycle = uncertainLifeCycle()) {
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Uncertainty" })).body.id as string;
  const lc = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document })).body;
  return { owner, studyId, lifeCycleId: lc.id as string };
}

async function waitFor(owner: Awaited<ReturnType<typeof signUpAgent>>, runId: string, timeoutMs = 120_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const run = (await owner.get(`/api/v1/runs/${runId}`)).body;
    if (run.status === "succeeded" || run.status === "failed") return run;
    if (Date.now() > until) throw new Error(`run ${runId} still ${run.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe("delta method in the analysis", () => {
  it("gives λ's interval and P(λ < 1) when rates carry uncertainty, for stored and unsaved documents alike", async () => {
    const { owner, lifeCycleId } = await setup();
    const stored = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/analysis`);
    expect(stored.status).toBe(200);
    const u = stored.body.uncertainty;
    expect(u.level).toBe(0.95);
    expect(u.lambda.estimate).toBeCloseTo(stored.body.lambda, 12);
    expect(u.lambda.lower).toBeLessThan(stored.body.lambda);
    expect(u.lambda.upper).toBeGreaterThan(stored.body.lambda);
    expect(u.lambda.probabilityBelowOne).toBeGreaterThan(0);
    expect(u.lambda.probabilityBelowOne).toBeLessThan(1);
    expect(u.contributions.map((c: { name: string }) => c.name).sort()).toEqual(["f", "s_a", "s_j"]);
    expect(u.ratesWithoutUncertainty).toEqual(["s_s", "g"]);
    expect(u.netReproductiveRate.se).toBeGreaterThan(0);

    const draft = await owner.post("/api/v1/analyze", { document: uncertainLifeCycle({ vr_sa: { se: 0.03 } }) });
    expect(draft.status).toBe(200);
    expect(draft.body.uncertainty.contributions).toHaveLength(1);
    const none = await owner.post("/api/v1/analyze", { document: threeStageLifeCycle() });
    expect(none.body.uncertainty).toBeNull();
  });

  it("reports an SE impossible for a beta as an issue naming the rate, and still analyses", async () => {
    const { owner } = await setup();
    const res = await owner.post("/api/v1/analyze", { document: uncertainLifeCycle({ vr_sa: { se: 0.5 } }) });
    expect(res.status).toBe(200);
    expect(res.body.uncertainty.lambda).toBeNull();
    expect(res.body.uncertainty.issues[0]).toMatchObject({ path: ["rates", 3, "se"], severity: "error" });
    expect(res.body.uncertainty.issues[0].message).toMatch(/^An SE of 0\.5 is impossible for s_a/);
  });

  it("refuses a negative SE and counts with k > n with a 400 naming the field", async () => {
    const { owner } = await setup();
    const negative = await owner.post("/api/v1/analyze", { document: uncertainLifeCycle({ vr_sa: { se: -0.1 } }) });
    expect(negative.status).toBe(400);
    expect(negative.body.error.fields[0].path).toBe("document.rates.3.se");
    const counts = await owner.post("/api/v1/analyze", { document: uncertainLifeCycle({ vr_sj: { counts: { k: 120, n: 100 } } }) });
    expect(counts.status).toBe(400);
    expect(counts.body.error.fields[0].path).toBe("document.rates.0.counts.k");
  });
});

describe("a Monte Carlo uncertainty run", () => {
  it.each([
    ["too few draws", uncertainLifeCycle(), { draws: 10 }, "settings.draws"],
    ["no rate with uncertainty", threeStageLifeCycle(), {}, "lifeCycle.rates"],
    ["an SE impossible for a beta", uncertainLifeCycle({ vr_sa: { se: 0.5 } }), {}, "lifeCycle.rates.3.se"],
    [
      "correlations that contradict one another",
      {
        ...uncertainLifeCycle({ vr_sa: { se: 0.03 }, vr_f: { se: 0.2 }, vr_sj: { se: 0.05 } }),
        correlations: [
          { a: "vr_sa", b: "vr_f", r: 0.95 },
          { a: "vr_f", b: "vr_sj", r: 0.95 },
          { a: "vr_sa", b: "vr_sj", r: -0.95 },
        ],
      },
      {},
      "lifeCycle.correlations",
    ],
  ])("refuses %s with a 400 naming the field, queuing nothing", async (_name, document, settings, path) => {
    const { owner, lifeCycleId } = await setup(document as LifeCycle);
    const res = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "uncertainty", settings });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain(path);
    expect(await server.db.select().from(runs).where(eq(runs.lifeCycleId, lifeCycleId))).toHaveLength(0);
  });

  it("is for editors: a viewer gets 403", async () => {
    const { lifeCycleId, studyId } = await setup();
    const viewer = await signUpAgent(server);
    await server.db.insert(memberships).values({ studyId, userId: viewer.user.id, role: "viewer" });
    const res = await viewer.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "uncertainty", settings: {} });
    expect(res.status).toBe(403);
  });

  it("computes 10,000 seeded draws in the worker: percentile intervals, P(λ < 1), histogram and rank stability, agreeing with the delta method", async () => {
    const { owner, lifeCycleId } = await setup();
    workers.push(startWorker(server.databaseUrl));
    const start = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "uncertainty", settings: { seed: 5 } });
    expect(start.status).toBe(201);
    expect(start.body.settings).toEqual({ draws: 10_000, seed: 5 });
    const run = await waitFor(owner, start.body.id);
    expect(run.status).toBe("succeeded");
    const r = run.result;
    expect(r.draws).toBe(10_000);
    expect(r.lifeCycleVersion).toBe(1);
    expect(r.lambdaHistogram.counts.reduce((a: number, b: number) => a + b, 0)).toBe(10_000);
    expect(r.lambda.lower).toBeLessThan(r.lambda.median);
    expect(r.lambda.median).toBeLessThan(r.lambda.upper);
    expect(r.rateLevers.reduce((s: number, l: { rankFirst: number }) => s + l.rankFirst, 0)).toBeCloseTo(1, 12);
    const delta = (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/analysis`)).body.uncertainty;
    expect(Math.abs(r.lambda.sd / delta.lambda.se - 1)).toBeLessThan(0.1);
    expect(Math.abs(r.lambda.probabilityBelowOne - delta.lambda.probabilityBelowOne)).toBeLessThan(0.05);

    // Same seed, same result.
    const again = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/runs`, { kind: "uncertainty", settings: { seed: 5 } });
    expect((await waitFor(owner, again.body.id)).result).toEqual(r);
  });
});
