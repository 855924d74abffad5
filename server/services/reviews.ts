import { and, desc, eq, inArray } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleReviews, ReviewDecision, ReviewRequestCreate, ReviewStatus, ReviewView } from "../../shared/schemas/review";
import { ReviewDecisionSchema, ReviewRequestCreateSchema } from "../../shared/schemas/review";
import { roleAtLeast } from "../../shared/schemas/studies";
import type { Db, DbOrTx } from "../db/client";
import { lifeCycles, memberships, reviews, snapshots, users } from "../db/schema";
import { badRequest, notFound } from "../http/errors";
import { recordEvent } from "./audit";
import type { Actor } from "./comments";
import { withNotifications, type NotificationInput, type NotifyDeps } from "./notifications";

const iso = (d: Date | null) => (d ? d.toISOString() : null);
export const reviewPath = (lifeCycleId: string, snapshotId: string) => `/life-cycles/${lifeCycleId}?tab=review&snapshot=${snapshotId}`;

/** The model without its layout: positions and colours do not change λ, so they do not undo an approval. */
export function modelFingerprint(doc: LifeCycle): string {
  return JSON.stringify({
    ...doc,
    stages: doc.stages.map(({ position: _p, color: _c, ...rest }) => rest),
  });
}

const requester = alias(users, "requester");

async function reviewRows(db: DbOrTx, lifeCycleId: string): Promise<ReviewView[]> {
  const rows = await db
    .select({ r: reviews, reviewerName: users.name, requestedByName: requester.name, snapshotNumber: snapshots.number, snapshotMessage: snapshots.message })
    .from(reviews)
    .innerJoin(users, eq(users.id, reviews.reviewerId))
    .leftJoin(requester, eq(requester.id, reviews.requestedBy))
    .innerJoin(snapshots, eq(snapshots.id, reviews.snapshotId))
    .where(eq(reviews.lifeCycleId, lifeCycleId))
    .orderBy(desc(snapshots.number), reviews.createdAt);
  return rows.map(({ r, ...x }) => ({
    id: r.id,
    snapshotId: r.snapshotId,
    snapshotNumber: x.snapshotNumber,
    snapshotMessage: x.snapshotMessage,
    reviewerId: r.reviewerId,
    reviewerName: x.reviewerName,
    requestedByName: x.requestedByName,
    message: r.message,
    state: r.state,
    summary: r.summary,
    createdAt: r.createdAt.toISOString(),
    decidedAt: iso(r.decidedAt),
  }));
}

/**
 * The review state of a life cycle, judged on its newest snapshot that was
 * reviewed: any change request wins, then anything still waiting; approved
 * only when every reviewer asked approved.
 */
export async function lifeCycleReviews(db: DbOrTx, lifeCycleId: string): Promise<LifeCycleReviews> {
  const list = await reviewRows(db, lifeCycleId);
  const newest = list[0];
  const none: ReviewStatus = { state: "none", snapshotId: null, snapshotNumber: null, changedSinceApproval: false, approvals: 0, changeRequests: 0, pending: 0 };
  if (!newest) return { status: none, reviews: list };
  const on = list.filter((r) => r.snapshotId === newest.snapshotId);
  const approvals = on.filter((r) => r.state === "approved").length;
  const changeRequests = on.filter((r) => r.state === "changes_requested").length;
  const pending = on.filter((r) => r.state === "requested").length;
  const state = changeRequests > 0 ? "changes_requested" : pending > 0 ? "requested" : "approved";
  let changedSinceApproval = false;
  if (approvals > 0) {
    const [lc] = await db.select({ document: lifeCycles.document }).from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId));
    const [snap] = await db.select({ document: snapshots.document }).from(snapshots).where(eq(snapshots.id, newest.snapshotId));
    changedSinceApproval = !!lc && !!snap && modelFingerprint(upgradeLifeCycle(lc.document)) !== modelFingerprint(upgradeLifeCycle(snap.document));
  }
  return { status: { state, snapshotId: newest.snapshotId, snapshotNumber: newest.snapshotNumber, changedSinceApproval, approvals, changeRequests, pending }, reviews: list };
}

async function snapshotOf(tx: DbOrTx, lifeCycleId: string, snapshotId: string) {
  const [s] = await tx.select().from(snapshots).where(and(eq(snapshots.id, snapshotId), eq(snapshots.lifeCycleId, lifeCycleId)));
  if (!s) throw notFound("This life cycle has no snapshot with that id (a snapshot of another life cycle or Study cannot be reviewed here).");
  return s;
}


/** An owner or editor asks reviewers (members with the reviewer role or above) to review a snapshot. */
export function requestReview(db: Db, deps: NotifyDeps, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: ReviewRequestCreate): Promise<LifeCycleReviews> {
  const data = ReviewRequestCreateSchema.parse(input);
  return withNotifications(db, deps, (tx) => askForReview(tx, scope, actor, data));
}

