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
import { createDataset } from "../../server/services/field-data";
import { UploadSchema } from "../../shared/schemas/field-data";
import { fullLifeCycle } from "../factories/full-life-cycle";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { COUNTS_CSV, countsFields, FATES_CSV, fatesFields } from "../helpers/field-data";
import { formLeafSweep, hostileParam, hostileQuery, hostileValue, leafSweep, mutatedBody, mutatedForm, queryString, rawBodies, type MultipartForm } from "../helpers/fuzz";
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
  /** Valid bodies the mutations start from (several for a route whose body takes several shapes). */
  bodies: unknown[];
  /** Valid multipart forms (file and fields) of an upload route. */
  forms: { csv: string; fields: Record<string, unknown> }[];
  /** A valid query of a GET route that reads one. */
  query?: Record<string, string>;
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
  // Every optional part of the document is filled in, so Risk with a scenario, Uncertainty and warming Runs can start from it.
  const document = fullLifeCycle();
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
  if (route.params.includes("datasetId")) {
    // Stored through the upload path: census counts for the counts analysis, stage fates for everything else.
    const counts = route.path.endsWith("/counts-analysis");
    const [csv, fields] = counts ? [COUNTS_CSV, countsFields("Fuzz counts")] : [FATES_CSV, fatesFields("Fuzz fates")];
    const dataset = await createDataset(db, studyId, owner.user.id, { originalname: "fuzz.csv", buffer: Buffer.from(csv) }, UploadSchema.parse(fields));
    params.datasetId = dataset.id;
  }
  return { params, bodies: seedBodies(route, params), forms: seedForms(route), query: seedQuery(route, params), cookie: await sessionHeaders(server, owner.user.id) };
}

/** A document whose rates carry nothing but their values: the LTRE compares it with the full one (their formulas are shared). */
const warmerComparison = () => fullLifeCycle({ rates: fullLifeCycle().rates.map((r) => (r.name === "f" ? { ...r, value: 2.1 } : r.name === "s_a" ? { ...r, value: 0.8 } : r)) });

const trend = { kind: "trend", startYear: 2026, years: 40, baseline: 15, trendPerDecade: 0.6, sd: 0.7 };
const series = { kind: "series", points: [2026, 2027, 2028, 2029, 2030].map((year, i) => ({ year, temperature: 14 + 0.5 * i })), sd: 0.5 };
/** Measurements along a Brière curve with a little invented scatter (°C, development rate per day). */
const briereCsv = ["temperature_c,rate", ...[6, 9, 12, 15, 18, 21, 24, 27, 30, 33].map((t, i) => `${t},${(2e-4 * t * (t - 4) * Math.sqrt(Math.max(0, 36 - t)) + (i % 2 ? 0.002 : -0.002)).toFixed(5)}`)].join("\n");
const arrheniusPoints = [4, 8, 12, 16, 20, 24].map((t, i) => ({ temperature: t, value: 0.1 * Math.exp(0.07 * t) * (i % 2 ? 1.02 : 0.98) }));
const gaussianPoints = [8, 11, 14, 17, 20, 23, 26, 28].map((t) => ({ temperature: t, value: Number((0.8 * Math.exp(-(((t - 20) / 6) ** 2))).toFixed(4)) }));

