import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import type { LifeCycle } from "../../shared/lifecycle";
import type { Role } from "../../shared/schemas/studies";
import { roleAtLeast } from "../../shared/schemas/studies";
import type { CommentAnchor, CommentCreate, CommentReply, CommentThread, CommentUpdate, CommentView } from "../../shared/schemas/review";
import { CommentCreateSchema, CommentReplySchema, CommentUpdateSchema } from "../../shared/schemas/review";
import type { Db, DbOrTx } from "../db/client";
import { comments, lifeCycles, memberships, snapshots, users } from "../db/schema";
import { badRequest, forbidden, HttpError, notFound } from "../http/errors";
import { recordEvent } from "./audit";
import { getLifeCycle } from "./life-cycles";
import { withNotifications, type NotificationInput, type NotifyDeps } from "./notifications";

/** Who is acting, and in which Study (from the role check). */
export interface Actor {
  id: string;
  name: string;
  role: Role;
}

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** The in-app path of a thread: the life cycle's Review tab with the thread open. */
export const threadPath = (lifeCycleId: string, threadId: string) => `/life-cycles/${lifeCycleId}?tab=review&thread=${threadId}`;

function stageName(doc: LifeCycle, id: string): string | null {
  return doc.stages.find((s) => s.id === id)?.name ?? null;
}

/**
 * Checks that an anchor names something in this life cycle and describes it
 * in words; a 400 naming the field otherwise.
 */
export async function describeAnchor(tx: DbOrTx, lifeCycleId: string, doc: LifeCycle, anchor: CommentAnchor): Promise<string> {
  const missing = (path: string, message: string) => badRequest(`${path}: ${message}`, [{ path, message }]);
  switch (anchor.kind) {
    case "lifeCycle":
      return "the life cycle as a whole";
    case "stage": {
      const name = stageName(doc, anchor.id);
      if (name === null) throw missing("anchor.id", `This life cycle has no stage with the id “${anchor.id}”.`);
      return `stage ${name}`;
    }
    case "transition": {
      const t = doc.transitions.find((x) => x.id === anchor.id);
      if (!t) throw missing("anchor.id", `This life cycle has no arrow with the id “${anchor.id}”.`);
      return t.from === t.to ? `arrow ${stageName(doc, t.from)} ↺ (${t.kind})` : `arrow ${stageName(doc, t.from)} → ${stageName(doc, t.to)} (${t.kind})`;
    }
    case "rate": {
      const r = doc.rates.find((x) => x.id === anchor.id);
      if (!r) throw missing("anchor.id", `This life cycle has no vital rate with the id “${anchor.id}”.`);
      return `vital rate ${r.name}`;
    }
    case "cell": {
      const to = stageName(doc, anchor.to);
      const from = stageName(doc, anchor.from);
      if (to === null) throw missing("anchor.to", `This life cycle has no stage with the id “${anchor.to}”.`);
      if (from === null) throw missing("anchor.from", `This life cycle has no stage with the id “${anchor.from}”.`);
      return `matrix entry from ${from} to ${to}`;
    }
    case "snapshot": {
      const [s] = await tx.select().from(snapshots).where(and(eq(snapshots.id, anchor.snapshotId), eq(snapshots.lifeCycleId, lifeCycleId)));
      if (!s) throw missing("anchor.snapshotId", "This life cycle has no snapshot with that id.");
      return `snapshot #${s.number} (${s.message})`;
    }
  }
}

/** Mentioned people must be members of the Study. */
async function checkMentions(tx: DbOrTx, studyId: string, mentions: string[]): Promise<string[]> {
  const unique = [...new Set(mentions)];
  if (unique.length === 0) return [];
  const rows = await tx.select({ userId: memberships.userId }).from(memberships).where(and(eq(memberships.studyId, studyId), inArray(memberships.userId, unique)));
  const members = new Set(rows.map((r) => r.userId));
  const index = mentions.findIndex((id) => !members.has(id));
  if (index >= 0) {
    const path = `mentions.${index}`;
    throw badRequest(`${path}: You can mention only members of this Study.`, [{ path, message: "Not a member of this Study." }]);
  }
  return unique;
}

function quote(body: string): string {
  const lines = body.split("\n");
  const shown = lines.slice(0, 12).map((l) => `> ${l}`);
  if (lines.length > 12) shown.push("> …");
  return shown.join("\n");
}

type Row = typeof comments.$inferSelect & { authorName: string | null };

const view = (r: Row): CommentView => ({
  id: r.id,
  authorId: r.authorId,
  authorName: r.authorName,
  body: r.deletedAt ? "" : r.body,
  mentions: r.deletedAt ? [] : (r.mentions as string[]),
  createdAt: r.createdAt.toISOString(),
  editedAt: iso(r.editedAt),
  deletedAt: iso(r.deletedAt),
});

const selectRows = (db: DbOrTx) => db.select({ c: comments, authorName: users.name }).from(comments).leftJoin(users, eq(users.id, comments.authorId));