/** The request in the caller's transaction; returns who to notify. */
export async function askForReview(tx: DbOrTx, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: ReviewRequestCreate): Promise<{ result: LifeCycleReviews; notices: NotificationInput[] }> {
  const data = ReviewRequestCreateSchema.parse(input);
  {
    const snap = await snapshotOf(tx, scope.lifeCycleId, data.snapshotId);
    const ids = [...new Set(data.reviewerIds)];
    const members = await tx
      .select({ userId: memberships.userId, role: memberships.role, name: users.name })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.studyId, scope.studyId), inArray(memberships.userId, ids)));
    const byId = new Map(members.map((m) => [m.userId, m]));
    data.reviewerIds.forEach((id, i) => {
      const m = byId.get(id);
      const path = `reviewerIds.${i}`;
      if (!m) throw badRequest(`${path}: That person is not a member of this Study.`, [{ path, message: "Not a member of this Study." }]);
      if (!roleAtLeast(m.role, "reviewer")) throw badRequest(`${path}: ${m.name} is a viewer; only reviewers, editors and owners can review.`, [{ path, message: "A viewer cannot review." }]);
      if (id === actor.id) throw badRequest(`${path}: Ask someone else to review your snapshot.`, [{ path, message: "You cannot review at your own request." }]);
    });
    const [lc] = await tx.select({ name: lifeCycles.name }).from(lifeCycles).where(eq(lifeCycles.id, scope.lifeCycleId));
    for (const id of ids) {
      // Asking again resets an earlier decision on the same snapshot.
      await tx
        .insert(reviews)
        .values({ studyId: scope.studyId, lifeCycleId: scope.lifeCycleId, snapshotId: snap.id, reviewerId: id, requestedBy: actor.id, message: data.message })
        .onConflictDoUpdate({ target: [reviews.snapshotId, reviews.reviewerId], set: { requestedBy: actor.id, message: data.message, state: "requested", summary: "", decidedAt: null } });
    }
    const names = ids.map((id) => byId.get(id)!.name).join(", ");
    await recordEvent(tx, {
      studyId: scope.studyId,
      actorId: actor.id,
      action: "review.requested",
      summary: `asked ${names} to review snapshot #${snap.number} of “${lc?.name}”`,
      details: { lifeCycleId: scope.lifeCycleId, snapshotId: snap.id, reviewerIds: ids },
    });
    const notices: NotificationInput[] = ids.map((userId) => ({
      userId,
      kind: "review_requested",
      subject: `${actor.name} asks you to review “${lc?.name}” (snapshot #${snap.number})`,
      text: [`${actor.name} asks you to review snapshot #${snap.number} (${snap.message}) of the life cycle “${lc?.name}”.`, data.message ? `\nTheir note:\n${data.message}` : ""].join(""),
      link: reviewPath(scope.lifeCycleId, snap.id),
    }));
    return { result: await lifeCycleReviews(tx, scope.lifeCycleId), notices };
  }
}

/** A reviewer approves a snapshot or asks for changes, with a summary; those who asked are told. */
export function decideReview(db: Db, deps: NotifyDeps, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: ReviewDecision): Promise<LifeCycleReviews> {
  const data = ReviewDecisionSchema.parse(input);
  return withNotifications(db, deps, (tx) => recordDecision(tx, scope, actor, data));
}

/** The decision in the caller's transaction; returns who to notify. */
export async function recordDecision(tx: DbOrTx, scope: { studyId: string; lifeCycleId: string }, actor: Actor, input: ReviewDecision): Promise<{ result: LifeCycleReviews; notices: NotificationInput[] }> {
  const data = ReviewDecisionSchema.parse(input);
  {
    const snap = await snapshotOf(tx, scope.lifeCycleId, data.snapshotId);
    const [row] = await tx
      .insert(reviews)
      .values({ studyId: scope.studyId, lifeCycleId: scope.lifeCycleId, snapshotId: snap.id, reviewerId: actor.id, state: data.decision, summary: data.summary, decidedAt: new Date() })
      .onConflictDoUpdate({ target: [reviews.snapshotId, reviews.reviewerId], set: { state: data.decision, summary: data.summary, decidedAt: new Date() } })
      .returning();
    const [lc] = await tx.select({ name: lifeCycles.name }).from(lifeCycles).where(eq(lifeCycles.id, scope.lifeCycleId));
    const verb = data.decision === "approved" ? "approved" : "asked for changes to";
    await recordEvent(tx, {
      studyId: scope.studyId,
      actorId: actor.id,
      action: data.decision === "approved" ? "review.approved" : "review.changes_requested",
      summary: `${verb} snapshot #${snap.number} of “${lc?.name}”`,
      details: { lifeCycleId: scope.lifeCycleId, snapshotId: snap.id, reviewId: row!.id },
    });
    // Tell whoever asked; a review nobody asked for goes to the snapshot's author.
    const to = row!.requestedBy ?? snap.authorId;
    const notices: NotificationInput[] =
      to && to !== actor.id
        ? [
            {
              userId: to,
              kind: "review_decision",
              subject: `${actor.name} ${data.decision === "approved" ? "approved" : "asked for changes to"} “${lc?.name}” (snapshot #${snap.number})`,
              text: `${actor.name} ${verb} snapshot #${snap.number} (${snap.message}) of the life cycle “${lc?.name}”.\n\nSummary:\n${data.summary}`,
              link: reviewPath(scope.lifeCycleId, snap.id),
            },
          ]
        : [];
    return { result: await lifeCycleReviews(tx, scope.lifeCycleId), notices };
  }
}