/** Valid bodies for each route that takes one: the fuzzer mutates them to reach past the outer checks. */
function seedBodies(route: MountedRoute, params: Record<string, string>): unknown[] {
  const { lifeCycleId, snapshotId, userId } = params as Record<string, string>;
  const n = randomBytes(4).toString("hex");
  const fateSettings = { census: "pre-breeding", offspringSurvival: 0.8, method: "clopper-pearson", year: 2020 };
  const seeds: Record<string, unknown[]> = {
    "POST /auth/sign-up": [{ name: "Fuzz Person", email: `fuzz-${n}@example.org`, password: "long enough password" }],
    "POST /auth/sign-in": [{ email: owner.user.email, password: "not the password" }],
    "POST /auth/sign-up/confirm": [{ token: "made-up" }],
    "POST /auth/password-reset/request": [{ email: `nobody-${n}@example.org` }],
    "POST /auth/password-reset/confirm": [{ token: "made-up", password: "long enough password" }],
    "PATCH /account/profile": [{ name: "Fuzzed Owner" }],
    "POST /account/password": [{ currentPassword: "not the password", newPassword: "long enough password" }],
    "POST /account/tokens": [{ name: "script" }],
    "POST /studies": [{ name: "Fuzzed Study", description: "d" }],
    "PATCH /studies/:studyId": [{ description: "changed" }],
    "PATCH /studies/:studyId/members/:userId": [{ role: "reviewer" }],
    "POST /studies/:studyId/invitations": [{ email: `invited-${n}@example.org`, role: "viewer" }],
    "POST /studies/:studyId/life-cycles": [{ document: fullLifeCycle() }, { document: threeStageLifeCycle() }],
    "PUT /life-cycles/:lifeCycleId": [{ version: 1, document: fullLifeCycle({ name: "Saved" }) }],
    "POST /life-cycles/:lifeCycleId/duplicate": [{ name: "Copy" }],
    "POST /life-cycles/:lifeCycleId/snapshots": [{ message: "snap" }],
    "POST /life-cycles/:lifeCycleId/snapshots/:snapshotId/restore": [{ version: 1 }],
    "POST /life-cycles/:lifeCycleId/runs": [
      { kind: "risk", settings: { environment: { kind: "matrices", lifeCycleIds: [lifeCycleId], weights: [1] }, initial: [10, 5, 2], horizon: 5, replicates: 10, threshold: { value: 1 } } },
      // A scenario's Risk run with drawn rates, correlated, and every optional setting.
      {
        kind: "risk",
        settings: {
          environment: { kind: "vital-rates", rates: [{ rateId: "vr_sa", distribution: "beta", mean: 0.85, sd: 0.05 }, { rateId: "vr_f", distribution: "lognormal", mean: 1.6, sd: 0.3 }], correlations: [{ a: "vr_sa", b: "vr_f", r: 0.3 }] },
          scenarioId: "sc_fence",
          demographic: true,
          ceiling: 500,
          initial: [20, 10, 8],
          horizon: 20,
          replicates: 50,
          threshold: { value: 5, stages: ["st_a"] },
          horizons: [5, 10, 20],
          seed: 11,
          burnIn: 2,
        },
      },
      { kind: "risk", settings: { environment: { kind: "markov", lifeCycleIds: [lifeCycleId], transition: [[1]], initialState: lifeCycleId }, initial: [10, 5, 2], horizon: 5, replicates: 10, threshold: { value: 1 } } },
      { kind: "uncertainty", settings: { draws: 1000, seed: 3 } },
      { kind: "warming", settings: { trajectory: trend, replicates: 20, initialTotal: 300, threshold: 20, seed: 5 } },
      { kind: "warming", settings: { trajectory: series, replicates: 10, initialTotal: 50 } },
    ],
    "POST /life-cycles/:lifeCycleId/comments": [{ anchor: { kind: "cell", to: "st_s", from: "st_j" }, body: "Is s_j from the 2024 survey?", mentions: [userId] }],
    "POST /comments/:commentId/replies": [{ body: "Yes, 41 of 120 marked juveniles.", mentions: [] }],
    "PATCH /comments/:commentId": [{ body: "Where does s_j come from (edited)?", mentions: [] }],
    "POST /life-cycles/:lifeCycleId/reviews": [{ snapshotId, reviewerIds: [userId], message: "Please check the rates." }],
    "POST /life-cycles/:lifeCycleId/reviews/decision": [{ snapshotId, decision: "approved", summary: "Sound." }],
    "PUT /account/notifications": [{ mode: "digest" }],
    "POST /notifications/unsubscribe": [{ token: `${userId}.made-up` }],
    // The first seed is the one whose every leaf is swept: without the break-even search, the slowest part.
    "POST /levers": [{ document: fullLifeCycle(), relativeChange: 0.25, target: 1.05, breakEven: false }, { document: fullLifeCycle(), relativeChange: 0.1, target: 1, breakEven: true }],
    "POST /ltre": [{ reference: fullLifeCycle(), comparison: warmerComparison() }, { reference: threeStageLifeCycle(), comparison: threeStageLifeCycle({ rates: threeStageLifeCycle().rates.map((r) => (r.name === "f" ? { ...r, value: 2.1 } : r)) }) }],
    "POST /analyze": [
      { matrix: [[0, 1.5, 2], [0.6, 0, 0], [0, 0.333, 0]], fertility: [[0, 1.5, 2], [0, 0, 0], [0, 0, 0]], stages: ["a", "b", "c"], initial: [10, 5, 1], projectionSteps: 20 },
      // A document with every kind of uncertainty: the answer carries the delta-method intervals.
      { document: fullLifeCycle(), initial: [10, 5, 1] },
    ],
    "POST /climate/lambda": [{ document: fullLifeCycle(), range: { min: 0, max: 35 }, points: 60, at: 18 }, { document: fullLifeCycle(), range: { min: 5, max: 25 } }],
    "POST /climate/fit": [
      { form: "briere", csv: briereCsv, appliesTo: "rate" },
      { form: "arrhenius", measurements: arrheniusPoints, appliesTo: "rate", referenceTemperature: 15 },
      { form: "gaussian-quadratic", measurements: gaussianPoints },
      { form: "schoolfield", csv: `temperature,value\n${arrheniusPoints.map((p) => `${p.temperature},${p.value}`).join("\n")}\n30,0.4\n34,0.2`, referenceTemperature: 15 },
    ],
    "POST /climate/trajectory": [{ document: fullLifeCycle(), trajectory: trend, initialTotal: 500 }, { document: fullLifeCycle(), trajectory: series }],
    "PATCH /datasets/:datasetId": [{ name: "Spring counts, renamed" }],
    "POST /datasets/:datasetId/life-cycles": [{ name: "From the marked newts", settings: fateSettings }, { name: "Pooled" }],
    "POST /datasets/:datasetId/runs": [{ kind: "bootstrap", settings: { resamples: 2000, analysis: fateSettings, seed: 9 } }, { kind: "bootstrap", settings: {} }],
  };
  if (route.key in seeds) {
    handSeeded.add(route.key);
    return seeds[route.key]!;
  }
  if (route.method === "GET" || route.method === "DELETE" || route.key in FORM_SEEDS) return [];
  // A write route nobody seeded yet: an example of its body from the OpenAPI document, else an empty object to mutate.
  const operation = openApi?.paths[route.path.replace(/:(\w+)/g, "{$1}")]?.[route.method.toLowerCase()];
  const body = operation?.requestBody?.content?.["application/json"]?.schema;
  // Routes the document says take no body still get random ones; only the others are listed.
  if (!operation || body) unseeded.push(`${route.key}${body ? " (body from the OpenAPI document)" : ""}`);
  return [body ? sampleFromSchema(body, openApi!) : {}];
}