/** Every thread of a life cycle with its replies, oldest first. */
export async function listThreads(db: DbOrTx, lifeCycleId: string): Promise<CommentThread[]> {
  const rows = (await selectRows(db).where(eq(comments.lifeCycleId, lifeCycleId)).orderBy(asc(comments.createdAt), asc(comments.id))).map((r) => ({ ...r.c, authorName: r.authorName }));
  const resolverIds = [...new Set(rows.map((r) => r.resolvedBy).filter((x): x is string => !!x))];
  const resolvers = new Map(
    resolverIds.length ? (await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, resolverIds))).map((u) => [u.id, u.name] as const) : [],
  );
  const threads = new Map<string, CommentThread>();
  for (const r of rows) {
    if (r.threadId !== null) continue;
    threads.set(r.id, {
      ...view(r),
      lifeCycleId: r.lifeCycleId,
      anchor: r.anchor as CommentAnchor,
      anchorLabel: r.anchorLabel ?? "",
      resolvedAt: iso(r.resolvedAt),
      resolvedByName: r.resolvedBy ? (resolvers.get(r.resolvedBy) ?? null) : null,
      replies: [],
    });
  }
  for (const r of rows) if (r.threadId !== null) threads.get(r.threadId)?.replies.push(view(r));
  // A deleted first comment without replies has nothing left to show.
  return [...threads.values()].filter((t) => !t.deletedAt || t.replies.some((x) => !x.deletedAt));
}

async function getThread(tx: DbOrTx, lifeCycleId: string, threadId: string): Promise<CommentThread> {
  const thread = (await listThreads(tx, lifeCycleId)).find((t) => t.id === threadId);
  if (!thread) throw notFound("No such comment thread.");
  return thread;
}

/** The life cycle a comment belongs to (for the role check), or null. */
export async function lifeCycleOfComment(db: Db, commentId: string): Promise<string | null> {
  const [r] = await db.select({ id: comments.lifeCycleId }).from(comments).where(eq(comments.id, commentId));
  return r?.id ?? null;
}

async function lifeCycleName(tx: DbOrTx, lifeCycleId: string): Promise<string> {
  const [lc] = await tx.select({ name: lifeCycles.name }).from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId));
  return lc?.name ?? "a life cycle";
}

function mentionNotices(actor: Actor, mentioned: string[], lcName: string, label: string, body: string, path: string): NotificationInput[] {
  return mentioned
    .filter((id) => id !== actor.id)
    .map((userId) => ({
      userId,
      kind: "mention" as const,
      subject: `${actor.name} mentioned you in a comment on “${lcName}”`,
      text: `${actor.name} mentioned you in a comment on ${label} in the life cycle “${lcName}”:\n\n${quote(body)}`,
      link: path,
    }));
}


/** Starts a thread (in the caller's transaction); returns the thread and who to notify. */
export async function startThread(tx: DbOrTx, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: CommentCreate): Promise<{ result: CommentThread; notices: NotificationInput[] }> {
  const data = CommentCreateSchema.parse(input);
  const lc = await getLifeCycle(tx, scope.lifeCycleId);
  const label = await describeAnchor(tx, scope.lifeCycleId, lc.document, data.anchor);
  const mentions = await checkMentions(tx, scope.studyId, data.mentions);
  const [row] = await tx
    .insert(comments)
    .values({ studyId: scope.studyId, lifeCycleId: scope.lifeCycleId, anchor: data.anchor, anchorLabel: label, body: data.body, mentions, authorId: actor.id })
    .returning();
  await recordEvent(tx, {
    studyId: scope.studyId,
    actorId: actor.id,
    action: "comment.created",
    summary: `commented on ${label} in “${lc.name}”`,
    details: { lifeCycleId: scope.lifeCycleId, commentId: row!.id, threadId: row!.id, anchor: data.anchor },
  });
  return { result: await getThread(tx, scope.lifeCycleId, row!.id), notices: mentionNotices(actor, mentions, lc.name, label, data.body, threadPath(scope.lifeCycleId, row!.id)) };
}

export function createThread(db: Db, deps: NotifyDeps, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: CommentCreate): Promise<CommentThread> {
  return withNotifications(db, deps, (tx) => startThread(tx, scope, actor, input));
}

async function lockComment(tx: DbOrTx, commentId: string) {
  const [c] = await tx.select().from(comments).where(eq(comments.id, commentId)).for("update");
  if (!c) throw notFound("No such comment.");
  return c;
}

export function replyToComment(db: Db, deps: NotifyDeps, studyId: string, actor: Actor, commentId: string, input: CommentReply): Promise<CommentThread> {
  return withNotifications(db, deps, (tx) => addReply(tx, studyId, actor, commentId, input));
}

