import { and, desc, eq, gt, isNotNull, isNull, sql } from "drizzle-orm";
import { ZodError } from "zod";
import { emptyLifeCycle, LIFE_CYCLE_SCHEMA_VERSION, LifeCycleUpgradeError, upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import {
  DELETED_LIFE_CYCLE_DAYS,
  type DeletedLifeCycle,
  type LifeCycleCreate,
  type LifeCycleRecord,
  type LifeCycleSummary,
} from "../../shared/schemas/life-cycles";
import type { Db, DbOrTx } from "../db/client";
import { lifeCycles, users } from "../db/schema";
import { badRequest, conflict, notFound, zodFields } from "../http/errors";
import { faultPoint } from "../testing/fault-point";
import { recordEvent } from "./audit";

type Row = typeof lifeCycles.$inferSelect & { updatedByName: string | null };

const summary = (r: Row): LifeCycleSummary => ({
  id: r.id,
  studyId: r.studyId,
  name: r.name,
  version: r.version,
  stageCount: (r.document as LifeCycle).stages.length,
  updatedAt: r.updatedAt.toISOString(),
  updatedBy: r.updatedByName,
});

/**
 * Reads a life-cycle document from a request (any supported format version);
 * problems become a 400 whose field paths start at `document`.
 */
export function parseDocument(raw: unknown, field = "document"): LifeCycle {
  try {
    return upgradeLifeCycle(raw);
  } catch (err) {
    if (err instanceof ZodError) {
      const fields = zodFields(err).map((f) => ({ ...f, path: f.path === "(body)" ? field : `${field}.${f.path}` }));
      throw badRequest(`${fields[0]!.path}: ${fields[0]!.message}`, fields);
    }
    if (err instanceof LifeCycleUpgradeError) throw badRequest(err.message, [{ path: `${field}.stagewright`, message: err.message }]);
    throw err;
  }
}

const selectRows = (db: DbOrTx) =>
  db
    .select({ lc: lifeCycles, updatedByName: users.name })
    .from(lifeCycles)
    .leftJoin(users, eq(users.id, lifeCycles.updatedBy));

/** The Study a (not deleted) life cycle belongs to, for the role check; null when there is none. */
export async function studyOfLifeCycle(db: Db, lifeCycleId: string, options: { deleted?: boolean } = {}): Promise<string | null> {
  const [r] = await db
    .select({ studyId: lifeCycles.studyId })
    .from(lifeCycles)
    .where(and(eq(lifeCycles.id, lifeCycleId), options.deleted ? isNotNull(lifeCycles.deletedAt) : isNull(lifeCycles.deletedAt)));
  return r?.studyId ?? null;
}

export async function listLifeCycles(db: Db, studyId: string): Promise<LifeCycleSummary[]> {
  const rows = await selectRows(db)
    .where(and(eq(lifeCycles.studyId, studyId), isNull(lifeCycles.deletedAt)))
    .orderBy(desc(lifeCycles.updatedAt));
  return rows.map((r) => summary({ ...r.lc, updatedByName: r.updatedByName }));
}

/** Stored documents are upgraded on read, so ones saved by older builds open in this one. */
export async function getLifeCycle(db: DbOrTx, id: string): Promise<LifeCycleRecord> {
  const [r] = await selectRows(db).where(and(eq(lifeCycles.id, id), isNull(lifeCycles.deletedAt)));
  if (!r) throw notFound("No such life cycle.");
  return { ...summary({ ...r.lc, updatedByName: r.updatedByName }), document: upgradeLifeCycle(r.lc.document) };
}

export async function insertLifeCycle(tx: DbOrTx, studyId: string, userId: string, document: LifeCycle, how: string): Promise<LifeCycleRecord> {
  const [row] = await tx
    .insert(lifeCycles)
    .values({ studyId, name: document.name, document, schemaVersion: LIFE_CYCLE_SCHEMA_VERSION, createdBy: userId, updatedBy: userId })
    .returning();
  await recordEvent(tx, { studyId, actorId: userId, action: "life_cycle.created", summary: `${how} the life cycle “${document.name}”`, details: { lifeCycleId: row!.id } });
  return getLifeCycle(tx, row!.id);
}

export async function createLifeCycle(db: Db, studyId: string, userId: string, input: LifeCycleCreate): Promise<LifeCycleRecord> {
  const document = "document" in input ? parseDocument(input.document) : emptyLifeCycle(input.name);
  return db.transaction((tx) => insertLifeCycle(tx, studyId, userId, document, "document" in input ? "imported" : "created"));
}

export async function duplicateLifeCycle(db: Db, id: string, userId: string, name?: string): Promise<LifeCycleRecord> {
  return db.transaction(async (tx) => {
    const source = await getLifeCycle(tx, id);
    const document = { ...source.document, name: name ?? `${source.document.name} (copy)` };
    return insertLifeCycle(tx, source.studyId, userId, document, `duplicated “${source.name}” as`);
  });
}

/**
 * Writes a whole document if nobody saved since `version`; otherwise 409 with
 * the current state, so nothing is overwritten silently. Runs in the caller's transaction.
 */
export async function saveDocument(tx: DbOrTx, id: string, userId: string, version: number, document: LifeCycle, what = "saved"): Promise<void> {
  const [row] = await tx
    .update(lifeCycles)
    .set({ name: document.name, document, schemaVersion: LIFE_CYCLE_SCHEMA_VERSION, version: sql`${lifeCycles.version} + 1`, updatedBy: userId, updatedAt: new Date() })
    .where(and(eq(lifeCycles.id, id), eq(lifeCycles.version, version), isNull(lifeCycles.deletedAt)))
    .returning();
  if (!row) {
    const current = await getLifeCycle(tx, id);
    throw conflict(
      `Someone else saved this life cycle after you opened it (you had version ${version}; it is now version ${current.version}${current.updatedBy ? `, by ${current.updatedBy}` : ""}). Reload to see their change, or keep yours as a copy.`,
      { current },
    );
  }
  await faultPoint("life-cycle-save:mid-transaction");
  await recordEvent(tx, { studyId: row.studyId, actorId: userId, action: "life_cycle.updated", summary: `${what} the life cycle “${document.name}” (version ${row.version})`, details: { lifeCycleId: id, version: row.version } });
}

export async function updateLifeCycle(db: Db, id: string, userId: string, version: number, rawDocument: unknown): Promise<LifeCycleRecord> {
  const document = parseDocument(rawDocument);
  const saved = await db.transaction(async (tx) => {
    await saveDocument(tx, id, userId, version, document);
    return getLifeCycle(tx, id);
  });
  await faultPoint("life-cycle-save:after-commit");
  return saved;
}

export async function deleteLifeCycle(db: Db, id: string, userId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(lifeCycles)
      .set({ deletedAt: new Date(), deletedBy: userId })
      .where(and(eq(lifeCycles.id, id), isNull(lifeCycles.deletedAt)))
      .returning();
    if (!row) throw notFound("No such life cycle.");
    await recordEvent(tx, { studyId: row.studyId, actorId: userId, action: "life_cycle.deleted", summary: `deleted the life cycle “${row.name}” (recoverable for ${DELETED_LIFE_CYCLE_DAYS} days)`, details: { lifeCycleId: id } });
  });
}