/** Upload forms: census counts and stage fates, with every text field the route reads. */
const countsForm = { csv: COUNTS_CSV, fields: { ...countsFields("Fuzz counts"), options: { delimiter: "auto", decimalComma: false } } };
const fatesForm = { csv: FATES_CSV, fields: fatesFields("Fuzz fates", { deadValue: "dead", delimiter: "auto", decimalComma: "auto" }) };
const FORM_SEEDS: Record<string, { csv: string; fields: Record<string, unknown> }[]> = {
  "POST /studies/:studyId/datasets": [countsForm, fatesForm],
  "POST /studies/:studyId/datasets/check": [countsForm, fatesForm],
  "POST /studies/:studyId/datasets/preview": [{ csv: COUNTS_CSV, fields: { options: { delimiter: "auto", decimalComma: "auto" } } }, { csv: FATES_CSV.replaceAll(",", ";"), fields: { options: { delimiter: ";", decimalComma: true } } }],
};
const seedForms = (route: MountedRoute) => FORM_SEEDS[route.key] ?? [];

/** Valid queries of the GET routes that read one (mutated like bodies). */
function seedQuery(route: MountedRoute, params: Record<string, string>): Record<string, string> | undefined {
  const queries: Record<string, Record<string, string>> = {
    "GET /datasets/:datasetId/counts-analysis": { threshold: "40", maxHorizon: "30", site: "North" },
    "GET /datasets/:datasetId/fate-analysis": { census: "post-breeding", offspringSurvival: "0.5", method: "clopper-pearson", year: "2020" },
    "GET /studies/:studyId/activity": { kind: "life_cycle", actorId: owner.user.id, lifeCycleId: params.lifeCycleId!, from: "2026-01-01", to: "2026-12-31", limit: "20" },
    "GET /life-cycles/:lifeCycleId/report": { snapshot: params.snapshotId! },
  };
  return queries[route.key];
}

type OpenApiDocument = { paths: Record<string, Record<string, { requestBody?: { content?: Record<string, { schema?: object }> } }>>; components?: { schemas?: Record<string, object> } };
let openApi: OpenApiDocument | null = null;
/** Write routes without a hand-written seed body (listed in the output, so a thin one is noticed). */
const unseeded: string[] = [];
/** Routes with a hand-written seed body: each seed must be accepted as it is. */
const handSeeded = new Set<string>();

