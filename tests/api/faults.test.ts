// Faults: the web server killed with SIGKILL inside a multi-table save (at a
// test-only crash point, server/testing/fault-point.ts), and PostgreSQL
// stopped and restarted under load. Killing a worker mid-run is tested with
// the Runs (tests/api/runs.test.ts, "survives kill -9 of the worker").
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, lifeCycles, memberships, snapshots, studies, users } from "../../server/db/schema";
import { connect } from "../../server/db/client";
import { createApiToken } from "../../server/services/api-tokens";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { createTestDatabase } from "../helpers/db";
import { freePort, startWebProcess, type WebProcess } from "../helpers/web-process";

const running: WebProcess[] = [];
async function web(databaseUrl: string, env: Record<string, string> = {}) {
  const w = await startWebProcess(databaseUrl, env);
  running.push(w);
  return w;
}
afterAll(async () => {
  await Promise.all(running.map((w) => w.stop()));
});

async function seed(db: ReturnType<typeof connect>["db"]) {
  const [user] = await db.insert(users).values({ email: `fault-${Date.now()}@example.org`, name: "Fault Tester", passwordHash: "x" }).returning();
  const [study] = await db.insert(studies).values({ name: "Faults", createdBy: user!.id }).returning();
  await db.insert(memberships).values({ studyId: study!.id, userId: user!.id, role: "owner" });
  const document = threeStageLifeCycle();
  const [lc] = await db.insert(lifeCycles).values({ studyId: study!.id, name: document.name, document, schemaVersion: 1 }).returning();
  const [snap] = await db
    .insert(snapshots)
    .values({ lifeCycleId: lc!.id, number: 1, message: "first", document: threeStageLifeCycle({ name: "From the snapshot" }), schemaVersion: 1, lifeCycleVersion: 1 })
    .returning();
  const { token } = await createApiToken(db, user!.id, "faults");
  return { lifeCycleId: lc!.id, snapshotId: snap!.id, token };
}

const json = (token: string) => ({ authorization: `Bearer ${token}`, "content-type": "application/json" });

// Each test starts the real server one to three times (a few seconds each on a busy machine).
const PROCESS_TEST_MS = 180_000;

describe("kill -9 of the web server inside a save's transaction", () => {
  let database: Awaited<ReturnType<typeof createTestDatabase>>;
  beforeAll(async () => {
    database = await createTestDatabase();
  });
  afterAll(async () => {
    await database?.drop();
  });

  async function state(lifeCycleId: string) {
    const [lc] = await database.db.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId));
    const events = await database.db.select().from(auditEvents).where(eq(auditEvents.action, "life_cycle.updated"));
    const snaps = await database.db.select().from(snapshots).where(eq(snapshots.lifeCycleId, lifeCycleId));
    return { version: lc!.version, name: (lc!.document as { name: string }).name, updates: events.filter((e) => (e.details as { lifeCycleId?: string }).lifeCycleId === lifeCycleId).length, snapshots: snaps.length };
  }

  /** Sends the request to a server that dies at `fault`; the request never gets an answer. */
  async function crashDuring(fault: string, send: (w: WebProcess) => Promise<Response>) {
    const w = await web(database.url, { STAGEWRIGHT_FAULT: fault });
    await expect(send(w)).rejects.toThrow();
    expect(await w.exited).toBe("SIGKILL");
  }

  it("killed after the life cycle row is updated but before its activity row: after restart the save is wholly absent, and the row is not left locked", async () => {
    const { lifeCycleId, token } = await seed(database.db);
    const save = (w: WebProcess, version = 1) =>
      fetch(`${w.url}/api/v1/life-cycles/${lifeCycleId}`, { method: "PUT", headers: json(token), body: JSON.stringify({ version, document: threeStageLifeCycle({ name: "Lost save" }) }), signal: AbortSignal.timeout(20_000) });
    await crashDuring("life-cycle-save:mid-transaction", (w) => save(w));
    expect(await state(lifeCycleId)).toEqual({ version: 1, name: "Three-stage test", updates: 0, snapshots: 1 });
    // PostgreSQL rolled the dead connection's transaction back: a new server saves at version 1 at once.
    const again = await web(database.url);
    const res = await save(again);
    expect(res.status).toBe(200);
    expect(await state(lifeCycleId)).toEqual({ version: 2, name: "Lost save", updates: 1, snapshots: 1 });
  }, PROCESS_TEST_MS);

  it("killed after the commit, before answering: after restart the save is wholly present (row and activity)", async () => {
    const { lifeCycleId, token } = await seed(database.db);
    await crashDuring("life-cycle-save:after-commit", (w) =>
      fetch(`${w.url}/api/v1/life-cycles/${lifeCycleId}`, { method: "PUT", headers: json(token), body: JSON.stringify({ version: 1, document: threeStageLifeCycle({ name: "Committed save" }) }), signal: AbortSignal.timeout(20_000) }),
    );
    expect(await state(lifeCycleId)).toEqual({ version: 2, name: "Committed save", updates: 1, snapshots: 1 });
    // The client that never heard back retries with its old version and is told what happened.
    const w = await web(database.url);
    const retry = await fetch(`${w.url}/api/v1/life-cycles/${lifeCycleId}`, { method: "PUT", headers: json(token), body: JSON.stringify({ version: 1, document: threeStageLifeCycle({ name: "Committed save" }) }) });
    expect(retry.status).toBe(409);
    expect((await retry.json()).current.version).toBe(2);
  }, PROCESS_TEST_MS);

  it("killed in a snapshot restore between the life cycle (and its activity row) and the new snapshot: nothing of the restore remains", async () => {
    const { lifeCycleId, snapshotId, token } = await seed(database.db);
    await crashDuring("snapshot-restore:mid-transaction", (w) =>
      fetch(`${w.url}/api/v1/life-cycles/${lifeCycleId}/snapshots/${snapshotId}/restore`, { method: "POST", headers: json(token), body: JSON.stringify({ version: 1 }), signal: AbortSignal.timeout(20_000) }),
    );
    expect(await state(lifeCycleId)).toEqual({ version: 1, name: "Three-stage test", updates: 0, snapshots: 1 });
    const restored = await database.db.select().from(auditEvents).where(and(eq(auditEvents.action, "snapshot.created")));
    expect(restored).toEqual([]);
  }, PROCESS_TEST_MS);
});

