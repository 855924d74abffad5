import { eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyzeMatrix } from "../../shared/demography";
import { auditEvents, lifeCycles, snapshots } from "../../server/db/schema";
import { createApiToken } from "../../server/services/api-tokens";
import { THREE_STAGE_MATRIX, threeStageLifeCycle } from "../factories/life-cycles";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

async function setup() {
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Life cycles" })).body.id as string;
  const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle() });
  expect(created.status).toBe(201);
  return { owner, studyId, lifeCycle: created.body };
}

describe("life cycles", () => {
  it("creates blank and imported life cycles and lists them", async () => {
    const { owner, studyId, lifeCycle } = await setup();
    expect(lifeCycle).toMatchObject({ name: "Three-stage test", version: 1, stageCount: 3 });
    expect(lifeCycle.document).toEqual(threeStageLifeCycle());
    const blank = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { name: "Blank one" });
    expect(blank.body.document).toMatchObject({ stagewright: 2, name: "Blank one", stages: [], transitions: [] });
    const list = await owner.get(`/api/v1/studies/${studyId}/life-cycles`);
    expect(list.body.map((l: { name: string }) => l.name).sort()).toEqual(["Blank one", "Three-stage test"]);
  });

  it("saves with the current version and refuses a stale one with 409 and the current state", async () => {
    const { owner, lifeCycle } = await setup();
    const doc = { ...lifeCycle.document, name: "Renamed" };
    const first = await owner.put(`/api/v1/life-cycles/${lifeCycle.id}`, { version: 1, document: doc });
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ version: 2, name: "Renamed" });
    const stale = await owner.put(`/api/v1/life-cycles/${lifeCycle.id}`, { version: 1, document: { ...doc, name: "Lost edit" } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/version 1.*version 2/);
    expect(stale.body.current).toMatchObject({ version: 2, name: "Renamed" });
    const [row] = await server.db.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycle.id));
    expect(row!.name).toBe("Renamed");
    const events = await server.db.select().from(auditEvents).where(eq(auditEvents.action, "life_cycle.updated"));
    expect(events.filter((e) => (e.details as { lifeCycleId: string }).lifeCycleId === lifeCycle.id)).toHaveLength(1);
  });

  it("rejects an invalid document with a 400 naming the field and keeps the saved one", async () => {
    const { owner, lifeCycle } = await setup();
    const bad = threeStageLifeCycle();
    bad.transitions[0]!.to = "st_missing";
    const res = await owner.put(`/api/v1/life-cycles/${lifeCycle.id}`, { version: 1, document: bad });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain("document.transitions.0.to");
    const future = await owner.put(`/api/v1/life-cycles/${lifeCycle.id}`, { version: 1, document: { ...lifeCycle.document, stagewright: 99 } });
    expect(future.status).toBe(400);
    expect(future.body.error.fields[0].path).toBe("document.stagewright");
    expect((await owner.get(`/api/v1/life-cycles/${lifeCycle.id}`)).body.version).toBe(1);
  });

  it("duplicates, deletes recoverably and restores", async () => {
    const { owner, studyId, lifeCycle } = await setup();
    const copy = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/duplicate`, {});
    expect(copy.status).toBe(201);
    expect(copy.body.name).toBe("Three-stage test (copy)");
    expect((await owner.delete(`/api/v1/life-cycles/${lifeCycle.id}`)).status).toBe(204);
    expect((await owner.get(`/api/v1/life-cycles/${lifeCycle.id}`)).status).toBe(404);
    const deleted = await owner.get(`/api/v1/studies/${studyId}/deleted-life-cycles`);
    expect(deleted.body).toEqual([expect.objectContaining({ id: lifeCycle.id, name: "Three-stage test" })]);
    expect((await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/undelete`)).status).toBe(200);
    expect((await owner.get(`/api/v1/life-cycles/${lifeCycle.id}`)).body.version).toBe(1);
  });
});

describe("snapshots", () => {
  it("takes numbered snapshots and restores one as a new snapshot", async () => {
    const { owner, lifeCycle } = await setup();
    const s1 = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/snapshots`, { message: "first rates" });
    expect(s1.status).toBe(201);
    expect(s1.body).toMatchObject({ number: 1, message: "first rates", lifeCycleVersion: 1 });
    const changed = threeStageLifeCycle({ name: "Changed" });
    changed.rates[4]!.value = 2.2;
    await owner.put(`/api/v1/life-cycles/${lifeCycle.id}`, { version: 1, document: changed });
    const restored = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/snapshots/${s1.body.id}/restore`, { version: 2 });
    expect(restored.status).toBe(200);
    expect(restored.body.lifeCycle).toMatchObject({ version: 3, name: "Three-stage test" });
    expect(restored.body.snapshot).toMatchObject({ number: 2, message: "Restored snapshot #1 (first rates)" });
    const list = await owner.get(`/api/v1/life-cycles/${lifeCycle.id}/snapshots`);
    expect(list.body.map((s: { number: number }) => s.number)).toEqual([2, 1]);
    expect((await owner.get(`/api/v1/snapshots/${s1.body.id}`)).body.document).toEqual(threeStageLifeCycle());
    const stale = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/snapshots/${s1.body.id}/restore`, { version: 2 });
    expect(stale.status).toBe(409);
  });

  it("reads and restores a snapshot stored in format version 1 as the current version", async () => {
    const { owner, lifeCycle } = await setup();
    const s1 = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/snapshots`, { message: "old format" });
    // Store it as an earlier build wrote it: version 1 had none of the version-2 fields.
    const old = { ...threeStageLifeCycle(), stagewright: 1 };
    await server.db.update(snapshots).set({ document: old, schemaVersion: 1 }).where(eq(snapshots.id, s1.body.id));
    await server.db.update(lifeCycles).set({ document: old, schemaVersion: 1 }).where(eq(lifeCycles.id, lifeCycle.id));
    const read = await owner.get(`/api/v1/snapshots/${s1.body.id}`);
    expect(read.body.document).toEqual(threeStageLifeCycle());
    expect((await owner.get(`/api/v1/life-cycles/${lifeCycle.id}`)).body.document.stagewright).toBe(2);
    const restored = await owner.post(`/api/v1/life-cycles/${lifeCycle.id}/snapshots/${s1.body.id}/restore`, { version: 1 });
    expect(restored.status).toBe(200);
    const [row] = await server.db.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycle.id));
    expect(row).toMatchObject({ schemaVersion: 2, document: threeStageLifeCycle() });
  });
});

