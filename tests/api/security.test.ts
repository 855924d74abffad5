// Security review, one check per claim: cookie flags, CSRF on every
// cookie-authenticated write (routes enumerated from the router), the
// Content-Security-Policy and the built client, rate limits, no user
// enumeration, revoked tokens, and body-size limits.
import fs from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens, signUpRequests, studies, users } from "../../server/db/schema";
import { hashPassword, verifyPassword } from "../../server/auth/secrets";
import { createApiToken, revokeApiToken } from "../../server/services/api-tokens";
import { isWrite, mountedRoutes, sessionHeaders } from "../helpers/routes";
import { browserAgent, signUpAgent, signUpToken, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

const ANY_ID = "00000000-0000-4000-8000-000000000000";
const fill = (p: string) => p.replace(/:(\w+)/g, ANY_ID);
const setCookies = (res: Response) => res.headers.getSetCookie();
const cookieNamed = (list: string[], name: string) => list.find((c) => c.startsWith(`${name}=`));

describe("cookies", () => {
  it("the session cookie is HttpOnly and SameSite=Lax, the CSRF cookie readable by the page but SameSite=Strict; neither Secure over plain HTTP", async () => {
    const a = await signUpAgent(server);
    const anon = await fetch(`${server.url}/api/v1/auth/session`);
    const csrfCookie = cookieNamed(setCookies(anon), "sw_csrf")!;
    const csrf = decodeURIComponent(csrfCookie.split(";")[0]!.slice("sw_csrf=".length));
    const res = await fetch(`${server.url}/api/v1/auth/sign-in`, {
      method: "POST",
      headers: { "content-type": "application/json", cookie: csrfCookie.split(";")[0]!, "x-csrf-token": csrf },
      body: JSON.stringify({ email: a.user.email, password: a.user.password }),
    });
    expect(res.status).toBe(200);
    const session = cookieNamed(setCookies(res), "sw_session")!;
    expect(session).toMatch(/;\s*HttpOnly/i);
    expect(session).toMatch(/;\s*SameSite=Lax/i);
    expect(session).toMatch(/;\s*Path=\//i);
    expect(session).toMatch(/;\s*Expires=/i);
    expect(session).not.toMatch(/;\s*Secure/i);
    expect(csrfCookie).toMatch(/;\s*SameSite=Strict/i);
    expect(csrfCookie).not.toMatch(/HttpOnly/i);
  });

  it("behind TLS (PUBLIC_URL https, the proxy on loopback saying X-Forwarded-Proto: https) both cookies are Secure", async () => {
    const tls = await startTestServer({ publicUrl: "https://stagewright.example.org" });
    try {
      const email = `tls-${Date.now()}@example.org`;
      const pre = await fetch(`${tls.url}/api/v1/auth/session`, { headers: { "x-forwarded-proto": "https" } });
      const csrfCookie = cookieNamed(setCookies(pre), "sw_csrf")!;
      expect(csrfCookie).toMatch(/;\s*Secure/i);
      expect(csrfCookie).toMatch(/;\s*SameSite=Strict/i);
      const csrf = decodeURIComponent(csrfCookie.split(";")[0]!.slice("sw_csrf=".length));
      const headers = { "content-type": "application/json", cookie: csrfCookie.split(";")[0]!, "x-csrf-token": csrf, "x-forwarded-proto": "https" };
      const up = await fetch(`${tls.url}/api/v1/auth/sign-up`, { method: "POST", headers, body: JSON.stringify({ name: "T", email, password: "long enough password" }) });
      expect(up.status).toBe(202);
      const confirm = await fetch(`${tls.url}/api/v1/auth/sign-up/confirm`, { method: "POST", headers, body: JSON.stringify({ token: await signUpToken(tls, email) }) });
      expect(confirm.status).toBe(201);
      const session = cookieNamed(setCookies(confirm), "sw_session")!;
      expect(session).toMatch(/;\s*Secure/i);
      expect(session).toMatch(/;\s*HttpOnly/i);
      expect(session).toMatch(/;\s*SameSite=Lax/i);
    } finally {
      await tls.close();
    }
  });
});

describe("cookies through a TLS proxy while PUBLIC_URL is left http", () => {
  it("a request that came over TLS (X-Forwarded-Proto: https from the proxy on loopback) gets both cookies Secure", async () => {
    const a = await signUpAgent(server);
    const tlsHeaders = { "x-forwarded-proto": "https" };
    const pre = await fetch(`${server.url}/api/v1/auth/session`, { headers: tlsHeaders });
    const csrfCookie = cookieNamed(setCookies(pre), "sw_csrf")!;
    expect(csrfCookie).toMatch(/;\s*Secure/i);
    const csrf = decodeURIComponent(csrfCookie.split(";")[0]!.slice("sw_csrf=".length));
    const res = await fetch(`${server.url}/api/v1/auth/sign-in`, {
      method: "POST",
      headers: { ...tlsHeaders, "content-type": "application/json", cookie: csrfCookie.split(";")[0]!, "x-csrf-token": csrf },
      body: JSON.stringify({ email: a.user.email, password: a.user.password }),
    });
    expect(res.status).toBe(200);
    expect(cookieNamed(setCookies(res), "sw_session")).toMatch(/;\s*Secure/i);
  });
});

describe("cookies behind TLS, reached over plain HTTP", () => {
  it("a server configured for https never sends the session cookie without Secure, even to a request that arrived over plain HTTP", async () => {
    const tls = await startTestServer({ publicUrl: "https://stagewright.example.org" });
    try {
      const a = { user: { email: `plain-${Date.now()}@example.org`, password: "long enough password" } };
      await tls.db.insert(users).values({ email: a.user.email, name: "Plain", passwordHash: await hashPassword(a.user.password) });
      // No X-Forwarded-Proto: the request did not come through the TLS proxy.
      const pre = await fetch(`${tls.url}/api/v1/auth/session`);
      const csrfCookie = cookieNamed(setCookies(pre), "sw_csrf")!;
      expect(csrfCookie).toMatch(/;\s*Secure/i);
      const csrf = decodeURIComponent(csrfCookie.split(";")[0]!.slice("sw_csrf=".length));
      const res = await fetch(`${tls.url}/api/v1/auth/sign-in`, {
        method: "POST",
        headers: { "content-type": "application/json", cookie: csrfCookie.split(";")[0]!, "x-csrf-token": csrf },
        body: JSON.stringify({ email: a.user.email, password: a.user.password }),
      });
      expect(res.status).toBe(200);
      for (const c of setCookies(res)) expect(c, "every cookie set for a TLS deployment is Secure").toMatch(/;\s*Secure/i);
    } finally {
      await tls.close();
    }
  });
});

describe("CSRF", () => {
  it("every write route refuses a cookie-authenticated request without the token, with a wrong one, or with a forged cookie", async () => {
    const owner = await signUpAgent(server);
    const writes = mountedRoutes(server).filter(isWrite);
    expect(writes.length).toBeGreaterThan(10);
    const good = await sessionHeaders(server, owner.user.id);
    const other = await sessionHeaders(server, owner.user.id);
    // A cookie/token pair minted with another secret, as an attacker could make it.
    const forgedValue = "bm9uY2U.c2lnbmF0dXJl";
    const variants: [string, Record<string, string>][] = [
      ["no header", { cookie: good.cookie }],
      ["the header of another session's cookie", { cookie: good.cookie, "x-csrf-token": other["x-csrf-token"]! }],
      ["a forged cookie and matching header", { cookie: good.cookie.replace(/sw_csrf=[^;]*/, `sw_csrf=${forgedValue}`), "x-csrf-token": forgedValue }],
      ["no cookie at all (login CSRF)", { "x-csrf-token": good["x-csrf-token"]! }],
    ];
    // What a page on another site can send without a preflight: an HTML form (url-encoded, multipart, text/plain), carrying the session cookie.
    const simple: [string, () => { body: string | FormData; headers: Record<string, string> }][] = [
      ["an url-encoded form", () => ({ body: "name=CSRF&kind=counts", headers: { "content-type": "application/x-www-form-urlencoded" } })],
      ["a multipart form with a file", () => {
        const form = new FormData();
        form.append("name", "CSRF");
        form.append("kind", "counts");
        form.append("file", new Blob(["year,count\n2020,1\n"], { type: "text/csv" }), "forged.csv");
        return { body: form, headers: {} };
      }],
      ["a text/plain body", () => ({ body: '{"name":"CSRF"}', headers: { "content-type": "text/plain" } })],
    ];
    const failures: string[] = [];
    const studiesBefore = (await server.db.select().from(studies)).length;
    const refused = async (route: (typeof writes)[number], label: string, res: Response) => {
      const body = (await res.json().catch(() => null)) as { error?: { code?: string } } | null;
      if (res.status !== 403 || body?.error?.code !== "csrf") failures.push(`${route.key} with ${label}: ${res.status} ${JSON.stringify(body)}`);
    };
    for (const route of writes) {
      for (const [label, headers] of variants) {
        await refused(route, label, await fetch(`${server.url}/api/v1${fill(route.path)}`, { method: route.method, headers: { ...headers, "content-type": "application/json" }, body: JSON.stringify({ name: "CSRF" }) }));
      }
      for (const [label, make] of simple) {
        const { body, headers } = make();
        await refused(route, label, await fetch(`${server.url}/api/v1${fill(route.path)}`, { method: route.method, headers: { cookie: good.cookie, ...headers }, body }));
      }
    }
    expect(failures).toEqual([]);
    expect((await server.db.select().from(studies)).length).toBe(studiesBefore);
    // The same session with its token goes through, so the refusals above were the CSRF check's.
    const ok = await fetch(`${server.url}/api/v1/studies`, { method: "POST", headers: { ...good, "content-type": "application/json" }, body: JSON.stringify({ name: "With token" }) });
    expect(ok.status).toBe(201);
  });

  it("a Bearer token needs no CSRF token (scripts hold no cookie credentials)", async () => {
    const owner = await signUpAgent(server);
    const { token } = await createApiToken(server.db, owner.user.id, "script");
    const res = await fetch(`${server.url}/api/v1/studies`, { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "application/json" }, body: JSON.stringify({ name: "Scripted" }) });
    expect(res.status).toBe(201);
  });
});

describe("Content-Security-Policy and the built client", () => {
  const dist = path.resolve(process.env.STAGEWRIGHT_DIST ?? "dist");

  it("the page is served with a policy that allows no inline or evaluated script", async () => {
    const res = await fetch(`${server.url}/studies`);
    expect(res.status).toBe(200);
    const csp = res.headers.get("content-security-policy")!;
    const directives = new Map(csp.split(";").map((d) => d.trim().split(/\s+/)).filter((d) => d[0]).map(([name, ...values]) => [name!, values]));
    const scriptSrc = directives.get("script-src") ?? directives.get("default-src")!;
    expect(scriptSrc).toBeDefined();
    for (const banned of ["'unsafe-inline'", "'unsafe-eval'", "'unsafe-hashes'", "'wasm-unsafe-eval'", "data:", "*", "http:", "https:"]) expect(scriptSrc).not.toContain(banned);
    expect(scriptSrc.some((s) => s.startsWith("'nonce-") || s.startsWith("'sha"))).toBe(false);
    expect(directives.get("script-src-attr")).toEqual(["'none'"]);
    expect(directives.get("object-src")).toEqual(["'none'"]);
    expect(directives.get("base-uri")).toEqual(["'self'"]);
    expect(directives.get("frame-ancestors")).toEqual(["'self'"]);
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("referrer-policy")).toBe("no-referrer");
  });

  it("the built client has no inline script, event-handler attribute or javascript: URL", () => {
    const html = fs.readdirSync(dist, { recursive: true }).map(String).filter((f) => f.endsWith(".html"));
    expect(html).toContain("index.html");
    for (const file of html) {
      const text = fs.readFileSync(path.join(dist, file), "utf8");
      const scripts = [...text.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)];
      expect(scripts.length).toBeGreaterThan(0);
      for (const [, attrs, body] of scripts) {
        expect(attrs, `${file}: every script has a src`).toMatch(/\bsrc=/);
        expect(body!.trim(), `${file}: no inline script body`).toBe("");
      }
      expect(text).not.toMatch(/\son[a-z]+\s*=/i);
      expect(text).not.toMatch(/javascript:/i);
    }
  });
});

