// Fuzzing every route mounted under /api/v1 (enumerated from the router, so a
// new route is fuzzed without being listed here): random and mutated bodies,
// hostile path parameters, query strings, raw bodies and content types. Every
// answer must come within the time limit, be below 500, and every refusal must
// be JSON with a message. At least 10,000 cases in a full run
// (STAGEWRIGHT_FUZZ_SCALE=0.1 for a quick look while developing).
import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sha256 } from "../../server/auth/secrets";
import { comments, invitations, lifeCycles, memberships, runs, snapshots, studies, users } from "../../server/db/schema";
import { createApiToken } from "../../server/services/api-tokens";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { hostileParam, hostileQuery, hostileValue, leafSweep, mutatedBody, rawBodies } from "../helpers/fuzz";
import { sampleFromSchema } from "../helpers/openapi-sample";
import { mountedRoutes, sessionHeaders, type MountedRoute } from "../helpers/routes";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

const SCALE = Number(process.env.STAGEWRIGHT_FUZZ_SCALE ?? 1);
const SEED = Number(process.env.STAGEWRIGHT_FUZZ_SEED ?? 20261202);
/** Cases per route with a body (mutations of a valid body, random JSON, raw bodies). */
const BODY_CASES = Math.round(380 * SCALE);
/** Cases per route without a body (hostile path parameters and query strings). */
const OTHER_CASES = Math.round(60 * SCALE);
const TIMEOUT_MS = 15_000;
const CONCURRENCY = 4;

let server: TestServer;
let owner: Awaited<ReturnType<typeof signUpAgent>>;
let bearer: string;

/** Resources of one route's own Study, so one route's successful deletes cannot starve another's cases. */
interface Fixture {
  params: Record<string, string>;
  body?: unknown;
  /** The owner's own cookie session for this route (sign-in, sign-up and sign-out replace or end it). */
  cookie: { cookie: string; "x-csrf-token": string };
}

async function fixtureFor(route: MountedRoute): Promise<Fixture> {
  const db = server.db;
  const [study] = await db.insert(studies).values({ name: `Fuzz ${route.key}`.slice(0, 120), createdBy: owner.user.id }).returning();
  const studyId = study!.id;
  await db.insert(memberships).values({ studyId, userId: owner.user.id, role: "owner" });
  const [member] = await db.insert(users).values({ email: `member-${randomBytes(6).toString("hex")}@example.org`, name: "Member", passwordHash: "x" }).returning();
  // A reviewer, so review requests may name them.
  await db.insert(memberships).values({ studyId, userId: member!.id, role: "reviewer" });
  const document = threeStageLifeCycle();
  const [lc] = await db.insert(lifeCycles).values({ studyId, name: document.name, document, schemaVersion: 1 }).returning();
  if (route.key === "POST /life-cycles/:lifeCycleId/undelete") await db.update(lifeCycles).set({ deletedAt: new Date() }).where(eq(lifeCycles.id, lc!.id));
  const [snap] = await db.insert(snapshots).values({ lifeCycleId: lc!.id, number: 1, message: "s", document, schemaVersion: 1, lifeCycleVersion: 1 }).returning();
  const [run] = await db.insert(runs).values({ studyId, lifeCycleId: lc!.id, kind: "risk", input: {}, settings: {}, chunksTotal: 1 }).returning();
  const invitationToken = randomBytes(32).toString("base64url");
  const [inv] = await db
    .insert(invitations)
    .values({ studyId, email: `invitee-${randomBytes(6).toString("hex")}@example.org`, role: "viewer", tokenHash: sha256(invitationToken), expiresAt: new Date(Date.now() + 86_400_000) })
    .returning();
  const [thread] = await db
    .insert(comments)
    .values({ studyId, lifeCycleId: lc!.id, anchor: { kind: "stage", id: "st_j" }, anchorLabel: "stage Juvenile", body: "Where does s_j come from?", authorId: owner.user.id })
    .returning();
  const token = await createApiToken(db, owner.user.id, "to revoke");
  const params: Record<string, string> = {
    studyId,
    userId: member!.id,
    lifeCycleId: lc!.id,
    snapshotId: snap!.id,
    runId: run!.id,
    invitationId: inv!.id,
    token: invitationToken,
    tokenId: token.id,
    commentId: thread!.id,
  };
  return { params, body: seedBody(route, params), cookie: await sessionHeaders(server, owner.user.id) };
}

