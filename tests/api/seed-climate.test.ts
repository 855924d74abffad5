import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, expect, it } from "vitest";
import { EDGE_TOLERANCE, lambdaCurve, thermalModel } from "../../shared/climate";
import { upgradeLifeCycle } from "../../shared/lifecycle";
import { auditEvents, lifeCycles, runs } from "../../server/db/schema";
import { createJobSender } from "../../server/runs/queue";
import { seedDemo } from "../../server/seed";
import { seedDemoClimate } from "../../server/seed/climate";
import { startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

it("gives the demo newt thermal responses on several rates and a warming trajectory once, and the worker finishes its warming Run", async () => {
  const { studyId } = await seedDemo(server.db);
  const jobs = createJobSender(server.databaseUrl);
  const worker = startWorker(server.databaseUrl);
  try {
    expect(await seedDemoClimate(server.db, jobs, studyId)).toBe(true);
    expect(await seedDemoClimate(server.db, jobs, studyId)).toBe(false);
    const [lc] = await server.db.select().from(lifeCycles).where(and(eq(lifeCycles.studyId, studyId), eq(lifeCycles.name, "Brannock Fen newts")));
    const doc = upgradeLifeCycle(lc!.document);
    expect(doc.rates.filter((r) => r.thermal).map((r) => r.name)).toEqual(["s_e", "s_j", "m"]);
    expect(doc.climate?.trajectory?.kind).toBe("trend");
    // The demo's window has both edges inside its range, at λ = 1.
    const model = thermalModel(doc);
    const curve = lambdaCurve(model, { ...doc.climate!.range!, points: 200 });
    expect(curve.window).toHaveLength(1);
    for (const e of [curve.window[0]!.lower!, curve.window[0]!.upper!]) expect(Math.abs(model.lambdaAt(e.temperature) - 1)).toBeLessThanOrEqual(EDGE_TOLERANCE);
    const events = await server.db.select().from(auditEvents).where(eq(auditEvents.studyId, studyId));
    expect(events.some((e) => e.action === "life_cycle.updated")).toBe(true);

    const [run] = await server.db.select().from(runs).where(eq(runs.kind, "warming"));
    const until = Date.now() + 240_000;
    let row = run!;
    while (row.status !== "succeeded" && row.status !== "failed" && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 250));
      row = (await server.db.select().from(runs).where(eq(runs.id, run!.id)))[0]!;
    }
    expect(row.status).toBe("succeeded");
    const result = row.result as { replicates: number; deterministic: { firstYearBelowOne: number | null } };
    expect(result.replicates).toBe(1000);
    expect(result.deterministic.firstYearBelowOne).toBe(2112);
  } finally {
    await worker.stop();
    await jobs.stop();
  }
}, 300_000);
