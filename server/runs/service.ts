import { and, desc, eq, sql } from "drizzle-orm";
import type { RunRecord, RunSummary } from "../../shared/schemas/runs";
import type { Db } from "../db/client";
import { runChunks, runs, users } from "../db/schema";
import { HttpError, notFound } from "../http/errors";
import { recordEvent } from "../services/audit";
import type { RunKinds, RunTarget } from "./kinds";
import type { JobSender } from "./queue";

type Row = typeof runs.$inferSelect & { createdByName: string | null };

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const summary = (r: Row): RunSummary => ({
  id: r.id,
  lifeCycleId: r.lifeCycleId,
  datasetId: r.datasetId,
  kind: r.kind,
  status: r.status,
  progress: r.chunksTotal > 0 ? r.chunksDone / r.chunksTotal : 0,
  chunksDone: r.chunksDone,
  chunksTotal: r.chunksTotal,
  settings: r.settings,
  error: r.error,
  createdBy: r.createdByName,
  createdAt: r.createdAt.toISOString(),
  startedAt: iso(r.startedAt),
  finishedAt: iso(r.finishedAt),
});

const selectRows = (db: Db) => db.select({ run: runs, createdByName: users.name }).from(runs).leftJoin(users, eq(users.id, runs.createdBy));

/** The Study a run belongs to, for the role check. */
export async function studyOfRun(db: Db, runId: string): Promise<string | null> {
  const [r] = await db.select({ studyId: runs.studyId }).from(runs).where(eq(runs.id, runId));
  return r?.studyId ?? null;
}

export async function listRuns(db: Db, lifeCycleId: string): Promise<RunSummary[]> {
  const rows = await selectRows(db).where(eq(runs.lifeCycleId, lifeCycleId)).orderBy(desc(runs.createdAt)).limit(100);
  return rows.map((r) => summary({ ...r.run, createdByName: r.createdByName }));
}

export async function listDatasetRuns(db: Db, datasetId: string): Promise<RunSummary[]> {
  const rows = await selectRows(db).where(eq(runs.datasetId, datasetId)).orderBy(desc(runs.createdAt)).limit(100);
  return rows.map((r) => summary({ ...r.run, createdByName: r.createdByName }));
}

export async function getRun(db: Db, runId: string): Promise<RunRecord> {
  const [r] = await selectRows(db).where(eq(runs.id, runId));
  if (!r) throw notFound("No such run.");
  return { ...summary({ ...r.run, createdByName: r.createdByName }), result: r.run.result ?? null };
}

/**
 * Checks the settings with the kind's rules (a 400 names the field before
 * anything is queued), stores the run and its chunk rows, then queues one job per chunk.
 */
export async function createRun(
  db: Db,
  deps: { kinds: RunKinds; jobs: JobSender },
  target: RunTarget,
  userId: string,
  request: { kind: string; settings?: unknown },
): Promise<RunRecord> {
  const kind = deps.kinds[request.kind];
  if (!kind) throw new HttpError(400, `Unknown run kind “${request.kind}”.`, "bad_request", [{ path: "kind", message: "Unknown run kind." }]);
  const { input, settings, chunks } = await kind.prepare(db, target, request.settings);
  const runId = await db.transaction(async (tx) => {
    const [row] = await tx
      .insert(runs)
      .values({ studyId: target.studyId, lifeCycleId: target.lifeCycleId, datasetId: target.datasetId ?? null, kind: request.kind, input: input as object, settings: settings as object, chunksTotal: chunks, createdBy: userId })
      .returning({ id: runs.id });
    await tx.insert(runChunks).values(Array.from({ length: chunks }, (_, chunkIndex) => ({ runId: row!.id, chunkIndex })));
    await recordEvent(tx, { studyId: target.studyId, actorId: userId, action: "run.created", summary: `started a ${request.kind} run (${chunks} chunks)`, details: { runId: row!.id, lifeCycleId: target.lifeCycleId, datasetId: target.datasetId ?? null } });
    return row!.id;
  });
  try {
    await deps.jobs.sendChunks(Array.from({ length: chunks }, (_, chunkIndex) => ({ runId, chunkIndex })));
  } catch (err) {
    await db.update(runs).set({ status: "failed", error: "The job queue could not be reached; start the run again.", finishedAt: new Date() }).where(eq(runs.id, runId));
    throw err;
  }
  return getRun(db, runId);
}

export async function cancelRun(db: Db, runId: string, userId: string): Promise<RunRecord> {
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(runs)
      .set({ status: "cancelled", finishedAt: new Date() })
      .where(and(eq(runs.id, runId), sql`${runs.status} in ('queued', 'running')`))
      .returning();
    if (!row) throw new HttpError(409, "This run has already finished.");
    await recordEvent(tx, { studyId: row.studyId, actorId: userId, action: "run.cancelled", summary: `cancelled a ${row.kind} run`, details: { runId } });
  });
  return getRun(db, runId);
}