/** A valid body for each route that takes one: the fuzzer mutates it to reach past the outer checks. */
function seedBody(route: MountedRoute, params: Record<string, string>): unknown {
  const { lifeCycleId, snapshotId, userId } = params as Record<string, string>;
  const n = randomBytes(4).toString("hex");
  const seeds: Record<string, unknown> = {
    "POST /auth/sign-up": { name: "Fuzz Person", email: `fuzz-${n}@example.org`, password: "long enough password" },
    "POST /auth/sign-in": { email: owner.user.email, password: "not the password" },
    "POST /auth/sign-up/confirm": { token: "made-up" },
    "POST /auth/password-reset/request": { email: `nobody-${n}@example.org` },
    "POST /auth/password-reset/confirm": { token: "made-up", password: "long enough password" },
    "PATCH /account/profile": { name: "Fuzzed Owner" },
    "POST /account/password": { currentPassword: "not the password", newPassword: "long enough password" },
    "POST /account/tokens": { name: "script" },
    "POST /studies": { name: "Fuzzed Study", description: "d" },
    "PATCH /studies/:studyId": { description: "changed" },
    "PATCH /studies/:studyId/members/:userId": { role: "reviewer" },
    "POST /studies/:studyId/invitations": { email: `invited-${n}@example.org`, role: "viewer" },
    "POST /studies/:studyId/life-cycles": { document: threeStageLifeCycle() },
    "PUT /life-cycles/:lifeCycleId": { version: 1, document: threeStageLifeCycle({ name: "Saved" }) },
    "POST /life-cycles/:lifeCycleId/duplicate": { name: "Copy" },
    "POST /life-cycles/:lifeCycleId/snapshots": { message: "snap" },
    "POST /life-cycles/:lifeCycleId/snapshots/:snapshotId/restore": { version: 1 },
    "POST /life-cycles/:lifeCycleId/runs": {
      kind: "risk",
      settings: { environment: { kind: "matrices", lifeCycleIds: [lifeCycleId], weights: [1] }, initial: [10, 5, 2], horizon: 5, replicates: 10, threshold: { value: 1 } },
    },
    "POST /life-cycles/:lifeCycleId/comments": { anchor: { kind: "cell", to: "st_s", from: "st_j" }, body: "Is s_j from the 2024 survey?", mentions: [userId] },
    "POST /comments/:commentId/replies": { body: "Yes, 41 of 120 marked juveniles.", mentions: [] },
    "PATCH /comments/:commentId": { body: "Where does s_j come from (edited)?", mentions: [] },
    "POST /life-cycles/:lifeCycleId/reviews": { snapshotId, reviewerIds: [userId], message: "Please check the rates." },
    "POST /life-cycles/:lifeCycleId/reviews/decision": { snapshotId, decision: "approved", summary: "Sound." },
    "PUT /account/notifications": { mode: "digest" },
    "POST /notifications/unsubscribe": { token: `${userId}.made-up` },
    "POST /levers": { document: threeStageLifeCycle(), relativeChange: 0.1, target: 1, breakEven: true },
    "POST /ltre": { reference: threeStageLifeCycle(), comparison: threeStageLifeCycle({ rates: threeStageLifeCycle().rates.map((r) => (r.name === "f" ? { ...r, value: 2.1 } : r)) }) },
    "POST /analyze": { matrix: [[0, 1.5, 2], [0.6, 0, 0], [0, 0.333, 0]], fertility: [[0, 1.5, 2], [0, 0, 0], [0, 0, 0]], stages: ["a", "b", "c"], initial: [10, 5, 1], projectionSteps: 20 },
  };
  if (route.key in seeds) return seeds[route.key];
  if (route.method === "GET" || route.method === "DELETE") return undefined;
  // A write route nobody seeded yet: an example of its body from the OpenAPI document, else an empty object to mutate.
  const operation = openApi?.paths[route.path.replace(/:(\w+)/g, "{$1}")]?.[route.method.toLowerCase()];
  const body = operation?.requestBody?.content?.["application/json"]?.schema;
  // Routes the document says take no body still get random ones; only the others are listed.
  if (!operation || body) unseeded.push(`${route.key}${body ? " (body from the OpenAPI document)" : ""}`);
  return body ? sampleFromSchema(body, openApi!) : {};
}

