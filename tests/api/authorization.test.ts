import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "../../shared/schemas/studies";
import { createApiRouter } from "../../server/app";
import { sha256 } from "../../server/auth/secrets";
import { comments, countRows, datasets, fateRows, invitations, lifeCycles, memberships, runs, snapshots } from "../../server/db/schema";
import { unsubscribeToken } from "../../server/services/notifications";
import { createApiToken } from "../../server/services/api-tokens";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { COUNTS_CSV, countsFields, FATES_CSV, fatesFields, uploadCsv } from "../helpers/field-data";
import { browserAgent, signUpAgent, signUpToken, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";

/**
 * The authorisation matrix: every route mounted on the API router must have an
 * entry here, and every entry is exercised for owner, editor, reviewer, viewer,
 * a signed-in non-member and an anonymous visitor.
 *   public → nobody is refused; user → anonymous 401;
 *   <role> → anonymous 401, non-member 404, member below the role 403.
 */
type Access = "public" | "user" | Role;
type Persona = Role | "nonMember" | "anonymous";
const PERSONAS: Persona[] = ["owner", "editor", "reviewer", "viewer", "nonMember", "anonymous"];
const RANK: Record<Role, number> = { viewer: 0, reviewer: 1, editor: 2, owner: 3 };

interface Ctx {
  server: TestServer;
  studyId: string;
  persona: Persona;
  agent: BrowserAgent;
  userId: string | null;
}
interface Entry {
  access: Access;
  /** The route changes who the agent is signed in as: run it on a fresh agent of the persona. */
  ownAgent?: true;
  request: (ctx: Ctx) => Promise<{ path: string; body?: object; upload?: { csv: string; fields: Record<string, string | object> } }>;
}

let seq = 0;
const unique = () => `${Date.now()}-${++seq}`;

async function freshMember(ctx: Ctx, role: Role = "viewer"): Promise<string> {
  const a = await signUpAgent(ctx.server);
  await ctx.server.db.insert(memberships).values({ studyId: ctx.studyId, userId: a.user.id, role });
  return a.user.id;
}
async function freshInvitation(ctx: Ctx, studyId = ctx.studyId): Promise<{ id: string; token: string }> {
  const token = randomBytes(32).toString("base64url");
  const [row] = await ctx.server.db
    .insert(invitations)
    .values({ studyId, email: `invitee-${unique()}@example.org`, role: "viewer", tokenHash: sha256(token), expiresAt: new Date(Date.now() + 86_400_000) })
    .returning();
  return { id: row!.id, token };
}

async function freshLifeCycle(ctx: Ctx, options: { deleted?: boolean } = {}): Promise<string> {
  const [row] = await ctx.server.db
    .insert(lifeCycles)
    .values({ studyId: ctx.studyId, name: "LC", document: threeStageLifeCycle(), schemaVersion: 1, deletedAt: options.deleted ? new Date() : null })
    .returning();
  return row!.id;
}
async function freshSnapshot(ctx: Ctx, lifeCycleId: string): Promise<string> {
  const [row] = await ctx.server.db.insert(snapshots).values({ lifeCycleId, number: 1, message: "s", document: threeStageLifeCycle(), schemaVersion: 1, lifeCycleVersion: 1 }).returning();
  return row!.id;
}

async function freshRun(ctx: Ctx): Promise<string> {
  const lifeCycleId = await freshLifeCycle(ctx);
  const [row] = await ctx.server.db.insert(runs).values({ studyId: ctx.studyId, lifeCycleId, kind: "risk", input: {}, settings: {}, chunksTotal: 1 }).returning();
  return row!.id;
}
/** A thread written by the persona itself (so editing and deleting one's own comment is what is tested). */
async function freshComment(ctx: Ctx): Promise<string> {
  const lifeCycleId = await freshLifeCycle(ctx);
  const [row] = await ctx.server.db
    .insert(comments)
    .values({ studyId: ctx.studyId, lifeCycleId, anchor: { kind: "lifeCycle" }, anchorLabel: "the life cycle as a whole", body: "c", authorId: ctx.userId })
    .returning();
  return row!.id;
}
async function resolvedComment(ctx: Ctx): Promise<string> {
  const id = await freshComment(ctx);
  await ctx.server.db.update(comments).set({ resolvedAt: new Date() }).where(eq(comments.id, id));
  return id;
}
async function freshDataset(ctx: Ctx, kind: "counts" | "stage-fates" = "stage-fates"): Promise<string> {
  const [row] = await ctx.server.db
    .insert(datasets)
    .values({ studyId: ctx.studyId, name: "D", kind, fileName: "d.csv", fileBytes: 1, fileContent: Buffer.from("x"), rowCount: 3, mapping: {}, options: {}, stages: kind === "counts" ? [] : ["J", "A"], sites: [] })
    .returning();
  const id = row!.id;
  if (kind === "counts") {
    await ctx.server.db.insert(countRows).values([10, 12, 9].map((count, k) => ({ datasetId: id, line: k + 2, site: "", time: 2000 + k, label: String(2000 + k), count })));
  } else {
    await ctx.server.db.insert(fateRows).values([[0, 1, 0], [1, 1, 2], [1, -1, 1]].map(([stage, fate, offspring], k) => ({ datasetId: id, line: k + 2, site: "", individual: `i${k}`, year: 2000, stage: stage!, fate: fate!, offspring: offspring! })));
  }
  return id;
}
const riskSettings = (lifeCycleId: string) => ({ environment: { kind: "matrices", lifeCycleIds: [lifeCycleId], weights: [1] }, initial: [10, 5, 2], horizon: 5, replicates: 10, threshold: { value: 1 } });

const MATRIX: Record<string, Entry> = {
  "GET /health": { access: "public", request: async () => ({ path: "/health" }) },
  "GET /openapi.json": { access: "public", request: async () => ({ path: "/openapi.json" }) },
  "GET /auth/session": { access: "public", request: async () => ({ path: "/auth/session" }) },
  "POST /auth/sign-up": {
    access: "public",
    ownAgent: true,
    request: async () => ({ path: "/auth/sign-up", body: { name: "New Person", email: `new-${unique()}@example.org`, password: "long enough password" } }),
  },
  "POST /auth/sign-in": {
    access: "public",
    ownAgent: true,
    request: async (ctx) => {
      const email = `signin-${unique()}@example.org`;
      await signUpAgent(ctx.server, { email, password: "long enough password" });
      return { path: "/auth/sign-in", body: { email, password: "long enough password" } };
    },
  },
  "POST /auth/sign-up/confirm": {
    access: "public",
    ownAgent: true,
    request: async (ctx) => {
      const email = `confirm-${unique()}@example.org`;
      await (await browserAgent(ctx.server)).post("/api/v1/auth/sign-up", { name: "C", email, password: "long enough password" });
      return { path: "/auth/sign-up/confirm", body: { token: await signUpToken(ctx.server, email) } };
    },
  },
  "POST /auth/sign-out": { access: "public", ownAgent: true, request: async () => ({ path: "/auth/sign-out" }) },
  "POST /auth/password-reset/request": { access: "public", request: async () => ({ path: "/auth/password-reset/request", body: { email: "someone@example.org" } }) },
  "POST /auth/password-reset/confirm": {
    // With a made-up token the answer is 400; what matters here is that nobody is turned away for who they are.
    access: "public",
    request: async () => ({ path: "/auth/password-reset/confirm", body: { token: "made-up", password: "long enough password" } }),
  },
  "PATCH /account/profile": { access: "user", request: async () => ({ path: "/account/profile", body: { name: "Renamed Person" } }) },
  "POST /account/password": { access: "user", request: async () => ({ path: "/account/password", body: { currentPassword: "correct horse battery", newPassword: "correct horse battery" } }) },
  "GET /account/tokens": { access: "user", request: async () => ({ path: "/account/tokens" }) },
  "POST /account/tokens": { access: "user", request: async () => ({ path: "/account/tokens", body: { name: "script" } }) },
  "DELETE /account/tokens/:tokenId": {
    access: "user",
    request: async (ctx) => {
      if (!ctx.userId) return { path: "/account/tokens/00000000-0000-4000-8000-000000000000" };
      const t = await createApiToken(ctx.server.db, ctx.userId, "to revoke");
      return { path: `/account/tokens/${t.id}` };
    },
  },
  "GET /studies": { access: "user", request: async () => ({ path: "/studies" }) },
  "POST /studies": { access: "user", request: async () => ({ path: "/studies", body: { name: `Study ${unique()}` } }) },
  "GET /studies/:studyId": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}` }) },
  "PATCH /studies/:studyId": { access: "owner", request: async (c) => ({ path: `/studies/${c.studyId}`, body: { description: `changed ${unique()}` } }) },
  "GET /studies/:studyId/members": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}/members` }) },
  "PATCH /studies/:studyId/members/:userId": {
    access: "owner",
    request: async (c) => ({ path: `/studies/${c.studyId}/members/${await freshMember(c)}`, body: { role: "reviewer" } }),
  },
  "DELETE /studies/:studyId/members/:userId": {
    // Removing someone else needs the owner role (leaving oneself is tested in studies.test.ts).
    access: "owner",
    request: async (c) => ({ path: `/studies/${c.studyId}/members/${await freshMember(c)}` }),
  },
  "GET /studies/:studyId/invitations": { access: "owner", request: async (c) => ({ path: `/studies/${c.studyId}/invitations` }) },
  "POST /studies/:studyId/invitations": {
    access: "owner",
    request: async (c) => ({ path: `/studies/${c.studyId}/invitations`, body: { email: `invited-${unique()}@example.org`, role: "viewer" } }),
  },
  "DELETE /studies/:studyId/invitations/:invitationId": {
    access: "owner",
    request: async (c) => ({ path: `/studies/${c.studyId}/invitations/${(await freshInvitation(c)).id}` }),
  },
  "GET /studies/:studyId/activity": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}/activity` }) },
  "GET /studies/:studyId/export.zip": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}/export.zip` }) },
  "GET /invitations/:token": { access: "public", request: async (c) => ({ path: `/invitations/${(await freshInvitation(c)).token}` }) },
  // Accepting joins a Study: use another one, so the personas of the matrix Study stay as they are.
  "POST /invitations/:token/accept": { access: "user", request: async (c) => ({ path: `/invitations/${(await freshInvitation(c, otherStudyId)).token}/accept` }) },
  "GET /dev/mail": { access: "public", request: async () => ({ path: "/dev/mail" }) },
  "GET /studies/:studyId/life-cycles": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}/life-cycles` }) },
  "POST /studies/:studyId/life-cycles": { access: "editor", request: async (c) => ({ path: `/studies/${c.studyId}/life-cycles`, body: { name: "New" } }) },
  "GET /studies/:studyId/deleted-life-cycles": { access: "editor", request: async (c) => ({ path: `/studies/${c.studyId}/deleted-life-cycles` }) },
  "POST /life-cycles/:lifeCycleId/undelete": { access: "editor", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c, { deleted: true })}/undelete` }) },
  "GET /life-cycles/:lifeCycleId": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}` }) },
  "PUT /life-cycles/:lifeCycleId": {
    access: "editor",
    request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}`, body: { version: 1, document: threeStageLifeCycle({ name: "Saved" }) } }),
  },
  "DELETE /life-cycles/:lifeCycleId": { access: "editor", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}` }) },
  "POST /life-cycles/:lifeCycleId/duplicate": { access: "editor", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/duplicate`, body: {} }) },
  "GET /life-cycles/:lifeCycleId/analysis": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/analysis` }) },
  "GET /life-cycles/:lifeCycleId/report": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/report` }) },
  "GET /life-cycles/:lifeCycleId/report.pdf": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/report.pdf` }) },
  "GET /life-cycles/:lifeCycleId/snapshots": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/snapshots` }) },
  "POST /life-cycles/:lifeCycleId/snapshots": { access: "editor", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/snapshots`, body: { message: "snap" } }) },
  "GET /snapshots/:snapshotId": { access: "viewer", request: async (c) => ({ path: `/snapshots/${await freshSnapshot(c, await freshLifeCycle(c))}` }) },
  "POST /life-cycles/:lifeCycleId/snapshots/:snapshotId/restore": {
    access: "editor",
    request: async (c) => {
      const id = await freshLifeCycle(c);
      return { path: `/life-cycles/${id}/snapshots/${await freshSnapshot(c, id)}/restore`, body: { version: 1 } };
    },
  },
  "GET /life-cycles/:lifeCycleId/runs": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/runs` }) },
  "POST /life-cycles/:lifeCycleId/runs": {
    access: "editor",
    request: async (c) => {
      const id = await freshLifeCycle(c);
      return { path: `/life-cycles/${id}/runs`, body: { kind: "risk", settings: riskSettings(id) } };
    },
  },
  "GET /runs/:runId": { access: "viewer", request: async (c) => ({ path: `/runs/${await freshRun(c)}` }) },
  "POST /runs/:runId/cancel": { access: "editor", request: async (c) => ({ path: `/runs/${await freshRun(c)}/cancel` }) },
  "GET /life-cycles/:lifeCycleId/comments": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/comments` }) },
  "POST /life-cycles/:lifeCycleId/comments": {
    access: "reviewer",
    request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/comments`, body: { anchor: { kind: "stage", id: "st_j" }, body: "Why 0.4?" } }),
  },
  "POST /comments/:commentId/replies": { access: "reviewer", request: async (c) => ({ path: `/comments/${await freshComment(c)}/replies`, body: { body: "A reply" } }) },
  "PATCH /comments/:commentId": { access: "reviewer", request: async (c) => ({ path: `/comments/${await freshComment(c)}`, body: { body: "Edited" } }) },
  "DELETE /comments/:commentId": { access: "reviewer", request: async (c) => ({ path: `/comments/${await freshComment(c)}` }) },
  "POST /comments/:commentId/resolve": { access: "reviewer", request: async (c) => ({ path: `/comments/${await freshComment(c)}/resolve` }) },
  "POST /comments/:commentId/reopen": { access: "reviewer", request: async (c) => ({ path: `/comments/${await resolvedComment(c)}/reopen` }) },
  "GET /life-cycles/:lifeCycleId/reviews": { access: "viewer", request: async (c) => ({ path: `/life-cycles/${await freshLifeCycle(c)}/reviews` }) },
  "POST /life-cycles/:lifeCycleId/reviews": {
    access: "editor",
    request: async (c) => {
      const id = await freshLifeCycle(c);
      const reviewer = await freshMember(c, "reviewer");
      return { path: `/life-cycles/${id}/reviews`, body: { snapshotId: await freshSnapshot(c, id), reviewerIds: [reviewer], message: "Please look" } };
    },
  },
  "POST /life-cycles/:lifeCycleId/reviews/decision": {
    access: "reviewer",
    request: async (c) => {
      const id = await freshLifeCycle(c);
      return { path: `/life-cycles/${id}/reviews/decision`, body: { snapshotId: await freshSnapshot(c, id), decision: "approved", summary: "Fine." } };
    },
  },
  "GET /account/notifications": { access: "user", request: async () => ({ path: "/account/notifications" }) },
  "PUT /account/notifications": { access: "user", request: async () => ({ path: "/account/notifications", body: { mode: "immediate" } }) },
  "POST /notifications/unsubscribe": {
    access: "public",
    request: async (c) => ({ path: "/notifications/unsubscribe", body: { token: unsubscribeToken(c.server.config.sessionSecret, (await signUpAgent(c.server)).user.id) } }),
  },
  "GET /studies/:studyId/datasets": { access: "viewer", request: async (c) => ({ path: `/studies/${c.studyId}/datasets` }) },
  "POST /studies/:studyId/datasets/preview": { access: "editor", request: async (c) => ({ path: `/studies/${c.studyId}/datasets/preview`, upload: { csv: COUNTS_CSV, fields: {} } }) },
  "POST /studies/:studyId/datasets/check": { access: "editor", request: async (c) => ({ path: `/studies/${c.studyId}/datasets/check`, upload: { csv: COUNTS_CSV, fields: countsFields() } }) },
  "POST /studies/:studyId/datasets": { access: "editor", request: async (c) => ({ path: `/studies/${c.studyId}/datasets`, upload: { csv: FATES_CSV, fields: fatesFields() } }) },
  "GET /datasets/:datasetId": { access: "viewer", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}` }) },
  "PATCH /datasets/:datasetId": { access: "editor", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}`, body: { name: "Renamed" } }) },
  "DELETE /datasets/:datasetId": { access: "editor", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}` }) },
  "GET /datasets/:datasetId/file": { access: "viewer", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}/file` }) },
  "GET /datasets/:datasetId/counts-analysis": { access: "viewer", request: async (c) => ({ path: `/datasets/${await freshDataset(c, "counts")}/counts-analysis?threshold=2` }) },
  "GET /datasets/:datasetId/fate-analysis": { access: "viewer", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}/fate-analysis` }) },
  "POST /datasets/:datasetId/life-cycles": { access: "editor", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}/life-cycles`, body: { name: "From data" } }) },
  "GET /datasets/:datasetId/runs": { access: "viewer", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}/runs` }) },
  "POST /datasets/:datasetId/runs": { access: "editor", request: async (c) => ({ path: `/datasets/${await freshDataset(c)}/runs`, body: { kind: "bootstrap", settings: { resamples: 2000 } } }) },
  "POST /climate/lambda": { access: "user", request: async () => ({ path: "/climate/lambda", body: { document: threeStageLifeCycle(), range: { min: 0, max: 30 }, points: 20 } }) },
  "POST /climate/fit": {
    access: "user",
    request: async () => ({ path: "/climate/fit", body: { form: "arrhenius", measurements: [5, 10, 15, 20, 25].map((t) => ({ temperature: t, value: 0.1 * Math.exp(0.07 * t) })) } }),
  },
  "POST /climate/trajectory": {
    access: "user",
    request: async () => ({ path: "/climate/trajectory", body: { document: threeStageLifeCycle(), trajectory: { kind: "trend", startYear: 2025, years: 10, baseline: 15, trendPerDecade: 0.5, sd: 0 } } }),
  },
  "POST /analyze": { access: "user", request: async () => ({ path: "/analyze", body: { matrix: [[0.5, 1.2], [0.4, 0.8]] } }) },
  "POST /levers": { access: "user", request: async () => ({ path: "/levers", body: { document: threeStageLifeCycle(), breakEven: false } }) },
  "POST /ltre": { access: "user", request: async () => ({ path: "/ltre", body: { reference: threeStageLifeCycle(), comparison: threeStageLifeCycle() } }) },
};

async function freshAgent(persona: Role | "nonMember") {
  const a = await signUpAgent(server);
  if (persona !== "nonMember") await server.db.insert(memberships).values({ studyId, userId: a.user.id, role: persona });
  return { agent: a as BrowserAgent, userId: a.user.id };
}

function expected(access: Access, persona: Persona): "allowed" | 401 | 403 | 404 {
  if (access === "public") return "allowed";
  if (persona === "anonymous") return 401;
  if (access === "user") return "allowed";
  if (persona === "nonMember") return 404;
  return RANK[persona] >= RANK[access] ? "allowed" : 403;
}

function mountedRoutes(server: TestServer): string[] {
  const router = createApiRouter({ db: server.db, pool: server.pool, config: server.config, mailer: { send: async () => {}, close: () => {} }, kinds: {}, jobs: { sendChunks: async () => {}, stop: async () => {} } });
  const out: string[] = [];
  for (const layer of router.stack as { route?: { path: string; methods: Record<string, boolean> } }[]) {
    if (!layer.route) continue;
    for (const m of Object.keys(layer.route.methods)) out.push(`${m.toUpperCase()} ${layer.route.path}`);
  }
  return out;
}

let server: TestServer;
let studyId: string;
let otherStudyId: string;
const agents = new Map<Persona, { agent: BrowserAgent; userId: string | null }>();

beforeAll(async () => {
  server = await startTestServer();
  const owner = await signUpAgent(server);
  studyId = (await owner.post("/api/v1/studies", { name: "Matrix Study" })).body.id;
  otherStudyId = (await owner.post("/api/v1/studies", { name: "Another Study" })).body.id;
  agents.set("owner", { agent: owner, userId: owner.user.id });
  for (const role of ["editor", "reviewer", "viewer"] as const) {
    const a = await signUpAgent(server);
    await server.db.insert(memberships).values({ studyId, userId: a.user.id, role });
    agents.set(role, { agent: a, userId: a.user.id });
  }
  const outsider = await signUpAgent(server);
  agents.set("nonMember", { agent: outsider, userId: outsider.user.id });
});
afterAll(async () => {
  await server?.close();
});

describe("authorisation matrix", () => {
  it("has an entry for every mounted route, and no entry for a route that is not mounted", () => {
    const mounted = mountedRoutes(server);
    expect(mounted.filter((r) => !(r in MATRIX))).toEqual([]);
    expect(Object.keys(MATRIX).filter((r) => !mounted.includes(r))).toEqual([]);
  });

  for (const [route, entry] of Object.entries(MATRIX)) {
    it(`${route} (${entry.access})`, async () => {
      const [method, _path] = route.split(" ") as [string, string];
      const outcomes: string[] = [];
      for (const persona of PERSONAS) {
        // Sign-out and sign-in change who the agent is: give those routes a fresh agent of the same persona.
        const held = persona === "anonymous" ? { agent: await browserAgent(server), userId: null } : entry.ownAgent ? await freshAgent(persona) : agents.get(persona)!;
        const ctx: Ctx = { server, studyId, persona, agent: held.agent, userId: held.userId };
        const { path, body, upload } = await entry.request(ctx);
        const url = `/api/v1${path}`;
        const m = method.toLowerCase() as "get" | "post" | "patch" | "delete" | "put";
        const res = upload
          ? await uploadCsv(held.agent, url, { content: upload.csv }, upload.fields)
          : m === "get" ? await held.agent.get(url) : m === "delete" ? await held.agent.delete(url) : await held.agent[m](url, body);
        const want = expected(entry.access, persona);
        const ok = want === "allowed" ? ![401, 403].includes(res.status) && res.status < 500 && (res.status !== 404 || route.includes("made-up")) : res.status === want;
        if (!ok) outcomes.push(`${persona}: got ${res.status} ${JSON.stringify(res.body)}, wanted ${want}`);
        if (want === "allowed" && entry.access !== "public") expect(res.status, `${persona} ${route}`).toBeLessThan(300);
      }
      expect(outcomes).toEqual([]);
    });
  }
});