const recoverableSince = () => new Date(Date.now() - DELETED_LIFE_CYCLE_DAYS * 86_400_000);

export async function listDeletedLifeCycles(db: Db, studyId: string): Promise<DeletedLifeCycle[]> {
  const rows = await db
    .select({ id: lifeCycles.id, name: lifeCycles.name, deletedAt: lifeCycles.deletedAt, deletedBy: users.name })
    .from(lifeCycles)
    .leftJoin(users, eq(users.id, lifeCycles.deletedBy))
    .where(and(eq(lifeCycles.studyId, studyId), gt(lifeCycles.deletedAt, recoverableSince())))
    .orderBy(desc(lifeCycles.deletedAt));
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    deletedAt: r.deletedAt!.toISOString(),
    deletedBy: r.deletedBy,
    recoverableUntil: new Date(r.deletedAt!.getTime() + DELETED_LIFE_CYCLE_DAYS * 86_400_000).toISOString(),
  }));
}

export async function restoreDeletedLifeCycle(db: Db, id: string, userId: string): Promise<LifeCycleRecord> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .update(lifeCycles)
      .set({ deletedAt: null, deletedBy: null })
      .where(and(eq(lifeCycles.id, id), gt(lifeCycles.deletedAt, recoverableSince())))
      .returning();
    if (!row) throw notFound("No deleted life cycle with that id can be restored (it may be older than the recovery period).");
    await recordEvent(tx, { studyId: row.studyId, actorId: userId, action: "life_cycle.restored", summary: `restored the deleted life cycle “${row.name}”`, details: { lifeCycleId: id } });
    return getLifeCycle(tx, id);
  });
}
