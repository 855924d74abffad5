import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { passwordResets, users } from "../../server/db/schema";
import { browserAgent, signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

describe("sign-up, sign-in and sign-out", () => {
  it("signs up, stores an argon2id hash, and keeps the session", async () => {
    const a = await signUpAgent(server, { email: "Ada.Fen@Example.org" });
    const me = await a.get("/api/v1/auth/session");
    expect(me.body.user).toMatchObject({ name: a.user.name, email: "ada.fen@example.org" });
    const [row] = await server.db.select().from(users).where(eq(users.email, "ada.fen@example.org"));
    expect(row!.passwordHash).toMatch(/^\$argon2id\$/);
    expect(row!.passwordHash).not.toContain(a.user.password);
  });

  it("rejects a short password and a bad e-mail, naming the fields", async () => {
    const a = await browserAgent(server);
    const res = await a.post("/api/v1/auth/sign-up", { name: "X", email: "not-an-email", password: "short" });
    expect(res.status).toBe(400);
    const paths = res.body.error.fields.map((f: { path: string }) => f.path).sort();
    expect(paths).toEqual(["email", "password"]);
  });

  it("gives the same answer for an unknown e-mail and a wrong password", async () => {
    const a = await signUpAgent(server);
    const anon = await browserAgent(server);
    const wrong = await anon.post("/api/v1/auth/sign-in", { email: a.user.email, password: "not the password" });
    const unknown = await anon.post("/api/v1/auth/sign-in", { email: "nobody@example.org", password: "not the password" });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
  });

  it("regenerates the session id at sign-in and ends it at sign-out", async () => {
    const a = await signUpAgent(server);
    const b = await browserAgent(server);
    await b.get("/api/v1/auth/session");
    const before = b.agent.jar.getCookie("sw_session", { path: "/", domain: "127.0.0.1", secure: false, script: false })?.value;
    const res = await b.post("/api/v1/auth/sign-in", { email: a.user.email, password: a.user.password });
    expect(res.status).toBe(200);
    const setCookie = (res.headers["set-cookie"] as unknown as string[]).find((c) => c.startsWith("sw_session="));
    expect(setCookie).toBeDefined();
    expect(setCookie).not.toContain(`sw_session=${before}`);
    expect((await b.get("/api/v1/auth/session")).body.user.email).toBe(a.user.email);
    expect((await b.post("/api/v1/auth/sign-out")).status).toBe(204);
    expect((await b.get("/api/v1/auth/session")).body.user).toBeNull();
    expect((await b.get("/api/v1/studies")).status).toBe(401);
  });

  it("refuses a write without the CSRF token", async () => {
    const a = await signUpAgent(server);
    const res = await a.agent.post("/api/v1/studies").send({ name: "No token" });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("csrf");
  });

  it("answers malformed JSON and unknown API routes with JSON 4xx", async () => {
    const a = await browserAgent(server);
    const bad = await a.agent.post("/api/v1/auth/sign-in").set("X-CSRF-Token", a.csrf).set("Content-Type", "application/json").send("{not json");
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/not valid JSON/);
    const missing = await a.get("/api/v1/no-such-thing");
    expect(missing.status).toBe(404);
    expect(missing.body.error.code).toBe("not_found");
  });
});

describe("password reset", () => {
  it("resets through the e-mailed single-use link", async () => {
    const a = await signUpAgent(server);
    const anon = await browserAgent(server);
    const req = await anon.post("/api/v1/auth/password-reset/request", { email: a.user.email });
    expect(req.status).toBe(202);
    const unknown = await anon.post("/api/v1/auth/password-reset/request", { email: "nobody@example.org" });
    expect(unknown.status).toBe(202);
    expect(unknown.body).toEqual(req.body);

    const mail = await server.mailTo(a.user.email, 5000, /Reset your Stagewright password/);
    const link = mail.links.find((l) => l.includes("/reset-password?token="))!;
    expect(link.startsWith(server.url)).toBe(true);
    const token = new URL(link).searchParams.get("token")!;
    // Only the hash is stored.
    const stored = await server.db.select().from(passwordResets);
    expect(stored.some((r) => r.tokenHash === token)).toBe(false);

    const ok = await anon.post("/api/v1/auth/password-reset/confirm", { token, password: "a brand new password" });
    expect(ok.status).toBe(204);
    const again = await anon.post("/api/v1/auth/password-reset/confirm", { token, password: "yet another password" });
    expect(again.status).toBe(400);
    expect((await anon.post("/api/v1/auth/sign-in", { email: a.user.email, password: a.user.password })).status).toBe(401);
    expect((await anon.post("/api/v1/auth/sign-in", { email: a.user.email, password: "a brand new password" })).status).toBe(200);
  });

  it("refuses an expired link", async () => {
    const a = await signUpAgent(server);
    const anon = await browserAgent(server);
    await anon.post("/api/v1/auth/password-reset/request", { email: a.user.email });
    const token = new URL((await server.mailTo(a.user.email, 5000, /Reset your/)).links.find((l) => l.includes("token="))!).searchParams.get("token")!;
    await server.db.update(passwordResets).set({ expiresAt: new Date(Date.now() - 1000) });
    const res = await anon.post("/api/v1/auth/password-reset/confirm", { token, password: "a brand new password" });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/expired/);
  });
});

describe("rate limit", () => {
  it("limits repeated sign-in attempts for one address", async () => {
    const limited = await startTestServer({ authRateLimit: { windowMs: 60_000, max: 3 } });
    try {
      const anon = await browserAgent(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) {
        statuses.push((await anon.post("/api/v1/auth/sign-in", { email: "victim@example.org", password: "guess" + i })).status);
      }
      expect(statuses).toEqual([401, 401, 401, 429, 429]);
    } finally {
      await limited.close();
    }
  });
});
