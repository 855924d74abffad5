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