describe("rate limits", () => {
  it("sign-in, sign-up, reset request and reset confirmation answer 429 past the limit", async () => {
    const limited = await startTestServer({ authRateLimit: { windowMs: 60_000, max: 3 } });
    try {
      const anon = await browserAgent(limited);
      const run = async (path: string, body: object) => {
        const out: number[] = [];
        for (let i = 0; i < 5; i++) out.push((await anon.post(`/api/v1${path}`, body)).status);
        return out;
      };
      expect(await run("/auth/sign-in", { email: "victim@example.org", password: "guess" })).toEqual([401, 401, 401, 429, 429]);
      expect(await run("/auth/sign-up", { name: "S", email: "spam@example.org", password: "long enough password" })).toEqual([202, 202, 202, 429, 429]);
      // One budget per address and client for all four routes: each check uses its own address.
      expect(await run("/auth/password-reset/request", { email: "victim2@example.org" })).toEqual([202, 202, 202, 429, 429]);
      expect(await run("/auth/password-reset/confirm", { token: "guess", password: "long enough password" })).toEqual([400, 400, 400, 429, 429]);
      const tooMany = await anon.post("/api/v1/auth/sign-in", { email: "victim@example.org", password: "guess" });
      expect(tooMany.body.error.message).toMatch(/Too many attempts/);
      expect(tooMany.headers["ratelimit-policy"]).toBeDefined();
    } finally {
      await limited.close();
    }
  });

  it("minting API tokens is limited per account, not per address", async () => {
    const limited = await startTestServer({ tokenRateLimit: { windowMs: 60_000, max: 3 } });
    try {
      const a = await signUpAgent(limited);
      const b = await signUpAgent(limited);
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) statuses.push((await a.post("/api/v1/account/tokens", { name: `t${i}` })).status);
      expect(statuses).toEqual([201, 201, 201, 429, 429]);
      expect((await limited.db.select().from(apiTokens).where(eq(apiTokens.userId, a.user.id))).length).toBe(3);
      // Another account from the same address is not held up.
      expect((await b.post("/api/v1/account/tokens", { name: "b" })).status).toBe(201);
    } finally {
      await limited.close();
    }
  });
});

