import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, invitations, memberships, studies } from "../../server/db/schema";
import { expectConsoleError } from "../helpers/console";
import { browserAgent, signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

async function studyWithOwner() {
  const owner = await signUpAgent(server);
  const res = await owner.post("/api/v1/studies", { name: "Fen survey", description: "Counts from two ponds" });
  expect(res.status).toBe(201);
  return { owner, studyId: res.body.id as string };
}

describe("studies", () => {
  it("creates a Study with its creator as owner and an activity row", async () => {
    const { owner, studyId } = await studyWithOwner();
    const list = await owner.get("/api/v1/studies");
    expect(list.body).toEqual([expect.objectContaining({ id: studyId, name: "Fen survey", role: "owner", memberCount: 1, archivedAt: null })]);
    const activity = await owner.get(`/api/v1/studies/${studyId}/activity`);
    expect(activity.body[0]).toMatchObject({ action: "study.created", actorName: owner.user.name });
  });

  it("renames and archives, recording each change", async () => {
    const { owner, studyId } = await studyWithOwner();
    const res = await owner.patch(`/api/v1/studies/${studyId}`, { name: "Fen survey 2027", archived: true });
    expect(res.status).toBe(200);
    expect(res.body.name).toBe("Fen survey 2027");
    expect(res.body.archivedAt).not.toBeNull();
    const events = await server.db.select().from(auditEvents).where(eq(auditEvents.studyId, studyId));
    expect(events.map((e) => e.action).sort()).toEqual(["study.created", "study.updated"]);
    expect(events.find((e) => e.action === "study.updated")!.summary).toMatch(/renamed.*archived/);
  });

  it("names the field of a bad payload and keeps the saved Study", async () => {
    const { owner, studyId } = await studyWithOwner();
    const res = await owner.patch(`/api/v1/studies/${studyId}`, { name: "x".repeat(500) });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe("name");
    const [row] = await server.db.select().from(studies).where(eq(studies.id, studyId));
    expect(row!.name).toBe("Fen survey");
    const unknown = await owner.patch(`/api/v1/studies/${studyId}`, { colour: "red" });
    expect(unknown.status).toBe(400);
  });

  it("answers 404 for an id that is not a uuid", async () => {
    const { owner } = await studyWithOwner();
    expect((await owner.get("/api/v1/studies/not-a-uuid")).status).toBe(404);
  });

  it("rolls back the change when its activity row cannot be written", async () => {
    const { owner, studyId } = await studyWithOwner();
    // Make the audit insert fail inside the same transaction as the rename.
    await server.pool.query(`ALTER TABLE audit_events ADD CONSTRAINT no_updates CHECK (action <> 'study.updated') NOT VALID`);
    try {
      const res = await owner.patch(`/api/v1/studies/${studyId}`, { name: "Should not stick" });
      expect(res.status).toBe(500);
      expect(res.body.error.message).not.toMatch(/no_updates|constraint/);
      expectConsoleError(/500 on PATCH/);
    } finally {
      await server.pool.query(`ALTER TABLE audit_events DROP CONSTRAINT no_updates`);
    }
    const [row] = await server.db.select().from(studies).where(eq(studies.id, studyId));
    expect(row!.name).toBe("Fen survey");
  }, 15_000);
});

describe("members", () => {
  it("keeps at least one owner", async () => {
    const { owner, studyId } = await studyWithOwner();
    const demote = await owner.patch(`/api/v1/studies/${studyId}/members/${owner.user.id}`, { role: "editor" });
    expect(demote.status).toBe(409);
    expect(demote.body.error.message).toMatch(/at least one owner/);
    const leave = await owner.delete(`/api/v1/studies/${studyId}/members/${owner.user.id}`);
    expect(leave.status).toBe(409);
  });

  it("lets an owner change roles and remove members, and a member leave", async () => {
    const { owner, studyId } = await studyWithOwner();
    const a = await signUpAgent(server);
    const b = await signUpAgent(server);
    await server.db.insert(memberships).values([
      { studyId, userId: a.user.id, role: "viewer" },
      { studyId, userId: b.user.id, role: "viewer" },
    ]);
    const promoted = await owner.patch(`/api/v1/studies/${studyId}/members/${a.user.id}`, { role: "owner" });
    expect(promoted.body).toMatchObject({ userId: a.user.id, role: "owner" });
    // Now there are two owners: the first may step down.
    expect((await owner.patch(`/api/v1/studies/${studyId}/members/${owner.user.id}`, { role: "editor" })).status).toBe(200);
    // A viewer cannot remove someone else but can leave.
    expect((await b.delete(`/api/v1/studies/${studyId}/members/${a.user.id}`)).status).toBe(403);
    expect((await b.delete(`/api/v1/studies/${studyId}/members/${b.user.id}`)).status).toBe(204);
    expect((await b.get(`/api/v1/studies/${studyId}`)).status).toBe(404);
    const actions = (await a.get(`/api/v1/studies/${studyId}/activity`)).body.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(["member.role_changed", "member.left"]));
  });
});

