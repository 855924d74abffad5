import { and, desc, eq, sql } from "drizzle-orm";
import { faultPoint } from "../testing/fault-point";
import { upgradeLifeCycle } from "../../shared/lifecycle";
import type { LifeCycleRecord, Snapshot, SnapshotSummary } from "../../shared/schemas/life-cycles";
import type { Db, DbOrTx } from "../db/client";
import { lifeCycles, snapshots, users } from "../db/schema";
import { notFound } from "../http/errors";
import { recordEvent } from "./audit";
import { getLifeCycle, saveDocument } from "./life-cycles";

type Row = typeof snapshots.$inferSelect & { authorName: string | null };

const summary = (r: Row): SnapshotSummary => ({
  id: r.id,
  lifeCycleId: r.lifeCycleId,
  number: r.number,
  message: r.message,
  authorName: r.authorName,
  createdAt: r.createdAt.toISOString(),
  lifeCycleVersion: r.lifeCycleVersion,
});

const selectRows = (db: DbOrTx) =>
  db.select({ s: snapshots, authorName: users.name }).from(snapshots).leftJoin(users, eq(users.id, snapshots.authorId));

/** The life cycle a snapshot belongs to (for the role check), or null. */
export async function lifeCycleOfSnapshot(db: Db, snapshotId: string): Promise<string | null> {
  const [r] = await db.select({ id: snapshots.lifeCycleId }).from(snapshots).where(eq(snapshots.id, snapshotId));
  return r?.id ?? null;
}

export async function listSnapshots(db: Db, lifeCycleId: string): Promise<SnapshotSummary[]> {
  const rows = await selectRows(db).where(eq(snapshots.lifeCycleId, lifeCycleId)).orderBy(desc(snapshots.number));
  return rows.map((r) => summary({ ...r.s, authorName: r.authorName }));
}

export async function getSnapshot(db: DbOrTx, snapshotId: string): Promise<Snapshot> {
  const [r] = await selectRows(db).where(eq(snapshots.id, snapshotId));
  if (!r) throw notFound("No such snapshot.");
  // Snapshots are immutable; older formats are upgraded as they are read.
  return { ...summary({ ...r.s, authorName: r.authorName }), document: upgradeLifeCycle(r.s.document) };
}

/** Stores the life cycle's current state as a new, numbered snapshot (in the caller's transaction). */
export async function takeSnapshot(tx: DbOrTx, lifeCycleId: string, userId: string, message: string): Promise<Snapshot> {
  // Lock the life cycle row so two snapshots cannot take the same number.
  const [lc] = await tx.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId)).for("update");
  if (!lc) throw notFound("No such life cycle.");
  const [{ next }] = (await tx
    .select({ next: sql<number>`coalesce(max(${snapshots.number}), 0) + 1` })
    .from(snapshots)
    .where(eq(snapshots.lifeCycleId, lifeCycleId))) as [{ next: number }];
  const [row] = await tx
    .insert(snapshots)
    .values({ lifeCycleId, number: next, message, document: lc.document, schemaVersion: lc.schemaVersion, lifeCycleVersion: lc.version, authorId: userId })
    .returning();
  await recordEvent(tx, { studyId: lc.studyId, actorId: userId, action: "snapshot.created", summary: `took snapshot #${next} of “${lc.name}”: ${message}`, details: { lifeCycleId, snapshotId: row!.id } });
  return getSnapshot(tx, row!.id);
}

export async function createSnapshot(db: Db, lifeCycleId: string, userId: string, message: string): Promise<Snapshot> {
  return db.transaction((tx) => takeSnapshot(tx, lifeCycleId, userId, message));
}

/**
 * Makes a snapshot's document the current state (if nobody saved since
 * `version`), then records that state as a new snapshot: history only grows.
 */
export async function restoreSnapshot(db: Db, lifeCycleId: string, snapshotId: string, userId: string, version: number): Promise<{ lifeCycle: LifeCycleRecord; snapshot: Snapshot }> {
  return db.transaction(async (tx) => {
    const [snap] = await tx.select().from(snapshots).where(and(eq(snapshots.id, snapshotId), eq(snapshots.lifeCycleId, lifeCycleId)));
    if (!snap) throw notFound("No such snapshot of this life cycle.");
    await saveDocument(tx, lifeCycleId, userId, version, upgradeLifeCycle(snap.document), `restored snapshot #${snap.number}`);
    await faultPoint("snapshot-restore:mid-transaction");
    const snapshot = await takeSnapshot(tx, lifeCycleId, userId, `Restored snapshot #${snap.number} (${snap.message})`);
    return { lifeCycle: await getLifeCycle(tx, lifeCycleId), snapshot };
  });
}