describe("analysis", () => {
  it("analyses a stored life cycle, with vital-rate sensitivities", async () => {
    const { owner, lifeCycle } = await setup();
    const res = await owner.get(`/api/v1/life-cycles/${lifeCycle.id}/analysis`);
    expect(res.status).toBe(200);
    const expected = analyzeMatrix({ A: THREE_STAGE_MATRIX });
    expect(res.body.lambda).toBeCloseTo(expected.lambda, 12);
    expect(res.body.stageIds).toEqual(["st_j", "st_s", "st_a"]);
    expect(res.body.matrices.F).toEqual([[0, 0, 1.6], [0, 0, 0], [0, 0, 0]]);
    expect(res.body.lifeHistory).not.toBeNull();
    // ∂λ/∂f = s_13 (f enters only a_13).
    const f = res.body.vitalRates.find((v: { name: string }) => v.name === "f");
    expect(f.sensitivity).toBeCloseTo(res.body.sensitivity[0][2], 12);
  });

  it("answers 422 naming the arrow when a stored formula cannot be computed", async () => {
    const { owner, studyId } = await setup();
    const doc = threeStageLifeCycle({ name: "Broken" });
    doc.transitions[4]!.rate = "f / (s_a - 0.85)";
    const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc });
    const res = await owner.get(`/api/v1/life-cycles/${created.body.id}/analysis`);
    expect(res.status).toBe(422);
    expect(res.body.error.fields[0].path).toBe("document.transitions.4.rate");
  });
});

describe("POST /analyze", () => {
  async function bearer() {
    const a = await signUpAgent(server);
    const { token } = await createApiToken(server.db, a.user.id, "script");
    return (body: unknown) => supertest(server.app).post("/api/v1/analyze").set("Authorization", `Bearer ${token}`).send(body as object);
  }

  it("analyses a bare matrix for a script with a Bearer token", async () => {
    const post = await bearer();
    const res = await post({ matrix: THREE_STAGE_MATRIX, stages: ["J", "S", "A"], initial: [10, 5, 2] });
    expect(res.status).toBe(200);
    for (const key of ["lambda", "stableStage", "reproductiveValue", "sensitivity", "elasticity", "dampingRatio", "diagnostics"]) expect(res.body).toHaveProperty(key);
    expect(res.body.stableStage.reduce((a: number, b: number) => a + b, 0)).toBeCloseTo(1, 12);
    expect(res.body.projection).not.toBeNull();
  });

  it("analyses a life-cycle document", async () => {
    const post = await bearer();
    const res = await post({ document: threeStageLifeCycle() });
    expect(res.status).toBe(200);
    expect(res.body.vitalRates).toHaveLength(5);
  });

  it.each([
    ["non-square", { matrix: [[1, 2], [3]] }, "matrix.1"],
    ["empty", { matrix: [] }, "matrix"],
    ["ragged", { matrix: [[1, 2, 3], [1, 2], [1, 2, 3]] }, "matrix.1"],
    ["strings", { matrix: [["a", 1], [1, 1]] }, "matrix.0.0"],
    ["null (NaN in JSON)", { matrix: [[null, 1], [1, 1]] }, "matrix.0.0"],
    ["negative", { matrix: [[0.5, -1], [0.2, 0.3]] }, "matrix.0.1"],
    ["too many stages", { matrix: Array.from({ length: 501 }, () => [0]) }, "matrix"],
    ["wrong initial length", { matrix: [[0.5]], initial: [1, 2] }, "initial"],
    ["no body", undefined, "matrix"],
  ])("refuses a %s matrix with a 400 naming the field", async (_name, body, path) => {
    const post = await bearer();
    const res = await post(body);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain(path);
  });

  it("refuses a document whose formula divides by zero or names an unknown rate", async () => {
    const post = await bearer();
    const doc = threeStageLifeCycle();
    doc.transitions[0]!.rate = "s_j / (g - 0.4)";
    const div = await post({ document: doc });
    expect(div.status).toBe(400);
    expect(div.body.error.fields[0].path).toBe("document.transitions.0.rate");
    const unknown = threeStageLifeCycle();
    unknown.transitions[1]!.rate = "s_x * 2";
    const res = await post({ document: unknown });
    expect(res.status).toBe(400);
    expect(JSON.stringify(res.body.error)).toMatch(/s_x/);
  });

  it("reports an unsound but valid matrix as diagnostics, not an error", async () => {
    const post = await bearer();
    // Survival out of stage 2 is 1.3 (> 1) and the matrix is reducible.
    const res = await post({ matrix: [[0.2, 0], [0.5, 1.3]], fertility: [[0, 0], [0, 0]] });
    expect(res.status).toBe(200);
    expect(res.body.isSound).toBe(false);
    expect(res.body.diagnostics.length).toBeGreaterThan(0);
  });
});
