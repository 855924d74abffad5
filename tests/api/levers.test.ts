import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyzeMatrix } from "../../shared/demography";
import { buildMatrices, type LifeCycle } from "../../shared/lifecycle";
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

const lambdaOf = (doc: LifeCycle) => analyzeMatrix({ A: buildMatrices(doc).A }).lambda;
const withScenarios = (scenarios: unknown[]) => ({ ...threeStageLifeCycle(), scenarios });

describe("POST /api/v1/levers", () => {
  it("ranks levers, compares scenarios and finds break-even values (session and Bearer token alike)", async () => {
    const agent = await signUpAgent(server);
    const doc = threeStageLifeCycle();
    const res = await agent.post("/api/v1/levers", { document: doc, relativeChange: 0.2 });
    expect(res.status).toBe(200);
    expect(res.body.ranking.relativeChange).toBe(0.2);
    const sj = res.body.ranking.rows.find((r: { rateId?: string }) => r.rateId === "vr_sj");
    const changed = { ...doc, rates: doc.rates.map((r) => (r.id === "vr_sj" ? { ...r, value: 0.36 } : r)) };
    expect(Math.abs(sj.increase.deltaLambda - (lambdaOf(changed) - lambdaOf(doc)))).toBeLessThan(1e-12);
    expect(res.body.comparison.rows).toHaveLength(1);
    expect(res.body.breakEven.target).toBe(1);
    expect(res.body.breakEven.rows.length).toBe(5);

    const token = await createApiToken(server.db, agent.user.id, "script");
    const viaToken = await supertest(server.app).post("/api/v1/levers").set("Authorization", `Bearer ${token.token}`).send({ document: doc, breakEven: false });
    expect(viaToken.status).toBe(200);
    expect(viaToken.body.breakEven).toBeNull();
  });

  it("compares the document's scenarios, and a stored life cycle keeps them", async () => {
    const agent = await signUpAgent(server);
    const scenarios = [
      { id: "sc_a", name: "Protect adults", action: "Close the road in spring", cost: 4, changes: [{ id: "ch_a", target: { kind: "rate", rateId: "vr_sa" }, op: "set", value: 0.9, achievable: 0.93 }] },
      { id: "sc_j", name: "Head-start", changes: [{ id: "ch_j", target: { kind: "entry", from: "st_j", to: "st_s" }, op: "multiply", value: 1.5 }] },
    ];
    const doc = withScenarios(scenarios);
    const res = await agent.post("/api/v1/levers", { document: doc, breakEven: false });
    expect(res.status).toBe(200);
    const rows = res.body.comparison.rows as { name: string; planned: { lambda: number }; deltaLambdaPerCost: number | null }[];
    expect(rows.map((r) => r.name)).toEqual(["Baseline", "Protect adults", "Head-start"]);
    const adults = { ...threeStageLifeCycle(), rates: threeStageLifeCycle().rates.map((r) => (r.id === "vr_sa" ? { ...r, value: 0.9 } : r)) };
    expect(Math.abs(rows[1]!.planned.lambda - lambdaOf(adults))).toBeLessThan(1e-12);
    expect(rows[1]!.deltaLambdaPerCost).toBeCloseTo((rows[1]!.planned.lambda - rows[0]!.planned.lambda) / 4, 12);
    const sa = res.body.ranking.rows.find((r: { rateId?: string }) => r.rateId === "vr_sa");
    expect(sa.achievable).toMatchObject({ scenarioName: "Protect adults", to: 0.93 });

    const studyId = (await agent.post("/api/v1/studies", { name: "Levers" })).body.id as string;
    const created = await agent.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc });
    expect(created.status).toBe(201);
    const snap = await agent.post(`/api/v1/life-cycles/${created.body.id}/snapshots`, { message: "With scenarios" });
    expect(snap.status).toBe(201);
    const stored = await agent.get(`/api/v1/snapshots/${snap.body.id}`);
    expect(stored.body.document.scenarios).toEqual(scenarios);
  });

  it("refuses a saved scenario that takes a probability above 1, naming the rate, the bound and the field", async () => {
    const agent = await signUpAgent(server);
    const studyId = (await agent.post("/api/v1/studies", { name: "Levers" })).body.id as string;
    const created = await agent.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle() });
    const bad = withScenarios([{ id: "sc_a", name: "Too much", changes: [{ id: "ch_a", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.5 }] }]);
    const res = await agent.put(`/api/v1/life-cycles/${created.body.id}`, { version: created.body.version, document: bad });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual([{ path: "document.scenarios.0.changes.0.value", message: 'Scenario "Too much" takes s_a to 1.275, above its upper bound 1 (it is a probability).' }]);
    const ghost = withScenarios([{ id: "sc_g", name: "Ghost", changes: [{ id: "ch_g", target: { kind: "rate", rateId: "vr_nope" }, op: "set", value: 0.5 }] }]);
    const res2 = await agent.post("/api/v1/levers", { document: ghost });
    expect(res2.status).toBe(400);
    expect(res2.body.error.fields[0]).toEqual({ path: "document.scenarios.0.changes.0.target.rateId", message: 'Scenario "Ghost" changes a vital rate that does not exist (id "vr_nope").' });
    const still = await agent.get(`/api/v1/life-cycles/${created.body.id}`);
    expect(still.body.document.scenarios).toBeUndefined();
  });

  it("refuses bad input with a 400 naming the field", async () => {
    const agent = await signUpAgent(server);
    const zero = await agent.post("/api/v1/levers", { document: threeStageLifeCycle(), relativeChange: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.fields[0].path).toBe("relativeChange");
    const empty = await agent.post("/api/v1/levers", { document: { ...threeStageLifeCycle(), stages: [], transitions: [] } });
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toMatch(/no stages/);
    const noDoc = await agent.post("/api/v1/levers", {});
    expect(noDoc.status).toBe(400);
  });
});

describe("POST /api/v1/ltre", () => {
  it("decomposes the difference between two life cycles", async () => {
    const agent = await signUpAgent(server);
    const reference = threeStageLifeCycle();
    const comparison = { ...reference, name: "Treated", rates: reference.rates.map((r) => (r.id === "vr_sa" ? { ...r, value: 0.8 } : r)) };
    const res = await agent.post("/api/v1/ltre", { reference, comparison });
    expect(res.status).toBe(200);
    expect(Math.abs(res.body.deltaLambda - (lambdaOf(comparison) - lambdaOf(reference)))).toBeLessThan(1e-12);
    expect(Math.abs(res.body.total - res.body.deltaLambda) / Math.abs(res.body.deltaLambda)).toBeLessThan(0.01);
    expect(res.body.rates.map((r: { name: string }) => r.name)).toEqual(["s_j", "s_s", "g", "s_a", "f"]);
  });

  it("lists the stages that differ", async () => {
    const agent = await signUpAgent(server);
    const reference = threeStageLifeCycle();
    const comparison = { ...reference, stages: reference.stages.map((s) => (s.id === "st_a" ? { ...s, name: "Breeder" } : s)) };
    const res = await agent.post("/api/v1/ltre", { reference, comparison });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('An LTRE compares life cycles with the same stages, and these differ — only in "Three-stage test": Adult; only in "Three-stage test": Breeder. Rename or add stages so both have the same set.');
    expect(res.body.error.fields[0].path).toBe("comparison.stages");
  });
});