type Case =
  | { kind: "json"; body: unknown; params: Record<string, string>; query: string; cookie: boolean }
  | { kind: "raw"; contentType: string; body: string; params: Record<string, string>; query: string; cookie: boolean }
  | { kind: "multipart"; form: MultipartForm; params: Record<string, string>; query: string; cookie: boolean };

const pick = <T,>(items: T[]): fc.Arbitrary<T> => fc.constantFrom(...items);

function caseArb(route: MountedRoute, fixture: Fixture): fc.Arbitrary<Case> {
  // Mostly the route's real resources; sometimes one parameter replaced by something hostile.
  const params = route.params.length
    ? fc.oneof(
        { weight: 4, arbitrary: fc.constant(fixture.params) },
        { weight: 1, arbitrary: fc.tuple(fc.constantFrom(...route.params), hostileParam, fc.boolean()).map(([name, value, raw]) => ({ ...fixture.params, [name]: raw ? value : encodeURIComponent(Buffer.from(value).toString()) })) },
      )
    : fc.constant(fixture.params);
  const seeded = fixture.query;
  const query = seeded
    ? fc.oneof(
        { weight: 2, arbitrary: fc.constant(queryString(seeded)) },
        { weight: 4, arbitrary: mutatedBody(seeded).map(queryString) },
        { weight: 1, arbitrary: hostileQuery },
      )
    : fc.oneof({ weight: 5, arbitrary: fc.constant("") }, { weight: 1, arbitrary: hostileQuery });
  const cookie = fc.boolean();
  if (route.method === "GET") return fc.record({ kind: fc.constant("json" as const), body: fc.constant(undefined), params, query, cookie });
  const raw = fc.record({ kind: fc.constant("raw" as const), contentType: rawBodies.map((r) => r.contentType), body: rawBodies.map((r) => r.body), params, query, cookie });
  if (fixture.forms.length) {
    const form = pick(fixture.forms).chain(mutatedForm);
    return fc.oneof(
      { weight: 8, arbitrary: fc.record({ kind: fc.constant("multipart" as const), form, params, query, cookie }) },
      { weight: 1, arbitrary: fc.record({ kind: fc.constant("json" as const), body: hostileValue, params, query, cookie }) },
      { weight: 1, arbitrary: raw },
    );
  }
  const bodies = fixture.bodies.length ? fixture.bodies : [{}];
  const json = fc.oneof(
    { weight: 6, arbitrary: pick(bodies).chain(mutatedBody) },
    { weight: 2, arbitrary: hostileValue },
    { weight: 1, arbitrary: pick(bodies) },
  );
  return fc.oneof({ weight: 9, arbitrary: fc.record({ kind: fc.constant("json" as const), body: json, params, query, cookie }) }, { weight: 1, arbitrary: raw });
}

/**
 * How far a case got: answered 2xx; refused deep inside (a field path of two
 * or more parts, such as `document.rates.3.se` or `mapping.time`, or a problem
 * in the CSV file's content); or refused at the surface (a top-level field,
 * the wrong content type, a hostile id, a limit). Counted per route to show
 * that mutations of the seeds reach past the first check.
 */
type Depth = "accepted" | "deep" | "surface";

interface Outcome {
  status: number;
  ms: number;
  depth?: Depth;
  problem?: string;
}

function depthOf(status: number, body: { error?: { code?: string; fields?: { path?: string }[] } } | null): Depth | undefined {
  if (status >= 200 && status < 300) return "accepted";
  if (status < 400 || status >= 500) return undefined;
  const error = body?.error;
  if (error?.code === "invalid_file") return "deep";
  if ((error?.fields ?? []).some((f) => (f.path ?? "").split(".").length >= 2)) return "deep";
  return "surface";
}

function multipartBody(form: MultipartForm): FormData {
  const data = new FormData();
  for (const [k, v] of form.fields) data.append(k, v);
  if (form.file) data.append(form.fileField, new Blob([new Uint8Array(form.file)], { type: "text/csv" }), form.fileName);
  if (form.secondFile) data.append(form.fileField, new Blob(["year,count\n2020,1\n"], { type: "text/csv" }), "second.csv");
  return data;
}