type OpenApiDocument = { paths: Record<string, Record<string, { requestBody?: { content?: Record<string, { schema?: object }> } }>>; components?: { schemas?: Record<string, object> } };
let openApi: OpenApiDocument | null = null;
/** Write routes without a hand-written seed body (listed in the output, so a thin one is noticed). */
const unseeded: string[] = [];

type Case =
  | { kind: "json"; body: unknown; params: Record<string, string>; query: string; cookie: boolean }
  | { kind: "raw"; contentType: string; body: string; params: Record<string, string>; query: string; cookie: boolean };

function caseArb(route: MountedRoute, fixture: Fixture): fc.Arbitrary<Case> {
  // Mostly the route's real resources; sometimes one parameter replaced by something hostile.
  const params = route.params.length
    ? fc.oneof(
        { weight: 4, arbitrary: fc.constant(fixture.params) },
        { weight: 1, arbitrary: fc.tuple(fc.constantFrom(...route.params), hostileParam, fc.boolean()).map(([name, value, raw]) => ({ ...fixture.params, [name]: raw ? value : encodeURIComponent(Buffer.from(value).toString()) })) },
      )
    : fc.constant(fixture.params);
  const query = fc.oneof({ weight: 5, arbitrary: fc.constant("") }, { weight: 1, arbitrary: hostileQuery });
  const cookie = fc.boolean();
  if (route.method === "GET") return fc.record({ kind: fc.constant("json" as const), body: fc.constant(undefined), params, query, cookie });
  const json = fc.oneof(
    { weight: 6, arbitrary: mutatedBody(fixture.body ?? {}) },
    { weight: 2, arbitrary: hostileValue },
    { weight: 1, arbitrary: fc.constant(fixture.body ?? {}) },
  );
  return fc.oneof(
    { weight: 9, arbitrary: fc.record({ kind: fc.constant("json" as const), body: json, params, query, cookie }) },
    { weight: 1, arbitrary: fc.record({ kind: fc.constant("raw" as const), contentType: rawBodies.map((r) => r.contentType), body: rawBodies.map((r) => r.body), params, query, cookie }) },
  );
}

interface Outcome {
  status: number;
  ms: number;
  problem?: string;
}

async function send(route: MountedRoute, fixture: Fixture, c: Case): Promise<Outcome> {
  // Values are already encoded (or deliberately raw) by the case.
  const path = route.path.replace(/:(\w+)/g, (_m, name: string) => c.params[name] ?? "x");
  const headers: Record<string, string> = c.cookie ? { ...fixture.cookie } : { authorization: `Bearer ${bearer}` };
  let body: string | undefined;
  if (route.method !== "GET") {
    if (c.kind === "raw") {
      headers["content-type"] = c.contentType;
      body = c.body;
    } else if (c.body !== undefined) {
      headers["content-type"] = "application/json";
      body = JSON.stringify(c.body);
    }
  }
  const started = performance.now();
  let res: Response;
  try {
    res = await fetch(`${server.url}/api/v1${path}${c.query}`, { method: route.method, headers, body, signal: AbortSignal.timeout(TIMEOUT_MS), redirect: "manual" });
  } catch (err) {
    return { status: 0, ms: performance.now() - started, problem: `no answer within ${TIMEOUT_MS} ms or connection failed: ${(err as Error).message}` };
  }
  const text = await res.text();
  const ms = performance.now() - started;
  if (res.status >= 500) return { status: res.status, ms, problem: `server error: ${text.slice(0, 300)}` };
  // Node's HTTP parser answers an over-long request line or header itself (431, 414), before any of our code.
  if (res.status >= 400 && ![414, 431].includes(res.status)) {
    let message: unknown;
    try {
      message = JSON.parse(text)?.error?.message;
    } catch {
      return { status: res.status, ms, problem: `refusal is not JSON: ${text.slice(0, 200)}` };
    }
    if (typeof message !== "string" || message.trim() === "") return { status: res.status, ms, problem: `refusal without a message: ${text.slice(0, 200)}` };
  }
  return { status: res.status, ms };
}

