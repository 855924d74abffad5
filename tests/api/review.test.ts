import { and, eq, isNull } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, comments, mailOutbox, memberships, notifications, reviews } from "../../server/db/schema";
import { createMailer } from "../../server/mail/mailer";
import { startThread } from "../../server/services/comments";
import { notificationMode, sendDigests } from "../../server/services/notifications";
import { askForReview, recordDecision } from "../../server/services/reviews";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { expectConsoleError } from "../helpers/console";
import { browserAgent, signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(async () => {
  await server?.close();
});

type Agent = Awaited<ReturnType<typeof signUpAgent>>;

/** A Study with an owner, an editor, a reviewer and a viewer, and one life cycle with a snapshot. */
async function team() {
  const owner = await signUpAgent(server, { name: "Olive Owner" });
  const studyId = (await owner.post("/api/v1/studies", { name: "Pond study" })).body.id as string;
  const member = async (role: "editor" | "reviewer" | "viewer", name: string) => {
    const a = await signUpAgent(server, { name });
    await server.db.insert(memberships).values({ studyId, userId: a.user.id, role });
    return a;
  };
  const editor = await member("editor", "Eddie Editor");
  const reviewer = await member("reviewer", "Rita Reviewer");
  const viewer = await member("viewer", "Vic Viewer");
  const lc = await editor.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Ponds" }) });
  expect(lc.status).toBe(201);
  const lifeCycleId = lc.body.id as string;
  const snap = await editor.post(`/api/v1/life-cycles/${lifeCycleId}/snapshots`, { message: "Baseline" });
  expect(snap.status).toBe(201);
  return { owner, editor, reviewer, viewer, studyId, lifeCycleId, snapshotId: snap.body.id as string };
}

const comment = (a: BrowserAgent, lifeCycleId: string, body: object) => a.post(`/api/v1/life-cycles/${lifeCycleId}/comments`, body);

/** Every mail to `to` (newest first). */
async function mailsTo(to: string) {
  const rows = await server.db.select().from(mailOutbox);
  return rows.filter((r) => r.to.split(", ").includes(to)).sort((a, b) => b.id - a.id);
}

/** Follows an e-mailed link: the page is served, and the API behind its ids answers the recipient. */
async function linkWorks(link: string, as: BrowserAgent) {
  const url = new URL(link);
  expect(url.origin).toBe(server.url);
  const page = await fetch(link);
  expect(page.status).toBe(200);
  expect(await page.text()).toContain('<div id="root">');
  const lifeCycleId = /^\/life-cycles\/([0-9a-f-]{36})$/.exec(url.pathname)?.[1];
  expect(lifeCycleId).toBeTruthy();
  expect((await as.get(`/api/v1/life-cycles/${lifeCycleId}`)).status).toBe(200);
  return url;
}

describe("comments", () => {
  it("anchors threads to each kind of anchor, with a readable label", async () => {
    const t = await team();
    const anchors = [
      [{ kind: "lifeCycle" }, "the life cycle as a whole"],
      [{ kind: "stage", id: "st_a" }, "stage Adult"],
      [{ kind: "transition", id: "tr_sa" }, "arrow Subadult → Adult (growth)"],
      [{ kind: "transition", id: "tr_aa" }, "arrow Adult ↺ (stasis)"],
      [{ kind: "rate", id: "vr_sa" }, "vital rate s_a"],
      [{ kind: "cell", to: "st_j", from: "st_a" }, "matrix entry from Adult to Juvenile"],
      [{ kind: "snapshot", snapshotId: t.snapshotId }, "snapshot #1 (Baseline)"],
    ] as const;
    for (const [anchor, label] of anchors) {
      const res = await comment(t.reviewer, t.lifeCycleId, { anchor, body: `About ${label}` });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body).toMatchObject({ anchor, anchorLabel: label, authorName: "Rita Reviewer", body: `About ${label}`, resolvedAt: null, replies: [] });
    }
    const list = await t.viewer.get(`/api/v1/life-cycles/${t.lifeCycleId}/comments`);
    expect(list.status).toBe(200);
    expect(list.body.map((x: { anchorLabel: string }) => x.anchorLabel)).toEqual(anchors.map((a) => a[1]));
  });

  it("threads replies, edits own comments only, deletes, resolves and reopens — each with its activity row", async () => {
    const t = await team();
    const started = await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "transition", id: "tr_js" }, body: "Is s_j from the 2019 season?" });
    const threadId = started.body.id as string;
    const reply = await t.editor.post(`/api/v1/comments/${threadId}/replies`, { body: "Yes, 2019 only." });
    expect(reply.status).toBe(201);
    expect(reply.body.replies).toEqual([expect.objectContaining({ body: "Yes, 2019 only.", authorName: "Eddie Editor" })]);
    const replyId = reply.body.replies[0].id as string;

    // Someone else's comment: neither the reviewer nor the owner may edit it.
    expect((await t.reviewer.patch(`/api/v1/comments/${replyId}`, { body: "changed" })).status).toBe(403);
    expect((await t.owner.patch(`/api/v1/comments/${replyId}`, { body: "changed" })).status).toBe(403);
    const edited = await t.editor.patch(`/api/v1/comments/${replyId}`, { body: "Yes, the 2019 season only." });
    expect(edited.status).toBe(200);
    expect(edited.body.replies[0]).toMatchObject({ body: "Yes, the 2019 season only.", editedAt: expect.any(String) });

    // A reviewer cannot delete the editor's reply; the owner (moderation) can.
    expect((await t.reviewer.delete(`/api/v1/comments/${replyId}`)).status).toBe(403);
    expect((await t.owner.delete(`/api/v1/comments/${replyId}`)).status).toBe(204);
    expect((await t.owner.delete(`/api/v1/comments/${replyId}`)).status).toBe(404);

    const resolved = await t.editor.post(`/api/v1/comments/${threadId}/resolve`);
    expect(resolved.status).toBe(200);
    expect(resolved.body).toMatchObject({ resolvedAt: expect.any(String), resolvedByName: "Eddie Editor" });
    expect(resolved.body.replies[0]).toMatchObject({ body: "", deletedAt: expect.any(String) });
    expect((await t.editor.post(`/api/v1/comments/${threadId}/resolve`)).status).toBe(409);
    const reopened = await t.reviewer.post(`/api/v1/comments/${threadId}/reopen`);
    expect(reopened.body).toMatchObject({ resolvedAt: null, resolvedByName: null });

    const actions = (await t.viewer.get(`/api/v1/studies/${t.studyId}/activity?kind=comment`)).body.map((e: { action: string }) => e.action);
    expect(actions).toEqual(["comment.reopened", "comment.resolved", "comment.deleted", "comment.edited", "comment.replied", "comment.created"]);
  });

  it("lets viewers read but not comment; non-members get 404, anonymous 401", async () => {
    const t = await team();
    const res = await comment(t.viewer, t.lifeCycleId, { anchor: { kind: "lifeCycle" }, body: "hello" });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toMatch(/reviewer role/);
    const outsider = await signUpAgent(server);
    expect((await outsider.get(`/api/v1/life-cycles/${t.lifeCycleId}/comments`)).status).toBe(404);
    expect((await comment(outsider, t.lifeCycleId, { anchor: { kind: "lifeCycle" }, body: "hello" })).status).toBe(404);
    expect((await (await browserAgent(server)).get(`/api/v1/life-cycles/${t.lifeCycleId}/comments`)).status).toBe(401);
    // Reviewers comment but still cannot edit the life cycle.
    expect((await t.reviewer.put(`/api/v1/life-cycles/${t.lifeCycleId}`, { version: 1, document: threeStageLifeCycle() })).status).toBe(403);
  });

  it("refuses bad comments with a 400 naming the field, and stores nothing", async () => {
    const t = await team();
    const other = await t.editor.post(`/api/v1/studies/${t.studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Other" }) });
    const otherSnap = await t.editor.post(`/api/v1/life-cycles/${other.body.id}/snapshots`, { message: "other" });
    const outsider = await signUpAgent(server);
    const cases: [object, string, RegExp][] = [
      [{ anchor: { kind: "lifeCycle" }, body: "   " }, "body", /cannot be empty/],
      [{ anchor: { kind: "lifeCycle" }, body: "x".repeat(5001) }, "body", /at most 5000/],
      [{ anchor: { kind: "lifeCycle" } }, "body", /./],
      [{ anchor: { kind: "stage", id: "st_nope" }, body: "b" }, "anchor.id", /no stage/],
      [{ anchor: { kind: "transition", id: "st_a" }, body: "b" }, "anchor.id", /no arrow/],
      [{ anchor: { kind: "rate", id: "tr_aa" }, body: "b" }, "anchor.id", /no vital rate/],
      [{ anchor: { kind: "cell", to: "st_a", from: "st_x" }, body: "b" }, "anchor.from", /no stage/],
      [{ anchor: { kind: "snapshot", snapshotId: otherSnap.body.id }, body: "b" }, "anchor.snapshotId", /no snapshot/],
      [{ anchor: { kind: "elsewhere" }, body: "b" }, "anchor.kind", /anchor kind/],
      [{ anchor: { kind: "lifeCycle" }, body: "b", mentions: [outsider.user.id] }, "mentions.0", /only members/],
      [{ anchor: { kind: "lifeCycle" }, body: "b", mentions: ["not-a-uuid"] }, "mentions.0", /valid id/],
    ];
    for (const [body, path, message] of cases) {
      const res = await comment(t.reviewer, t.lifeCycleId, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.fields[0].path).toBe(path);
      expect(res.body.error.fields[0].message + res.body.error.message).toMatch(message);
    }
    const rows = await server.db.select().from(comments).where(eq(comments.lifeCycleId, t.lifeCycleId));
    expect(rows).toEqual([]);
    // Script-like text is stored exactly as typed (the client shows it as text).
    const xss = await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "lifeCycle" }, body: "<script>alert(1)</script> [x](javascript:alert(2))" });
    expect(xss.body.body).toBe("<script>alert(1)</script> [x](javascript:alert(2))");
  });
});

describe("reviews", () => {
  it("asks reviewers, records decisions, and shows changed-since-approval after a model edit (not a layout move)", async () => {
    const t = await team();
    const base = `/api/v1/life-cycles/${t.lifeCycleId}/reviews`;
    expect((await t.viewer.get(base)).body.status.state).toBe("none");
    const asked = await t.editor.post(base, { snapshotId: t.snapshotId, reviewerIds: [t.reviewer.user.id, t.owner.user.id], message: "Please check s_a" });
    expect(asked.status).toBe(201);
    expect(asked.body.status).toMatchObject({ state: "requested", snapshotNumber: 1, pending: 2 });
    expect((await t.reviewer.post(base, { snapshotId: t.snapshotId, reviewerIds: [t.owner.user.id] })).status).toBe(403);

    const changes = await t.reviewer.post(`${base}/decision`, { snapshotId: t.snapshotId, decision: "changes_requested", summary: "Cite s_a." });
    expect(changes.body.status).toMatchObject({ state: "changes_requested", changeRequests: 1, pending: 1 });
    await t.reviewer.post(`${base}/decision`, { snapshotId: t.snapshotId, decision: "approved", summary: "Cited now, thanks." });
    const approved = await t.owner.post(`${base}/decision`, { snapshotId: t.snapshotId, decision: "approved", summary: "Agreed." });
    expect(approved.body.status).toMatchObject({ state: "approved", approvals: 2, changedSinceApproval: false });
    expect(approved.body.reviews.map((r: { reviewerName: string; state: string }) => [r.reviewerName, r.state]).sort()).toEqual([
      ["Olive Owner", "approved"],
      ["Rita Reviewer", "approved"],
    ]);

    const lc = (await t.editor.get(`/api/v1/life-cycles/${t.lifeCycleId}`)).body;
    const moved = { ...lc.document, stages: lc.document.stages.map((s: { position: { x: number; y: number } }) => ({ ...s, position: { x: s.position.x + 50, y: 10 } })) };
    const saved = await t.editor.put(`/api/v1/life-cycles/${t.lifeCycleId}`, { version: lc.version, document: moved });
    expect(saved.status).toBe(200);
    expect((await t.viewer.get(base)).body.status.changedSinceApproval).toBe(false);
    const edited = { ...moved, rates: moved.rates.map((r: { name: string; value: number }) => (r.name === "s_a" ? { ...r, value: 0.8 } : r)) };
    expect((await t.editor.put(`/api/v1/life-cycles/${t.lifeCycleId}`, { version: saved.body.version, document: edited })).status).toBe(200);
    expect((await t.viewer.get(base)).body.status).toMatchObject({ state: "approved", changedSinceApproval: true, snapshotId: t.snapshotId });

    const actions = (await t.viewer.get(`/api/v1/studies/${t.studyId}/activity?kind=review`)).body.map((e: { action: string }) => e.action);
    expect(actions).toEqual(["review.approved", "review.approved", "review.changes_requested", "review.requested"]);
  });

  it("refuses a snapshot of another Study, viewers and non-members as reviewers, and an empty summary", async () => {
    const t = await team();
    const u = await team();
    const base = `/api/v1/life-cycles/${t.lifeCycleId}/reviews`;
    const foreign = await t.editor.post(base, { snapshotId: u.snapshotId, reviewerIds: [t.reviewer.user.id] });
    expect(foreign.status).toBe(404);
    expect(foreign.body.error.message).toMatch(/no snapshot/);
    expect((await t.reviewer.post(`${base}/decision`, { snapshotId: u.snapshotId, decision: "approved", summary: "ok" })).status).toBe(404);
    const viewerAsked = await t.editor.post(base, { snapshotId: t.snapshotId, reviewerIds: [t.viewer.user.id] });
    expect(viewerAsked.status).toBe(400);
    expect(viewerAsked.body.error.fields[0]).toMatchObject({ path: "reviewerIds.0", message: "A viewer cannot review." });
    const outsiderAsked = await t.editor.post(base, { snapshotId: t.snapshotId, reviewerIds: [t.reviewer.user.id, u.reviewer.user.id] });
    expect(outsiderAsked.body.error.fields[0].path).toBe("reviewerIds.1");
    expect((await t.editor.post(base, { snapshotId: t.snapshotId, reviewerIds: [] })).body.error.fields[0].path).toBe("reviewerIds");
    const empty = await t.reviewer.post(`${base}/decision`, { snapshotId: t.snapshotId, decision: "approved", summary: " " });
    expect(empty.body.error.fields[0]).toMatchObject({ path: "summary" });
    expect((await t.reviewer.post(`${base}/decision`, { snapshotId: t.snapshotId, decision: "maybe", summary: "x" })).body.error.fields[0].path).toBe("decision");
    expect(await server.db.select().from(reviews).where(eq(reviews.lifeCycleId, t.lifeCycleId))).toEqual([]);
  });
});

describe("e-mail notifications", () => {
  it("sends review requested, review decision, mention and reply e-mails, each with a working link and an unsubscribe link", async () => {
    const t = await team();
    await t.editor.post(`/api/v1/life-cycles/${t.lifeCycleId}/reviews`, { snapshotId: t.snapshotId, reviewerIds: [t.reviewer.user.id] });
    const requested = await server.mailTo(t.reviewer.user.email);
    expect(requested.subject).toBe("Eddie Editor asks you to review “Ponds” (snapshot #1)");
    const reqUrl = await linkWorks(requested.links[0]!, t.reviewer);
    expect(reqUrl.searchParams.get("tab")).toBe("review");
    expect(reqUrl.searchParams.get("snapshot")).toBe(t.snapshotId);

    await t.reviewer.post(`/api/v1/life-cycles/${t.lifeCycleId}/reviews/decision`, { snapshotId: t.snapshotId, decision: "changes_requested", summary: "Cite the adult survival source." });
    const decided = await server.mailTo(t.editor.user.email);
    expect(decided.subject).toBe("Rita Reviewer asked for changes to “Ponds” (snapshot #1)");
    expect(decided.text).toContain("Cite the adult survival source.");
    await linkWorks(decided.links[0]!, t.editor);

    const thread = await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "stage", id: "st_a" }, body: "@Vic Viewer does the adult count include 2021?", mentions: [t.viewer.user.id] });
    const mention = await server.mailTo(t.viewer.user.email);
    expect(mention.subject).toBe("Rita Reviewer mentioned you in a comment on “Ponds”");
    expect(mention.text).toContain("> @Vic Viewer does the adult count include 2021?");
    const mUrl = await linkWorks(mention.links[0]!, t.viewer);
    expect(mUrl.searchParams.get("thread")).toBe(thread.body.id);

    await t.editor.post(`/api/v1/comments/${thread.body.id}/replies`, { body: "It does." });
    const reply = await server.mailTo(t.reviewer.user.email);
    expect(reply.subject).toBe("Eddie Editor replied to your comment on “Ponds”");
    expect(new URL(reply.links[0]!).searchParams.get("thread")).toBe(thread.body.id);

    // Nobody is told about their own actions.
    expect((await mailsTo(t.editor.user.email)).map((m) => m.subject)).toEqual([decided.subject]);

    // The unsubscribe link works without signing in.
    const unsubscribe = reply.links.find((l) => l.includes("/unsubscribe?token="))!;
    const token = new URL(unsubscribe).searchParams.get("token")!;
    const page = await fetch(unsubscribe);
    expect(page.status).toBe(200);
    const anonymous = await browserAgent(server);
    const res = await anonymous.post("/api/v1/notifications/unsubscribe", { token });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ email: t.reviewer.user.email, mode: "off" });
    expect(await notificationMode(server.db, t.reviewer.user.id)).toBe("off");
    const forged = await anonymous.post("/api/v1/notifications/unsubscribe", { token: `${t.editor.user.id}.${token.split(".")[1]}` });
    expect(forged.status).toBe(400);
    expect(forged.body.error.fields[0].path).toBe("token");
    expect(await notificationMode(server.db, t.editor.user.id)).toBe("immediate");

    // Off means off.
    const before = (await mailsTo(t.reviewer.user.email)).length;
    await t.editor.post(`/api/v1/comments/${thread.body.id}/replies`, { body: "And 2022." });
    await new Promise((r) => setTimeout(r, 300));
    expect((await mailsTo(t.reviewer.user.email)).length).toBe(before);
  });

  it("sends an invitation to an existing account with an unsubscribe link, and also when e-mail is off (an invitation is not a notification)", async () => {
    const t = await team();
    const invitee = await signUpAgent(server);
    await t.owner.post(`/api/v1/studies/${t.studyId}/invitations`, { email: invitee.user.email, role: "reviewer" });
    const mail = await server.mailTo(invitee.user.email);
    expect(mail.subject).toMatch(/invited you to the Study “Pond study”/);
    const invitationLink = mail.links.find((l) => l.includes("/invitations/"))!;
    expect((await fetch(invitationLink)).status).toBe(200);
    const token = new URL(invitationLink).pathname.split("/").pop()!;
    expect((await invitee.get(`/api/v1/invitations/${token}`)).status).toBe(200);
    expect(mail.links.some((l) => l.includes("/unsubscribe?token="))).toBe(true);

    const quiet = await signUpAgent(server);
    expect((await quiet.put("/api/v1/account/notifications", { mode: "off" })).body).toEqual({ mode: "off" });
    expect((await quiet.put("/api/v1/account/notifications", { mode: "weekly" })).body.error.fields[0].path).toBe("mode");
    const invited = await t.owner.post(`/api/v1/studies/${t.studyId}/invitations`, { email: quiet.user.email, role: "viewer" });
    expect(invited.status).toBe(201);
    const quietMail = await server.mailTo(quiet.user.email, 5000, /invited you to the Study/);
    const quietLink = quietMail.links.find((l) => l.includes("/invitations/"))!;
    expect((await quiet.get(`/api/v1/invitations/${new URL(quietLink).pathname.split("/").pop()}`)).status).toBe(200);
    // No link to stop what is already stopped; the setting itself is left as it was.
    expect(quietMail.links.some((l) => l.includes("/unsubscribe?token="))).toBe(false);
    expect((await quiet.get("/api/v1/account/notifications")).body).toEqual({ mode: "off" });
    // Notifications, on the other hand, stay off.
    await quiet.post(`/api/v1/invitations/${new URL(quietLink).pathname.split("/").pop()}/accept`);
    expect((await mailsTo(quiet.user.email)).map((m) => m.subject)).toEqual([quietMail.subject]);
  });

  it("collects digest notifications into one daily e-mail with every link", async () => {
    const t = await team();
    expect((await t.editor.put("/api/v1/account/notifications", { mode: "digest" })).status).toBe(200);
    expect((await t.editor.get("/api/v1/account/notifications")).body).toEqual({ mode: "digest" });
    const a = await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "rate", id: "vr_f" }, body: "@Eddie Editor where is f from?", mentions: [t.editor.user.id] });
    await t.reviewer.post(`/api/v1/life-cycles/${t.lifeCycleId}/reviews/decision`, { snapshotId: t.snapshotId, decision: "approved", summary: "Fine otherwise." });
    await new Promise((r) => setTimeout(r, 300));
    expect(await mailsTo(t.editor.user.email)).toEqual([]);
    const waiting = await server.db.select().from(notifications).where(and(eq(notifications.userId, t.editor.user.id), isNull(notifications.sentAt)));
    expect(waiting.map((n) => [n.kind, n.mode])).toEqual([
      ["mention", "digest"],
      ["review_decision", "digest"],
    ]);

    const mailer = createMailer(server.config.smtp);
    const deps = { mailer, publicUrl: server.url, secret: server.config.sessionSecret };
    const sent = await sendDigests(server.db, deps);
    expect(sent.digests).toBeGreaterThanOrEqual(1);
    const digest = await server.mailTo(t.editor.user.email);
    expect(digest.subject).toBe("Stagewright daily digest: 2 updates");
    expect(digest.text).toContain("1. Rita Reviewer mentioned you in a comment on “Ponds”");
    expect(digest.text).toContain("2. Rita Reviewer approved “Ponds” (snapshot #1)");
    const threadLink = digest.links.find((l) => l.includes(`thread=${a.body.id}`))!;
    await linkWorks(threadLink, t.editor);
    await linkWorks(digest.links.find((l) => l.includes(`snapshot=${t.snapshotId}`))!, t.editor);
    expect(digest.links.some((l) => l.includes("/unsubscribe?token="))).toBe(true);
    // Sent once: the next run finds nothing for this person.
    await sendDigests(server.db, deps);
    mailer.close();
    expect((await mailsTo(t.editor.user.email)).length).toBe(1);
  });
});

describe("activity log", () => {
  it("filters by kind, person, life cycle and date, and pages with `before`", async () => {
    const t = await team();
    await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "lifeCycle" }, body: "one" });
    const other = await t.editor.post(`/api/v1/studies/${t.studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Other" }) });
    const get = async (q: string) => (await t.viewer.get(`/api/v1/studies/${t.studyId}/activity?${q}`)).body as { id: string; action: string; actorId: string; lifeCycleId: string | null }[];
    expect((await get(`actorId=${t.reviewer.user.id}`)).map((e) => e.action)).toEqual(["comment.created"]);
    expect((await get(`lifeCycleId=${other.body.id}`)).map((e) => e.action)).toEqual(["life_cycle.created"]);
    expect((await get(`lifeCycleId=${t.lifeCycleId}`)).map((e) => e.action)).toEqual(["comment.created", "snapshot.created", "life_cycle.created"]);
    expect((await get("kind=snapshot")).map((e) => e.action)).toEqual(["snapshot.created"]);
    const today = new Date().toISOString().slice(0, 10);
    expect((await get(`from=${today}&to=${today}`)).length).toBe((await get("")).length);
    expect(await get("to=2000-01-01")).toEqual([]);
    const page1 = await get("limit=2");
    const page2 = await get(`limit=2&before=${page1[1]!.id}`);
    expect(page1.length).toBe(2);
    expect(Number(page2[0]!.id)).toBeLessThan(Number(page1[1]!.id));
    const bad = await t.viewer.get(`/api/v1/studies/${t.studyId}/activity?kind=nonsense&from=yesterday`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(["from", "kind"]);
  });
});

describe("the change and its activity row commit or roll back together (real PostgreSQL)", () => {
  const actor = async (a: Agent, role: "editor" | "reviewer") => ({ id: a.user.id, name: a.user.name, role });
  const countRows = async (studyId: string, lifeCycleId: string) => ({
    comments: (await server.db.select().from(comments).where(eq(comments.lifeCycleId, lifeCycleId))).length,
    reviews: (await server.db.select().from(reviews).where(eq(reviews.lifeCycleId, lifeCycleId))).length,
    events: (await server.db.select().from(auditEvents).where(eq(auditEvents.studyId, studyId))).length,
    notifications: (await server.db.select().from(notifications)).length,
  });

  it("a comment: throwing after both writes stores neither", async () => {
    const t = await team();
    const before = await countRows(t.studyId, t.lifeCycleId);
    const failing = server.db.transaction(async (tx) => {
      const { result } = await startThread(tx, { studyId: t.studyId, lifeCycleId: t.lifeCycleId }, await actor(t.reviewer, "reviewer"), { anchor: { kind: "stage", id: "st_j" }, body: "@Eddie", mentions: [t.editor.user.id] });
      // Both writes are visible inside the transaction…
      expect((await tx.select().from(comments).where(eq(comments.id, result.id))).length).toBe(1);
      expect((await tx.select().from(auditEvents).where(and(eq(auditEvents.studyId, t.studyId), eq(auditEvents.action, "comment.created")))).length).toBe(1);
      throw new Error("fail after both writes");
    });
    await expect(failing).rejects.toThrow("fail after both writes");
    expect(await countRows(t.studyId, t.lifeCycleId)).toEqual(before);
  });

  it("a review request and a decision: throwing after the writes stores none of them", async () => {
    const t = await team();
    const before = await countRows(t.studyId, t.lifeCycleId);
    const scope = { studyId: t.studyId, lifeCycleId: t.lifeCycleId };
    const failing = server.db.transaction(async (tx) => {
      await askForReview(tx, scope, await actor(t.editor, "editor"), { snapshotId: t.snapshotId, reviewerIds: [t.reviewer.user.id] });
      await recordDecision(tx, scope, await actor(t.reviewer, "reviewer"), { snapshotId: t.snapshotId, decision: "approved", summary: "ok" });
      expect((await tx.select().from(reviews).where(eq(reviews.lifeCycleId, t.lifeCycleId)))[0]!.state).toBe("approved");
      throw new Error("fail after the writes");
    });
    await expect(failing).rejects.toThrow("fail after the writes");
    expect(await countRows(t.studyId, t.lifeCycleId)).toEqual(before);
  });

  it("a failing activity write rolls back the comment (no action without its record)", async () => {
    const t = await team();
    // The audit insert fails inside the comment's transaction.
    await server.pool.query("alter table audit_events add constraint review_test_no_comments check (action <> 'comment.created') not valid");
    try {
      const res = await comment(t.reviewer, t.lifeCycleId, { anchor: { kind: "lifeCycle" }, body: "lost" });
      expect(res.status).toBe(500);
      expectConsoleError(/500 on POST/);
    } finally {
      await server.pool.query("alter table audit_events drop constraint review_test_no_comments");
    }
    expect((await server.db.select().from(comments).where(eq(comments.lifeCycleId, t.lifeCycleId))).length).toBe(0);
  });
});

describe("the daily digest schedule", () => {
  it("registers a daily pg-boss schedule for the digest queue", async () => {
    const { createBoss } = await import("../../server/runs/queue");
    const { scheduleDigest } = await import("../../server/mail/digest-job");
    const { DIGEST_CRON, DIGEST_QUEUE } = await import("../../server/services/notifications");
    const boss = createBoss(server.databaseUrl, { supervise: false, schedule: false });
    await boss.start();
    try {
      await scheduleDigest(boss);
      const schedules = await boss.getSchedules();
      expect(schedules).toEqual([expect.objectContaining({ name: DIGEST_QUEUE, cron: DIGEST_CRON, timezone: "UTC" })]);
      expect(await boss.getQueue(DIGEST_QUEUE)).toMatchObject({ name: DIGEST_QUEUE });
    } finally {
      await boss.stop({ graceful: false, wait: true });
    }
  });
});