describe("no user enumeration", () => {
  it("sign-up answers a registered and a new address alike; the e-mail tells them apart, and no account exists before the link is opened", async () => {
    const existing = await signUpAgent(server);
    const anon = await browserAgent(server);
    const fresh = `fresh-${Date.now()}@example.org`;
    const registered = await anon.post("/api/v1/auth/sign-up", { name: "Impostor", email: existing.user.email, password: "long enough password" });
    const unregistered = await anon.post("/api/v1/auth/sign-up", { name: "Newcomer", email: fresh, password: "long enough password" });
    expect(registered.status).toBe(202);
    expect(unregistered.status).toBe(202);
    expect(registered.body.message.replace(existing.user.email, "ADDRESS")).toBe(unregistered.body.message.replace(fresh, "ADDRESS"));
    expect(Object.keys(registered.body)).toEqual(Object.keys(unregistered.body));
    // Neither answer signs anyone in.
    for (const res of [registered, unregistered]) expect((res.headers["set-cookie"] as unknown as string[] | undefined)?.some((c) => c.startsWith("sw_session=")) ?? false).toBe(false);

    const toOwner = await server.mailTo(existing.user.email, 5000, /already have a Stagewright account/);
    expect(toOwner.text).toContain("/forgot-password");
    expect(toOwner.text).not.toContain("/sign-up/confirm");
    const [owner] = await server.db.select().from(users).where(eq(users.email, existing.user.email));
    expect(owner!.name).toBe(existing.user.name);

    expect(await server.db.select().from(users).where(eq(users.email, fresh))).toEqual([]);
    const token = await signUpToken(server, fresh);
    const [pending] = await server.db.select().from(signUpRequests).where(eq(signUpRequests.email, fresh));
    expect(pending!.tokenHash).not.toBe(token);
    const confirmed = await anon.post("/api/v1/auth/sign-up/confirm", { token });
    expect(confirmed.status).toBe(201);
    expect(confirmed.body.user).toMatchObject({ email: fresh, name: "Newcomer" });
    expect((await anon.get("/api/v1/auth/session")).body.user.email).toBe(fresh);
    // The link works once.
    const again = await (await browserAgent(server)).post("/api/v1/auth/sign-up/confirm", { token });
    expect(again.status).toBe(400);
    expect(again.body.error.fields[0].path).toBe("token");
  });

  it("an expired sign-up link creates nothing", async () => {
    const anon = await browserAgent(server);
    const email = `late-${Date.now()}@example.org`;
    await anon.post("/api/v1/auth/sign-up", { name: "Late", email, password: "long enough password" });
    const token = await signUpToken(server, email);
    await server.db.update(signUpRequests).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(signUpRequests.email, email));
    const res = await anon.post("/api/v1/auth/sign-up/confirm", { token });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/expired/);
    expect(await server.db.select().from(users).where(eq(users.email, email))).toEqual([]);
  });

  it("sign-in and password reset answer a registered and an unknown address alike", async () => {
    const a = await signUpAgent(server);
    const anon = await browserAgent(server);
    const wrong = await anon.post("/api/v1/auth/sign-in", { email: a.user.email, password: "not the password" });
    const unknown = await anon.post("/api/v1/auth/sign-in", { email: `nobody-${Date.now()}@example.org`, password: "not the password" });
    expect([wrong.status, unknown.status]).toEqual([401, 401]);
    expect(wrong.body).toEqual(unknown.body);
    const resetKnown = await anon.post("/api/v1/auth/password-reset/request", { email: a.user.email });
    const resetUnknown = await anon.post("/api/v1/auth/password-reset/request", { email: `nobody-${Date.now()}@example.org` });
    expect([resetKnown.status, resetUnknown.status]).toEqual([202, 202]);
    expect(resetKnown.body).toEqual(resetUnknown.body);
    await server.mailTo(a.user.email, 5000, /Reset your/);
  });
});