async function pool<T, R>(items: T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: limit }, async () => {
      while (next < items.length) {
        const i = next++;
        out[i] = await fn(items[i]!);
      }
    }),
  );
  return out;
}

const describeCase = (route: MountedRoute, c: Case) =>
  `${route.key} params=${JSON.stringify(c.params)} query=${c.query.slice(0, 80)} via ${c.cookie ? "cookie" : "token"} ${c.kind === "raw" ? `raw ${c.contentType}: ${c.body.slice(0, 120)}` : `body: ${JSON.stringify(c.body)?.slice(0, 400)}`}`;

beforeAll(async () => {
  server = await startTestServer();
  owner = await signUpAgent(server);
  bearer = (await createApiToken(server.db, owner.user.id, "fuzz")).token;
  const doc = await fetch(`${server.url}/api/v1/openapi.json`);
  openApi = doc.ok ? ((await doc.json()) as OpenApiDocument) : null;
}, 120_000);
afterAll(async () => {
  await server?.close();
});

describe("fuzzing every mounted /api/v1 route", () => {
  const tally = { cases: 0, byStatus: new Map<number, number>(), slowest: 0 };

  it("the cookie session of the fuzzing owner works (so cookie cases reach the routes)", async () => {
    const res = await fetch(`${server.url}/api/v1/account/tokens`, { headers: await sessionHeaders(server, owner.user.id) });
    expect(res.status).toBe(200);
    const write = await fetch(`${server.url}/api/v1/studies`, { method: "POST", headers: { ...(await sessionHeaders(server, owner.user.id)), "content-type": "application/json" }, body: JSON.stringify({ name: "Via cookie" }) });
    expect(write.status).toBe(201);
    expect(res.status).toBe(200);
  });

  it(
    "no 5xx, no hung request, every refusal a JSON 4xx with a message",
    async () => {
      const routes = mountedRoutes(server);
      expect(routes.length).toBeGreaterThan(10);
      const problems: string[] = [];
      let seed = SEED;
      for (const route of routes) {
        const fixture = await fixtureFor(route);
        const cases = fc.sample(caseArb(route, fixture), { numRuns: route.method === "GET" || route.method === "DELETE" ? OTHER_CASES : BODY_CASES, seed: seed++ });
        // Plus, deterministically, every leaf of the valid body replaced by each value known to break servers (NUL, lone surrogate, 100 kB, 2³¹…).
        if (fixture.body !== undefined) for (const body of leafSweep(fixture.body)) cases.push({ kind: "json", body, params: fixture.params, query: "", cookie: false });
        const outcomes = await pool(cases, CONCURRENCY, (c) => send(route, fixture, c));
        outcomes.forEach((o, i) => {
          tally.cases++;
          tally.byStatus.set(o.status, (tally.byStatus.get(o.status) ?? 0) + 1);
          tally.slowest = Math.max(tally.slowest, o.ms);
          if (o.problem && problems.length < 20) problems.push(`${o.status} ${o.problem}\n    case: ${describeCase(route, cases[i]!)}`);
        });
      }
      const statuses = [...tally.byStatus.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s}×${n}`).join(" ");
      console.log(`fuzz: ${tally.cases} cases over ${routes.length} routes (seed ${SEED}); statuses ${statuses}; slowest ${tally.slowest.toFixed(0)} ms`);
      if (unseeded.length) console.log(`fuzz: write routes without a seed body in fuzz.test.ts: ${unseeded.join("; ")}`);
      expect(problems).toEqual([]);
      if (SCALE >= 1) expect(tally.cases).toBeGreaterThanOrEqual(10_000);
    },
    20 * 60_000,
  );
});
