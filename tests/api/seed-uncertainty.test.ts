import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, expect, it } from "vitest";
import { runs } from "../../server/db/schema";
import { createJobSender } from "../../server/runs/queue";
import { DEMO_PASSWORD, DEMO_USERS, seedDemo } from "../../server/seed";
import { seedDemoUncertaintyRun } from "../../server/seed/uncertainty";
import { browserAgent, startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

it("the demo newts carry counts, SEs and a correlation: both sites' λ has an interval, with no problem reported", async () => {
  const { studyId } = await seedDemo(server.db);
  const a = await browserAgent(server);
  await a.post("/api/v1/auth/sign-in", { email: DEMO_USERS[0]!.email, password: DEMO_PASSWORD });
  const list = (await a.get(`/api/v1/studies/${studyId}/life-cycles`)).body as { id: string; name: string }[];
  for (const lc of list) {
    const res = await a.get(`/api/v1/life-cycles/${lc.id}/analysis`);
    const u = res.body.uncertainty;
    expect(u.issues).toEqual([]);
    expect(u.ratesWithoutUncertainty).toEqual([]);
    expect(u.lambda.lower).toBeLessThan(res.body.lambda);
    expect(u.lambda.upper).toBeGreaterThan(res.body.lambda);
    expect(u.contributions.find((c: { name: string }) => c.name === "s_j").source).toBe("counts");
  }
});

it("queues the demo Monte Carlo run once, and the real worker finishes it", async () => {
  const { studyId } = await seedDemo(server.db);
  const jobs = createJobSender(server.databaseUrl);
  const worker = startWorker(server.databaseUrl);
  try {
    expect(await seedDemoUncertaintyRun(server.db, jobs, studyId)).toBe(true);
    expect(await seedDemoUncertaintyRun(server.db, jobs, studyId)).toBe(false);
    const [run] = await server.db.select().from(runs).where(eq(runs.kind, "uncertainty"));
    const until = Date.now() + 120_000;
    let row = run!;
    while (row.status !== "succeeded" && row.status !== "failed" && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 250));
      row = (await server.db.select().from(runs).where(and(eq(runs.id, run!.id))))[0]!;
    }
    expect(row.status).toBe("succeeded");
    expect((row.result as { draws: number }).draws).toBe(10_000);
  } finally {
    await worker.stop();
    await jobs.stop();
  }
}, 180_000);
