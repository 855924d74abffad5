import type { Db } from "../db/client";

/**
 * A kind of background computation. `prepare` runs in the web server (it
 * checks the request and freezes everything the run needs into `input`);
 * `runChunk` and `merge` run in workers and must be deterministic: chunk k's
 * result depends only on (input, k), and `merge` sees the partials in chunk order.
 */
export interface RunKind<Input = unknown, Partial = unknown, Result = unknown> {
  prepare(db: Db, target: RunTarget, settings: unknown): Promise<{ input: Input; settings: unknown; chunks: number }>;
  runChunk(input: Input, chunkIndex: number): Partial | Promise<Partial>;
  merge(input: Input, partials: Partial[]): Result;
}

/** What a run works on: a life cycle (Risk) or a Field-data dataset (the λ bootstrap). */
export interface RunTarget {
  studyId: string;
  lifeCycleId: string | null;
  datasetId?: string | null;
}

export type RunKinds = Record<string, RunKind<never, never, unknown>>;
