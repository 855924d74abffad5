// Concurrent saves to one life cycle (optimistic concurrency, DESIGN.md §4):
// writers save as fast as they can, each with the version it last saw, while
// readers read. Every save lands (200) or is refused as stale (409, with the
// current state); the landed versions run 2, 3, 4… without gaps or repeats;
// every read shows exactly one landed save; the final state is the last
// landed save, with one activity row per landed save. bench/load.ts times the
// same scenario for 30 s.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, expect, it } from "vitest";
import type { LifeCycle } from "../../shared/lifecycle";
import { auditEvents, lifeCycles } from "../../server/db/schema";
import { createApiToken } from "../../server/services/api-tokens";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

const WRITERS = 8;
const SAVES_PER_WRITER = 15;

it(`${WRITERS} writers × ${SAVES_PER_WRITER} saves of one life cycle, with readers: each save lands or gets 409, and the last landed save is what is stored`, async () => {
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Concurrency" })).body.id as string;
  const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "start" }) });
  const id = created.body.id as string;
  const { token } = await createApiToken(server.db, owner.user.id, "writers");
  const headers = { authorization: `Bearer ${token}`, "content-type": "application/json" };

  const landed = new Map<number, string>([[1, "start"]]);
  const outcomes: number[] = [];
  const reads: { version: number; name: string }[] = [];
  let writing = true;

  const writer = async (w: number) => {
    let version = 1;
    for (let k = 0; k < SAVES_PER_WRITER; k++) {
      const name = `writer ${w} save ${k}`;
      // Vary the document too, so a mixed-up save would show in more than the name.
      const document = threeStageLifeCycle({ name, rates: threeStageLifeCycle().rates.map((r) => (r.name === "f" ? { ...r, value: 1 + w + k / 100 } : r)) });
      const res = await fetch(`${server.url}/api/v1/life-cycles/${id}`, { method: "PUT", headers, body: JSON.stringify({ version, document }) });
      const body = await res.json();
      outcomes.push(res.status);
      if (res.status === 200) {
        expect(landed.has(body.version)).toBe(false);
        landed.set(body.version, name);
        version = body.version;
      } else if (res.status === 409) {
        expect(body.error.code).toBe("conflict");
        expect(body.current.version).toBeGreaterThan(version);
        version = body.current.version;
      }
    }
  };
  const reader = async () => {
    while (writing) {
      const res = await fetch(`${server.url}/api/v1/life-cycles/${id}`, { headers });
      expect(res.status).toBe(200);
      const body = await res.json();
      reads.push({ version: body.version, name: body.document.name });
    }
  };
  const readers = [reader(), reader()];
  await Promise.all(Array.from({ length: WRITERS }, (_, w) => writer(w)));
  writing = false;
  await Promise.all(readers);

  expect(outcomes.filter((s) => s !== 200 && s !== 409)).toEqual([]);
  const versions = [...landed.keys()].sort((a, b) => a - b);
  expect(versions).toEqual(versions.map((_, i) => i + 1));
  expect(versions.length).toBeGreaterThan(WRITERS);
  // Every read showed one landed save, whole: its version and its document belong together.
  for (const r of reads) expect(landed.get(r.version)).toBe(r.name);

  const last = versions[versions.length - 1]!;
  const [stored] = await server.db.select().from(lifeCycles).where(eq(lifeCycles.id, id));
  expect(stored!.version).toBe(last);
  expect((stored!.document as LifeCycle).name).toBe(landed.get(last));
  const events = (await server.db.select().from(auditEvents).where(eq(auditEvents.action, "life_cycle.updated"))).filter((e) => (e.details as { lifeCycleId: string }).lifeCycleId === id);
  expect(events.length).toBe(versions.length - 1);
  expect(events.map((e) => (e.details as { version: number }).version).sort((a, b) => a - b)).toEqual(versions.slice(1));
});
