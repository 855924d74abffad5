/**
 * The chunk plan of a Risk run: consecutive replicates split into chunks of
 * about TARGET_CHUNK_SECONDS each on the reference machine (2 cores, Node
 * 20, one chunk per core). The plan is part of a Run's input: the same seed
 * and the same plan give the same result whatever the scheduling; another
 * plan gives a statistically equivalent but different result. Store the plan
 * (or the settings it came from and PLAN_VERSION) with the Run.
 *
 * Cost model, from timings of simulateChunk on the reference machine
 * (single thread; see bench/risk.ts): seconds per replicate-year =
 * NS_PER_WORK_UNIT · stages² (one unit ≈ one multiply-add of the projection,
 * the work unit of MAX_WORK) + overheads per year, per stage and per drawn
 * rate for the features that add them.
 */
import { riskWork, type RiskSettings } from "../schemas/risk";

/** Bump when the cost model changes: plans (and so results) of new Runs change with it. */
export const PLAN_VERSION = 1;
/** Aimed-at duration of one chunk (seconds). */
export const TARGET_CHUNK_SECONDS = 1.5;
/** Never more chunks than this in one Run (larger chunks instead). */
export const MAX_CHUNKS = 2_000;

/** Nanoseconds per work unit (replicate × year × stage²) of matrix selection. */
export const NS_PER_WORK_UNIT = 2;
/** Nanoseconds per replicate-year spent outside the projection (choice, threshold, moments). */
export const NS_PER_YEAR = 30;
/** Extra nanoseconds per replicate-year and stage with demographic stochasticity (binomial and Poisson draws). */
export const NS_PER_DEMOGRAPHIC_STAGE = 250;
/** Extra nanoseconds per replicate-year for a vital-rate sampler: per drawn rate and per stage (formula evaluation, scatter). */
export const NS_PER_DRAWN_RATE = 120;
export const NS_PER_SAMPLED_STAGE = 250;

export interface PlannedChunk {
  readonly chunkIndex: number;
  readonly firstReplicate: number;
  readonly replicateCount: number;
}

export interface ChunkPlan {
  readonly version: number;
  readonly chunks: PlannedChunk[];
  /** replicates × years × stages². */
  readonly workUnits: number;
  /** Estimated single-thread seconds for the whole Run and for one chunk (reference machine). */
  readonly estimatedSeconds: number;
  readonly estimatedSecondsPerChunk: number;
}

/** Estimated seconds per replicate-year (reference machine). */
export function secondsPerReplicateYear(settings: RiskSettings, stageCount: number): number {
  const n = stageCount;
  let ns = NS_PER_YEAR + NS_PER_WORK_UNIT * n * n;
  const separate = settings.demographic || settings.ceiling !== undefined;
  if (separate) ns += NS_PER_WORK_UNIT * n * n; // the environment-only vector for log λs
  if (settings.demographic) ns += NS_PER_DEMOGRAPHIC_STAGE * n;
  if (settings.environment.kind === "vital-rates") ns += NS_PER_DRAWN_RATE * settings.environment.rates.length + NS_PER_SAMPLED_STAGE * n;
  return ns * 1e-9;
}

/** Split a Run's replicates into chunks of about TARGET_CHUNK_SECONDS each. */
export function planChunks(settings: RiskSettings, stageCount: number): ChunkPlan {
  if (!Number.isInteger(stageCount) || stageCount < 1) throw new RangeError(`stageCount must be a whole number ≥ 1; got ${stageCount}.`);
  const R = settings.replicates;
  const perReplicate = secondsPerReplicateYear(settings, stageCount) * settings.horizon;
  let per = Math.max(1, Math.min(R, Math.floor(TARGET_CHUNK_SECONDS / perReplicate)));
  let count = Math.ceil(R / per);
  if (count > MAX_CHUNKS) count = MAX_CHUNKS;
  // Even sizes: the first R mod count chunks take one replicate more.
  per = Math.floor(R / count);
  const extra = R - per * count;
  const chunks: PlannedChunk[] = [];
  let first = 0;
  for (let k = 0; k < count; k++) {
    const size = per + (k < extra ? 1 : 0);
    chunks.push({ chunkIndex: k, firstReplicate: first, replicateCount: size });
    first += size;
  }
  const total = perReplicate * R;
  return {
    version: PLAN_VERSION,
    chunks,
    workUnits: riskWork({ replicates: R, horizon: settings.horizon, initial: new Array<number>(stageCount) }),
    estimatedSeconds: total,
    estimatedSecondsPerChunk: total / count,
  };
}