/** The parts of scripts/lib/setup.mjs (dependency-free, untyped) used here. */
interface SetupHelpers {
  ensurePostgres(): string;
  startCluster(bin: string, name: string, port: number, options?: { durable?: boolean }): { stop: () => void };
  stopCluster(bin: string, name: string): boolean;
  ensureDatabase(bin: string, port: number, name: string, options?: { fresh?: boolean }): string;
}

describe("PostgreSQL stopped and restarted under load", () => {
  // A cluster of this test's own: stopping the shared test cluster would break the other test files.
  const name = `${process.env.STAGEWRIGHT_TEST_CLUSTER ?? "pg-test"}-faults`;
  let setup: SetupHelpers;
  let bin: string;
  let port: number;
  let databaseUrl: string;
  beforeAll(async () => {
    setup = (await import(path.resolve("scripts/lib/setup.mjs"))) as SetupHelpers;
    bin = setup.ensurePostgres();
    port = await freePort();
    setup.startCluster(bin, name, port, { durable: false });
    databaseUrl = setup.ensureDatabase(bin, port, "stagewright", { fresh: true });
    const { runMigrations } = await import("../../server/db/migrate");
    await runMigrations(databaseUrl);
  }, 120_000);
  afterAll(() => {
    setup?.stopCluster(bin, name);
  });

  it("answers 503 (never 500, never hangs) while the database is down, and recovers by itself when it is back", async () => {
    const database = connect(databaseUrl, { max: 2 });
    const { lifeCycleId, token } = await seed(database.db);
    await database.pool.end();
    const w = await web(databaseUrl);

    type Sample = { at: number; phase: string; status: number; ms: number };
    const samples: Sample[] = [];
    let phase = "up";
    let stop = false;
    const paths = [`/api/v1/life-cycles/${lifeCycleId}`, "/api/v1/health", "/api/v1/studies"];
    const loop = async (k: number) => {
      for (let i = 0; !stop; i++) {
        const started = Date.now();
        const p = phase;
        let status = 0;
        try {
          const res = await fetch(`${w.url}${paths[(i + k) % paths.length]}`, { headers: { authorization: `Bearer ${token}` }, signal: AbortSignal.timeout(10_000) });
          await res.arrayBuffer();
          status = res.status;
        } catch {
          status = -1; // no answer within 10 s, or the connection failed
        }
        samples.push({ at: started, phase: p, status, ms: Date.now() - started });
        await new Promise((r) => setTimeout(r, 20));
      }
    };
    const loops = [0, 1, 2, 3].map(loop);
    const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
    await sleep(1500);
    phase = "stopping";
    setup.stopCluster(bin, name);
    phase = "down";
    await sleep(3000);
    phase = "starting";
    setup.startCluster(bin, name, port, { durable: false });
    phase = "back";
    const backAt = Date.now();
    // Recovery: wait until every path answers 200 again (bounded).
    while (Date.now() - backAt < 30_000) {
      const recent = samples.filter((s) => s.at > Date.now() - 500);
      if (recent.length >= 6 && recent.every((s) => s.status === 200)) break;
      await sleep(100);
    }
    const recoveredAfter = Date.now() - backAt;
    stop = true;
    await Promise.all(loops);

    const count = (p: string, pred: (s: Sample) => boolean) => samples.filter((s) => s.phase === p && pred(s)).length;
    const summary = ["up", "stopping", "down", "starting", "back"].map((p) => `${p}: ${[...new Set(samples.filter((s) => s.phase === p).map((s) => s.status))].join(",")}`).join("; ");
    console.log(`PostgreSQL restart under load: ${samples.length} requests; statuses by phase ${summary}; all 200 again ${recoveredAfter} ms after the restart; slowest ${Math.max(...samples.map((s) => s.ms))} ms`);
    expect(count("up", (s) => s.status !== 200)).toBe(0);
    expect(count("down", () => true)).toBeGreaterThan(10);
    expect(count("down", (s) => s.status !== 503)).toBe(0);
    // Whatever the phase: never a 500, never a request without an answer.
    expect(samples.filter((s) => s.status === -1 || (s.status >= 500 && s.status !== 503))).toEqual([]);
    expect(recoveredAfter).toBeLessThan(30_000);
    const body = await (await fetch(`${w.url}/api/v1/health`)).json();
    expect(body).toEqual({ ok: true });
    expect(w.output()).not.toMatch(/500 on /);
  }, PROCESS_TEST_MS);
});