/** A reply in the caller's transaction; returns the thread and who to notify. */
export async function addReply(tx: DbOrTx, studyId: string, actor: Actor, commentId: string, input: CommentReply): Promise<{ result: CommentThread; notices: NotificationInput[] }> {
  const data = CommentReplySchema.parse(input);
  {
    const target = await lockComment(tx, commentId);
    const threadId = target.threadId ?? target.id;
    const root = target.threadId ? await lockComment(tx, threadId) : target;
    const mentions = await checkMentions(tx, studyId, data.mentions);
    const [row] = await tx.insert(comments).values({ studyId, lifeCycleId: root.lifeCycleId, threadId, body: data.body, mentions, authorId: actor.id }).returning();
    const lcName = await lifeCycleName(tx, root.lifeCycleId);
    const label = root.anchorLabel ?? "the life cycle";
    await recordEvent(tx, { studyId, actorId: actor.id, action: "comment.replied", summary: `replied on ${label} in “${lcName}”`, details: { lifeCycleId: root.lifeCycleId, commentId: row!.id, threadId } });
    const path = threadPath(root.lifeCycleId, threadId);
    const notices = mentionNotices(actor, mentions, lcName, label, data.body, path);
    if (root.authorId && root.authorId !== actor.id) {
      notices.push({
        userId: root.authorId,
        kind: "reply",
        subject: `${actor.name} replied to your comment on “${lcName}”`,
        text: `${actor.name} replied to your comment on ${label} in the life cycle “${lcName}”:\n\n${quote(data.body)}`,
        link: path,
      });
    }
    return { result: await getThread(tx, root.lifeCycleId, threadId), notices };
  }
}

export function editComment(db: Db, deps: NotifyDeps, studyId: string, actor: Actor, commentId: string, input: CommentUpdate): Promise<CommentThread> {
  const data = CommentUpdateSchema.parse(input);
  return withNotifications(db, deps, async (tx) => {
    const c = await lockComment(tx, commentId);
    if (c.deletedAt) throw notFound("This comment was deleted.");
    if (c.authorId !== actor.id) throw forbidden("You can edit only your own comments.");
    const mentions = await checkMentions(tx, studyId, data.mentions);
    const before = c.mentions as string[];
    await tx.update(comments).set({ body: data.body, mentions, editedAt: new Date() }).where(eq(comments.id, commentId));
    const threadId = c.threadId ?? c.id;
    const root = c.threadId ? await lockComment(tx, threadId) : c;
    const lcName = await lifeCycleName(tx, c.lifeCycleId);
    const label = root.anchorLabel ?? "the life cycle";
    await recordEvent(tx, { studyId, actorId: actor.id, action: "comment.edited", summary: `edited a comment on ${label} in “${lcName}”`, details: { lifeCycleId: c.lifeCycleId, commentId, threadId } });
    // Only people newly mentioned hear about an edit.
    const added = mentions.filter((id) => !before.includes(id));
    return { result: await getThread(tx, c.lifeCycleId, threadId), notices: mentionNotices(actor, added, lcName, label, data.body, threadPath(c.lifeCycleId, threadId)) };
  });
}

/** Authors delete their own comments; owners may delete any (moderation). The place in the thread stays. */
export async function deleteComment(db: Db, studyId: string, actor: Actor, commentId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const c = await lockComment(tx, commentId);
    if (c.deletedAt) throw notFound("This comment was already deleted.");
    if (c.authorId !== actor.id && !roleAtLeast(actor.role, "owner")) throw forbidden("You can delete only your own comments (owners can delete any).");
    await tx.update(comments).set({ deletedAt: new Date(), body: "", mentions: [] }).where(eq(comments.id, commentId));
    const threadId = c.threadId ?? c.id;
    const root = c.threadId ? await lockComment(tx, threadId) : c;
    const lcName = await lifeCycleName(tx, c.lifeCycleId);
    await recordEvent(tx, {
      studyId,
      actorId: actor.id,
      action: "comment.deleted",
      summary: `deleted ${c.authorId === actor.id ? "their" : "a"} comment on ${root.anchorLabel ?? "the life cycle"} in “${lcName}”`,
      details: { lifeCycleId: c.lifeCycleId, commentId, threadId },
    });
  });
}

/** Resolves (or reopens) the thread a comment belongs to. */
export async function setResolved(db: Db, studyId: string, actor: Actor, commentId: string, resolved: boolean): Promise<CommentThread> {
  return db.transaction(async (tx) => {
    const c = await lockComment(tx, commentId);
    const threadId = c.threadId ?? c.id;
    const root = c.threadId ? await lockComment(tx, threadId) : c;
    if ((root.resolvedAt !== null) === resolved) {
      throw new HttpError(409, resolved ? "This thread is already resolved." : "This thread is already open.", "conflict");
    }
    await tx
      .update(comments)
      .set(resolved ? { resolvedAt: new Date(), resolvedBy: actor.id } : { resolvedAt: null, resolvedBy: null })
      .where(and(eq(comments.id, threadId), isNull(comments.threadId)));
    const lcName = await lifeCycleName(tx, root.lifeCycleId);
    await recordEvent(tx, {
      studyId,
      actorId: actor.id,
      action: resolved ? "comment.resolved" : "comment.reopened",
      summary: `${resolved ? "resolved" : "reopened"} the thread on ${root.anchorLabel ?? "the life cycle"} in “${lcName}”`,
      details: { lifeCycleId: root.lifeCycleId, threadId },
    });
    return getThread(tx, root.lifeCycleId, threadId);
  });
}