describe("no user enumeration by timing", () => {
  /** Median answer time of each of two requests, measured alternately (ABBA), so load on the machine falls on both alike. */
  async function medians(a: () => Promise<Response>, b: () => Promise<Response>, rounds: number): Promise<[number, number]> {
    const times: [number[], number[]] = [[], []];
    const time = async (i: 0 | 1, f: () => Promise<Response>) => {
      const t0 = performance.now();
      const res = await f();
      await res.text();
      times[i].push(performance.now() - t0);
      // Let work done after the answer (the reset e-mail) finish before the next request.
      await new Promise((r) => setTimeout(r, 40));
    };
    // One unmeasured pair first: the dummy hash is made on the first unknown sign-in.
    await (await a()).text();
    await (await b()).text();
    for (let k = 0; k < rounds; k++) {
      if (k % 2 === 0) {
        await time(0, a);
        await time(1, b);
      } else {
        await time(1, b);
        await time(0, a);
      }
    }
    const median = (xs: number[]) => [...xs].sort((x, y) => x - y)[Math.floor(xs.length / 2)]!;
    return [median(times[0]), median(times[1])];
  }
  /** Alike within a wide margin: 15 ms, or half the slower of the two, whichever is more. (Skipping the password hash for an unknown address makes sign-in about 100 ms faster, answering a reset only after the e-mail is sent makes it tens of ms slower.) */
  const alike = ([known, unknown]: [number, number]) => Math.abs(known - unknown) <= Math.max(15, 0.5 * Math.max(known, unknown));

  it("sign-in, password reset and sign-up take about as long for a registered address as for an unknown one", async () => {
    const open = await startTestServer({ authRateLimit: { windowMs: 60_000, max: 1_000 } });
    try {
      const a = await signUpAgent(open);
      const csrfCookie = cookieNamed(setCookies(await fetch(`${open.url}/api/v1/auth/session`)), "sw_csrf")!.split(";")[0]!;
      const headers = { "content-type": "application/json", cookie: csrfCookie, "x-csrf-token": decodeURIComponent(csrfCookie.slice("sw_csrf=".length)) };
      const post = (path: string, body: object) => () => fetch(`${open.url}/api/v1${path}`, { method: "POST", headers, body: JSON.stringify(body) });
      let n = 0;
      const unknownEmail = () => `nobody-${Date.now()}-${++n}@example.org`;
      const signIn = await medians(post("/auth/sign-in", { email: a.user.email, password: "not the password" }), () => post("/auth/sign-in", { email: unknownEmail(), password: "not the password" })(), 10);
      const reset = await medians(post("/auth/password-reset/request", { email: a.user.email }), () => post("/auth/password-reset/request", { email: unknownEmail() })(), 10);
      const signUp = await medians(post("/auth/sign-up", { name: "Again", email: a.user.email, password: "long enough password" }), () => post("/auth/sign-up", { name: "New", email: unknownEmail(), password: "long enough password" })(), 8);
      const report = `medians in ms (registered, unknown): sign-in ${signIn.map((x) => x.toFixed(1))}, reset ${reset.map((x) => x.toFixed(1))}, sign-up ${signUp.map((x) => x.toFixed(1))}`;
      console.log(report);
      expect(alike(signIn), report).toBe(true);
      expect(alike(reset), report).toBe(true);
      expect(alike(signUp), report).toBe(true);
      // The sign-in of an unknown address really does the hashing work (so the check above compares like with like):
      // it takes longer than a sign-in refused before any hashing (a malformed address, 400) by at least half of one
      // password verification timed here, in the same process as the server, so the machine's speed and load cancel out.
      const [unknownSignIn, refusedEarly] = await medians(
        () => post("/auth/sign-in", { email: unknownEmail(), password: "not the password" })(),
        post("/auth/sign-in", { email: "not an address", password: "not the password" }),
        10,
      );
      const stored = await hashPassword("long enough password");
      const verifications: number[] = [];
      for (let k = 0; k < 7; k++) {
        const t0 = performance.now();
        await verifyPassword(stored, "not the password");
        verifications.push(performance.now() - t0);
      }
      const oneVerification = [...verifications].sort((x, y) => x - y)[3]!;
      const hashing = `unknown-address sign-in ${unknownSignIn.toFixed(1)} ms, refused before hashing ${refusedEarly.toFixed(1)} ms, one verification ${oneVerification.toFixed(1)} ms`;
      expect(unknownSignIn - refusedEarly, hashing).toBeGreaterThan(0.5 * oneVerification);
    } finally {
      await open.close();
    }
  }, 120_000);
});

