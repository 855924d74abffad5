import { eq } from "drizzle-orm";
import supertest from "supertest";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens } from "../../server/db/schema";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
let owner: Awaited<ReturnType<typeof signUpAgent>>;
let studyId: string;

beforeAll(async () => {
  server = await startTestServer();
  owner = await signUpAgent(server);
  studyId = (await owner.post("/api/v1/studies", { name: "Token Study" })).body.id;
});
afterAll(async () => {
  await server?.close();
});

async function mint(body: object) {
  const res = await owner.post("/api/v1/account/tokens", body);
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body as { id: string; token: string; scope: string; expiresAt: string | null };
}
const as = (token: string) => ({
  get: (p: string) => supertest(server.app).get(`/api/v1${p}`).set("Authorization", `Bearer ${token}`),
  post: (p: string, body: object = {}) => supertest(server.app).post(`/api/v1${p}`).set("Authorization", `Bearer ${token}`).send(body),
  put: (p: string, body: object) => supertest(server.app).put(`/api/v1${p}`).set("Authorization", `Bearer ${token}`).send(body),
  delete: (p: string) => supertest(server.app).delete(`/api/v1${p}`).set("Authorization", `Bearer ${token}`),
});

describe("API tokens: scope", () => {
  it("a new token is read-only with a 90-day life unless asked otherwise", async () => {
    const t = await mint({ name: "defaults" });
    expect(t.scope).toBe("read");
    const days = (new Date(t.expiresAt!).getTime() - Date.now()) / 86_400_000;
    expect(days).toBeGreaterThan(89.9);
    expect(days).toBeLessThanOrEqual(90);
    const listed = (await owner.get("/api/v1/account/tokens")).body.find((x: { id: string }) => x.id === t.id);
    expect(listed).toMatchObject({ scope: "read", expiresAt: t.expiresAt });
    expect(listed).not.toHaveProperty("token");
  });

  it("a read token reads and analyses, and gets 403 on every write", async () => {
    const { token } = await mint({ name: "reader", scope: "read", expiresInDays: 7 });
    const c = as(token);
    expect((await c.get("/studies")).status).toBe(200);
    expect((await c.get(`/studies/${studyId}`)).status).toBe(200);
    expect((await c.post("/analyze", { matrix: [[0.5, 1.2], [0.4, 0.8]] })).status).toBe(200);
    const lc = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle() });
    for (const res of [
      await c.post("/studies", { name: "Nope" }),
      await c.post(`/studies/${studyId}/life-cycles`, { name: "Nope" }),
      await c.put(`/life-cycles/${lc.body.id}`, { version: 1, document: threeStageLifeCycle({ name: "Changed" }) }),
      await c.delete(`/life-cycles/${lc.body.id}`),
    ]) {
      expect(res.status).toBe(403);
      expect(res.body.error.message).toMatch(/may only read/);
    }
    expect((await owner.get(`/api/v1/life-cycles/${lc.body.id}`)).body).toMatchObject({ version: 1, name: "Three-stage test" });
  });

  it("a read-write token writes what its owner's roles allow", async () => {
    const { token } = await mint({ name: "writer", scope: "read-write", expiresInDays: null });
    const res = await as(token).post("/studies", { name: "Made by a script" });
    expect(res.status).toBe(201);
  });

  it("no token mints or revokes tokens, changes the password, or signs in, up or out", async () => {
    const { token, id } = await mint({ name: "writer 2", scope: "read-write", expiresInDays: 1 });
    const c = as(token);
    for (const res of [
      await c.post("/account/tokens", { name: "child", scope: "read-write", expiresInDays: null }),
      await c.delete(`/account/tokens/${id}`),
      await c.post("/account/password", { currentPassword: "correct horse battery", newPassword: "another long password" }),
      // Token requests carry no session to sign in to or out of.
      await c.post("/auth/sign-in", { email: "someone@example.org", password: "correct horse battery" }),
      await c.post("/auth/sign-out", {}),
      await c.post("/auth/sign-up", { email: "new-by-token@example.org", name: "New", password: "correct horse battery" }),
      await c.post("/auth/sign-up/confirm", { token: "x".repeat(43) }),
    ]) {
      expect(res.status).toBe(403);
      expect(res.body.error.message).toMatch(/not with an API token/);
    }
  });
});

describe("API tokens: expiry and revocation", () => {
  it("an expired token gets 401 saying it expired", async () => {
    const { token, id } = await mint({ name: "short", scope: "read", expiresInDays: 1 });
    expect((await as(token).get("/studies")).status).toBe(200);
    await server.db.update(apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(apiTokens.id, id));
    const res = await as(token).get("/studies");
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/expired on \d{4}-\d{2}-\d{2}/);
  });

  it("a revoked token gets 401 saying it was revoked", async () => {
    const { token, id } = await mint({ name: "to revoke", scope: "read-write", expiresInDays: 30 });
    expect((await owner.delete(`/api/v1/account/tokens/${id}`)).status).toBe(204);
    const res = await as(token).get("/studies");
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/revoked/);
    expect((await owner.get("/api/v1/account/tokens")).body.map((x: { id: string }) => x.id)).not.toContain(id);
  });

  it("an unknown or malformed token gets 401", async () => {
    expect((await as("sw_not-a-real-token").get("/studies")).status).toBe(401);
    const res = await supertest(server.app).get("/api/v1/studies").set("Authorization", "Token abc");
    expect(res.status).toBe(401);
    expect(res.body.error.message).toMatch(/Bearer/);
  });
});

describe("API tokens: bad input names the field", () => {
  it.each([
    [{ name: "x", scope: "admin" }, "scope"],
    [{ name: "x", expiresInDays: 0 }, "expiresInDays"],
    [{ name: "x", expiresInDays: 400 }, "expiresInDays"],
    [{ name: "x", expiresInDays: 1.5 }, "expiresInDays"],
    [{ name: " " }, "name"],
  ])("%j → 400 on %s", async (body, field) => {
    const res = await owner.post("/api/v1/account/tokens", body);
    expect(res.status).toBe(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path)).toContain(field);
  });
});