describe("invitations", () => {
  it("invites by e-mail; a new person signs up through the link and joins with the role", async () => {
    const { owner, studyId } = await studyWithOwner();
    const res = await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: "New.Reviewer@example.org", role: "reviewer" });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ email: "new.reviewer@example.org", role: "reviewer", invitedBy: owner.user.name });
    const mail = await server.mailTo("new.reviewer@example.org");
    const link = mail.links.find((l) => l.includes("/invitations/"))!;
    const token = link.split("/invitations/")[1]!;
    const [stored] = await server.db.select().from(invitations).where(eq(invitations.studyId, studyId));
    expect(stored!.tokenHash).not.toBe(token);

    const anon = await browserAgent(server);
    const preview = await anon.get(`/api/v1/invitations/${token}`);
    expect(preview.body).toEqual({ studyName: "Fen survey", role: "reviewer", email: "new.reviewer@example.org", invitedBy: owner.user.name, accountExists: false });
    const signUp = await anon.post("/api/v1/auth/sign-up", { name: "Rev", email: "new.reviewer@example.org", password: "long enough password", invitationToken: token });
    expect(signUp.status).toBe(201);
    expect(signUp.body.joinedStudyId).toBe(studyId);
    expect((await anon.get(`/api/v1/studies/${studyId}`)).body.role).toBe("reviewer");
    // Single use.
    expect((await anon.get(`/api/v1/invitations/${token}`)).status).toBe(404);
    expect((await owner.get(`/api/v1/studies/${studyId}/invitations`)).body).toEqual([]);
  });

  it("lets an existing user accept, and refuses a revoked link", async () => {
    const { owner, studyId } = await studyWithOwner();
    const other = await signUpAgent(server);
    await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: other.user.email, role: "editor" });
    const token = (await server.mailTo(other.user.email)).links.find((l) => l.includes("/invitations/"))!.split("/invitations/")[1]!;
    expect((await other.get(`/api/v1/invitations/${token}`)).body.accountExists).toBe(true);
    expect((await other.post(`/api/v1/invitations/${token}/accept`)).body).toEqual({ studyId });
    expect((await other.get(`/api/v1/studies/${studyId}`)).body.role).toBe("editor");

    const third = await signUpAgent(server);
    const inv = await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: third.user.email, role: "viewer" });
    const token3 = (await server.mailTo(third.user.email)).links.find((l) => l.includes("/invitations/"))!.split("/invitations/")[1]!;
    expect((await owner.delete(`/api/v1/studies/${studyId}/invitations/${inv.body.id}`)).status).toBe(204);
    expect((await third.post(`/api/v1/invitations/${token3}/accept`)).status).toBe(404);
  });

  it("refuses to invite a current member", async () => {
    const { owner, studyId } = await studyWithOwner();
    const res = await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: owner.user.email, role: "viewer" });
    expect(res.status).toBe(409);
  });
});

describe("API tokens", () => {
  it("mints a token shown once, stored as SHA-256, usable as Bearer without CSRF, and revocable", async () => {
    const { owner, studyId } = await studyWithOwner();
    // Writes need a read-write token (a new token is read-only unless asked otherwise: see api-tokens.test.ts).
    const created = await owner.post("/api/v1/account/tokens", { name: "nightly script", scope: "read-write", expiresInDays: 30 });
    expect(created.status).toBe(201);
    const token: string = created.body.token;
    expect(token).toMatch(/^sw_[A-Za-z0-9_-]{43}$/);
    expect((await owner.get("/api/v1/account/tokens")).body[0]).not.toHaveProperty("token");
    const rows = await server.pool.query("select token_hash from api_tokens");
    expect(rows.rows[0].token_hash).toMatch(/^[0-9a-f]{64}$/);
    expect(rows.rows[0].token_hash).not.toContain(token);

    const { default: supertest } = await import("supertest");
    const bearer = (req: ReturnType<ReturnType<typeof supertest>["get"]>) => req.set("Authorization", `Bearer ${token}`);
    expect((await bearer(supertest(server.app).get(`/api/v1/studies/${studyId}`))).status).toBe(200);
    const write = await supertest(server.app).post("/api/v1/studies").set("Authorization", `Bearer ${token}`).send({ name: "From a script" });
    expect(write.status).toBe(201);
    expect((await supertest(server.app).get("/api/v1/studies").set("Authorization", "Bearer sw_wrong")).status).toBe(401);

    expect((await owner.delete(`/api/v1/account/tokens/${created.body.id}`)).status).toBe(204);
    expect((await bearer(supertest(server.app).get("/api/v1/studies"))).status).toBe(401);
  });
});
