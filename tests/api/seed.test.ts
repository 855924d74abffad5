import { afterAll, beforeAll, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { comments, lifeCycles, memberships, notifications, reviews, runs, studies, users } from "../../server/db/schema";
import { createJobSender } from "../../server/runs/queue";
import { DEMO_PASSWORD, DEMO_USERS, seedDemo, seedDemoRun } from "../../server/seed";
import { startWorker } from "../helpers/worker";
import { browserAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

it("seeds the demo once: a second run neither duplicates nor fails", async () => {
  const first = await seedDemo(server.db);
  const second = await seedDemo(server.db);
  expect(first.created).toBe(true);
  expect(second).toEqual({ studyId: first.studyId, created: false });
  expect(await server.db.select().from(users)).toHaveLength(3);
  expect(await server.db.select().from(studies)).toHaveLength(1);
  expect(await server.db.select().from(memberships)).toHaveLength(3);
  expect(await server.db.select().from(lifeCycles)).toHaveLength(2);
  // The demo review trail: the reviewer's threads (with replies) and one decision per life cycle, and no e-mail queued.
  const demoComments = await server.db.select().from(comments);
  expect(demoComments.filter((c) => c.threadId === null)).toHaveLength(4);
  expect(demoComments.filter((c) => c.threadId !== null)).toHaveLength(2);
  expect((await server.db.select({ state: reviews.state }).from(reviews)).map((r) => r.state).sort()).toEqual(["approved", "changes_requested"]);
  expect(await server.db.select().from(notifications)).toEqual([]);
});

it("lets each demo account sign in with its role, and the demo life cycles analyse", async () => {
  const { studyId } = await seedDemo(server.db);
  for (const u of DEMO_USERS) {
    const a = await browserAgent(server);
    expect((await a.post("/api/v1/auth/sign-in", { email: u.email, password: DEMO_PASSWORD })).status).toBe(200);
    expect((await a.get(`/api/v1/studies/${studyId}`)).body.role).toBe(u.role);
    if (u.role !== "owner") continue;
    const list = await a.get(`/api/v1/studies/${studyId}/life-cycles`);
    const lambdas: Record<string, number> = {};
    for (const lc of list.body) {
      const res = await a.get(`/api/v1/life-cycles/${lc.id}/analysis`);
      expect(res.status).toBe(200);
      expect(res.body.isSound).toBe(true);
      lambdas[lc.name] = res.body.lambda;
    }
    // The invented story: one site grows, the other declines.
    expect(lambdas["Brannock Fen newts"]).toBeGreaterThan(1);
    expect(lambdas["Kessel Marsh newts"]).toBeLessThan(1);
  }
});

it("queues the demo Risk run once, and the real worker finishes it", async () => {
  const { studyId } = await seedDemo(server.db);
  const jobs = createJobSender(server.databaseUrl);
  const worker = startWorker(server.databaseUrl);
  try {
    expect(await seedDemoRun(server.db, jobs, studyId)).toBe(true);
    expect(await seedDemoRun(server.db, jobs, studyId)).toBe(false);
    // The baseline run and one of a Levers scenario (same settings and seed).
    const queued = await server.db.select().from(runs);
    expect(queued.map((r) => (r.settings as { scenarioId?: string }).scenarioId ?? null).sort()).toEqual(["sc_fence", null].sort());
    for (const run of queued) {
      const until = Date.now() + 240_000;
      let status = run.status;
      while (status !== "succeeded" && status !== "failed" && Date.now() < until) {
        await new Promise((r) => setTimeout(r, 250));
        status = (await server.db.select().from(runs).where(eq(runs.id, run.id)))[0]!.status;
      }
      expect(status).toBe("succeeded");
    }
    // The fence raises adult survival, so its simulated futures fall to the threshold less often.
    const done = await server.db.select().from(runs);
    const share = (scenario: string | null) =>
      (done.find((r) => ((r.settings as { scenarioId?: string }).scenarioId ?? null) === scenario)!.result as { quasiExtinction: { share: number } }).quasiExtinction.share;
    expect(share("sc_fence")).toBeLessThan(share(null));
  } finally {
    await worker.stop();
    await jobs.stop();
  }
}, 300_000);
