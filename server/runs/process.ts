import { and, asc, eq, isNull, sql } from "drizzle-orm";
import type { Db } from "../db/client";
import { runChunks, runs } from "../db/schema";
import type { RunKind, RunKinds } from "./kinds";
import type { ChunkJob } from "./queue";

export type ChunkOutcome = "computed" | "skipped";

/**
 * Works one chunk of a run: skips it when the run is over or the chunk is
 * already done (so a retried job never recomputes), stores its partial result,
 * advances the progress, and merges the result when it was the last chunk.
 */
export async function processChunk(db: Db, kinds: RunKinds, job: ChunkJob): Promise<ChunkOutcome> {
  const [run] = await db.select().from(runs).where(eq(runs.id, job.runId));
  if (!run || run.status === "cancelled" || run.status === "failed" || run.status === "succeeded") return "skipped";
  const [chunk] = await db.select().from(runChunks).where(and(eq(runChunks.runId, job.runId), eq(runChunks.chunkIndex, job.chunkIndex)));
  if (!chunk || chunk.finishedAt) return "skipped";
  const kind = kinds[run.kind] as RunKind<unknown, unknown, unknown> | undefined;
  if (!kind) throw new Error(`This worker does not know runs of kind “${run.kind}”.`);

  await db
    .update(runs)
    .set({ status: "running", startedAt: run.startedAt ?? new Date() })
    .where(and(eq(runs.id, run.id), eq(runs.status, "queued")));
  await db
    .update(runChunks)
    .set({ attempts: sql`${runChunks.attempts} + 1` })
    .where(and(eq(runChunks.runId, run.id), eq(runChunks.chunkIndex, job.chunkIndex)));

  const partial = await kind.runChunk(run.input, job.chunkIndex);

  const finished = await db.transaction(async (tx) => {
    const stored = await tx
      .update(runChunks)
      .set({ result: partial as object, finishedAt: new Date() })
      .where(and(eq(runChunks.runId, run.id), eq(runChunks.chunkIndex, job.chunkIndex), isNull(runChunks.finishedAt)))
      .returning({ i: runChunks.chunkIndex });
    if (stored.length === 0) return false; // another worker finished it first
    const [r] = await tx
      .update(runs)
      .set({ chunksDone: sql`${runs.chunksDone} + 1` })
      .where(eq(runs.id, run.id))
      .returning({ done: runs.chunksDone, total: runs.chunksTotal, status: runs.status });
    return r!.done === r!.total && r!.status === "running";
  });
  if (finished) await finishRun(db, kind, run.id, run.input);
  return "computed";
}

async function finishRun(db: Db, kind: RunKind<unknown, unknown, unknown>, runId: string, input: unknown): Promise<void> {
  const rows = await db.select({ result: runChunks.result }).from(runChunks).where(eq(runChunks.runId, runId)).orderBy(asc(runChunks.chunkIndex));
  try {
    const result = kind.merge(input, rows.map((r) => r.result));
    await db
      .update(runs)
      .set({ status: "succeeded", result: result as object, finishedAt: new Date() })
      .where(and(eq(runs.id, runId), eq(runs.status, "running")));
  } catch (err) {
    await failRun(db, runId, err);
  }
}

export async function failRun(db: Db, runId: string, err: unknown): Promise<void> {
  await db
    .update(runs)
    .set({ status: "failed", error: err instanceof Error ? err.message : String(err), finishedAt: new Date() })
    .where(and(eq(runs.id, runId), sql`${runs.status} in ('queued', 'running')`));
}