async function send(route: MountedRoute, fixture: Fixture, c: Case): Promise<Outcome> {
  // Values are already encoded (or deliberately raw) by the case.
  const path = route.path.replace(/:(\w+)/g, (_m, name: string) => c.params[name] ?? "x");
  const headers: Record<string, string> = c.cookie ? { ...fixture.cookie } : { authorization: `Bearer ${bearer}` };
  let body: string | FormData | undefined;
  if (route.method !== "GET") {
    if (c.kind === "raw") {
      headers["content-type"] = c.contentType;
      body = c.body;
    } else if (c.kind === "multipart") {
      // fetch sets the multipart content type with its boundary.
      body = multipartBody(c.form);
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
  let parsed: { error?: { code?: string; message?: unknown; fields?: { path?: string }[] } } | null = null;
  try {
    parsed = JSON.parse(text);
  } catch {
    parsed = null;
  }
  const depth = depthOf(res.status, parsed);
  // Node's HTTP parser answers an over-long request line or header itself (431, 414), before any of our code.
  if (res.status >= 400 && ![414, 431].includes(res.status)) {
    if (parsed === null) return { status: res.status, ms, depth, problem: `refusal is not JSON: ${text.slice(0, 200)}` };
    const message = parsed.error?.message;
    if (typeof message !== "string" || message.trim() === "") return { status: res.status, ms, depth, problem: `refusal without a message: ${text.slice(0, 200)}` };
  }
  return { status: res.status, ms, depth };
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

const describeCase = (route: MountedRoute, c: Case) => {
  const what =
    c.kind === "raw" ? `raw ${c.contentType}: ${c.body.slice(0, 120)}`
    : c.kind === "multipart" ? `multipart fields=${JSON.stringify(c.form.fields).slice(0, 300)} ${c.form.fileField}=${c.form.file ? JSON.stringify(c.form.file.toString("utf8").slice(0, 300)) : "(none)"}${c.form.secondFile ? " + a second file" : ""}`
    : `body: ${JSON.stringify(c.body)?.slice(0, 400)}`;
  return `${route.key} params=${JSON.stringify(c.params)} query=${c.query.slice(0, 80)} via ${c.cookie ? "cookie" : "token"} ${what}`;
};

/** Route groups whose seeds were written for deep mutation; their tallies are printed and checked. */
function groupOf(route: MountedRoute): string | null {
  if (route.path.startsWith("/climate/")) return "Climate";
  if (route.path === "/levers" || route.path === "/ltre") return "Levers and LTRE";
  if (route.key === "POST /life-cycles/:lifeCycleId/runs" || route.key === "POST /analyze") return "Runs (Risk, Uncertainty, warming) and analysis";
  if (route.path.includes("datasets")) return "Field data";
  return null;
}

/** Seeds deliberately refused (a made-up token, a wrong password): the others must be accepted as they are. */
const REFUSED_SEEDS = new Set(["POST /auth/sign-in", "POST /auth/sign-up/confirm", "POST /auth/password-reset/confirm", "POST /account/password", "POST /notifications/unsubscribe"]);
/** Share of a seeded route's cases that must get past the surface (measured: well above this on every route). */
const MIN_PAST_SURFACE = 0.25;

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
    "no 5xx, no hung request, every refusal a JSON 4xx with a message; the seeds are valid and their mutations reach past the surface",
    async () => {
      const routes = mountedRoutes(server);
      expect(routes.length).toBeGreaterThan(10);
      const problems: string[] = [];
      const shallow: string[] = [];
      const depthByRoute = new Map<string, { group: string; cases: number; accepted: number; deep: number; surface: number }>();
      let seed = SEED;
      for (const route of routes) {
        const fixture = await fixtureFor(route);
        // Each seed as it is first, before any mutation can change the route's resources: a refused seed would keep every mutation at the surface.
        // Through the cookie session, which every route accepts (a token may not mint tokens).
        if (!REFUSED_SEEDS.has(route.key)) {
          const valid: Case[] = [
            ...(handSeeded.has(route.key) ? fixture.bodies : []).map((body): Case => ({ kind: "json", body, params: fixture.params, query: "", cookie: true })),
            ...fixture.forms.map((f): Case => ({ kind: "multipart", form: { file: Buffer.from(f.csv), fileField: "file", fileName: "data.csv", secondFile: false, fields: formFieldsOf(f.fields) }, params: fixture.params, query: "", cookie: true })),
            ...(fixture.query ? [{ kind: "json", body: undefined, params: fixture.params, query: queryString(fixture.query), cookie: true } as Case] : []),
          ];
          for (const c of valid) {
            const o = await send(route, fixture, c);
            if (o.depth !== "accepted") problems.push(`${o.status} the seed itself is refused ${o.problem ?? ""}\n    case: ${describeCase(route, c)}`);
          }
        }
        const cases = fc.sample(caseArb(route, fixture), { numRuns: route.method === "GET" || route.method === "DELETE" ? OTHER_CASES : BODY_CASES, seed: seed++ });
        // Plus, deterministically, every leaf of the first valid body (or form) replaced by each value known to break servers (NUL, lone surrogate, 100 kB, 2³¹…).
        if (fixture.bodies[0] !== undefined) for (const body of leafSweep(fixture.bodies[0])) cases.push({ kind: "json", body, params: fixture.params, query: "", cookie: false });
        if (fixture.forms[0]) for (const form of formLeafSweep(fixture.forms[0])) cases.push({ kind: "multipart", form, params: fixture.params, query: "", cookie: false });
        const outcomes = await pool(cases, CONCURRENCY, (c) => send(route, fixture, c));
        const group = groupOf(route);
        const depth = { group: group ?? "", cases: 0, accepted: 0, deep: 0, surface: 0 };
        outcomes.forEach((o, i) => {
          tally.cases++;
          tally.byStatus.set(o.status, (tally.byStatus.get(o.status) ?? 0) + 1);
          tally.slowest = Math.max(tally.slowest, o.ms);
          if (o.problem && problems.length < 20) problems.push(`${o.status} ${o.problem}\n    case: ${describeCase(route, cases[i]!)}`);
          depth.cases++;
          if (o.depth) depth[o.depth]++;
        });
        if (group) {
          depthByRoute.set(route.key, depth);
          const past = (depth.accepted + depth.deep) / depth.cases;
          // A flat seed ({ name }) has no inside to reach: its refusals name a top-level field by necessity.
          const nested = [fixture.bodies[0], fixture.forms[0]?.fields].some((b) => b !== null && typeof b === "object" && Object.values(b).some((v) => v !== null && typeof v === "object"));
          if (nested && past < MIN_PAST_SURFACE) shallow.push(`${route.key}: only ${(100 * past).toFixed(0)} % of ${depth.cases} cases got past the surface`);
        }
      }
      const statuses = [...tally.byStatus.entries()].sort((a, b) => a[0] - b[0]).map(([s, n]) => `${s}×${n}`).join(" ");
      console.log(`fuzz: ${tally.cases} cases over ${routes.length} routes (seed ${SEED}); statuses ${statuses}; slowest ${tally.slowest.toFixed(0)} ms`);
      const groups = new Map<string, { cases: number; accepted: number; deep: number; surface: number }>();
      const lines = [...depthByRoute.entries()].map(([key, d]) => {
        const g = groups.get(d.group) ?? { cases: 0, accepted: 0, deep: 0, surface: 0 };
        groups.set(d.group, { cases: g.cases + d.cases, accepted: g.accepted + d.accepted, deep: g.deep + d.deep, surface: g.surface + d.surface });
        return `  ${key}: ${d.cases} cases, ${d.accepted} 2xx, ${d.deep} refused deep inside, ${d.surface} at the surface`;
      });
      const groupLines = [...groups.entries()].map(([name, d]) => `  ${name}: ${d.cases} cases, ${d.accepted} 2xx, ${d.deep} refused deep inside, ${d.surface} at the surface (${((100 * (d.accepted + d.deep)) / d.cases).toFixed(0)} % past the surface)`);
      console.log(`fuzz: how deep the seeded groups' cases got\n${groupLines.join("\n")}\n${lines.join("\n")}`);
      if (unseeded.length) console.log(`fuzz: write routes without a seed body in fuzz.test.ts: ${unseeded.join("; ")}`);
      expect(problems).toEqual([]);
      expect(shallow).toEqual([]);
      if (SCALE >= 1) expect(tally.cases).toBeGreaterThanOrEqual(10_000);
    },
    30 * 60_000,
  );
});

/** The seed form's fields as sent (the same serialisation as the mutated forms). */
function formFieldsOf(fields: Record<string, unknown>): [string, string][] {
  return Object.entries(fields).map(([k, v]) => [k, typeof v === "string" ? v : JSON.stringify(v)]);
}