describe("tokens", () => {
  it("a revoked or unknown Bearer token is refused with 401 on every route, public ones included", async () => {
    const a = await signUpAgent(server);
    const minted = await createApiToken(server.db, a.user.id, "soon revoked");
    await revokeApiToken(server.db, a.user.id, minted.id);
    const failures: string[] = [];
    for (const route of mountedRoutes(server)) {
      for (const token of [minted.token, "sw_not-a-real-token"]) {
        const res = await fetch(`${server.url}/api/v1${fill(route.path)}`, { method: route.method, headers: { authorization: `Bearer ${token}`, "content-type": "application/json" }, body: route.method === "GET" ? undefined : "{}" });
        if (res.status !== 401) failures.push(`${route.key}: ${res.status}`);
      }
    }
    expect(failures).toEqual([]);
  });
});

describe("body size", () => {
  it("every write route refuses a JSON body over 5 MB with a JSON 413 before doing anything", async () => {
    const a = await signUpAgent(server);
    const { token } = await createApiToken(server.db, a.user.id, "big");
    const big = JSON.stringify({ name: "x".repeat(5 * 1024 * 1024 + 10) });
    const failures: string[] = [];
    for (const route of mountedRoutes(server).filter(isWrite)) {
      const res = await fetch(`${server.url}/api/v1${fill(route.path)}`, { method: route.method, headers: { authorization: `Bearer ${token}`, "content-type": "application/json" }, body: big });
      const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
      if (res.status !== 413 || !/too large/.test(body?.error?.message ?? "")) failures.push(`${route.key}: ${res.status} ${JSON.stringify(body)}`);
    }
    expect(failures).toEqual([]);
  });
});
