/**
 * The chunk plan of a Risk run: consecutive replicates split into chunks of
 * about TARGET_CHUNK_SECONDS each on the reference machine (2 cores, Node
 * 20, one chunk per core). The plan is part of a Run's input: the same seed
 * and the same plan give the same result whatever the scheduling; another
 * plan gives a statistically equivalent but different result. Store the plan
 * (or the settings it came from and PLAN_VERSION) with the Run.
 *
 * Cost model, from timings of simulateChunk on the reference machine
 * (single thread, a busy 2-core machine; see bench/risk.ts), in nanoseconds
 * per replicate-year; it errs on the slow side, so chunks tend to come out
 * shorter than the target rather than longer:
 * - matrix sets, no demographic noise, no ceiling (the fast path):
 *   NS_PER_YEAR + NS_PER_WORK_UNIT · stages² (measured 35, 80 and 320–770
 *   ns for 3, 10 and 30 stages);
 * - with a ceiling or demographic stochasticity (the general path: a second,
 *   environment-only vector for log λs, dense access): NS_GENERAL_YEAR +
 *   NS_PER_GENERAL_UNIT · stages², plus NS_PER_DEMOGRAPHIC_STAGE · stages for
 *   the binomial and Poisson draws (measured 0.8–13 µs from 3 to 30 stages);
 * - vital rates drawn each year: the general path plus NS_PER_DRAWN_RATE per
 *   drawn rate and NS_PER_ARROW per arrow of the life cycle (formula
 *   evaluation; measured about 2 µs for 3 stages, 6 µs for 10, 19 µs for 30
 *   with 3 arrows per stage, 130 µs for 30 stages with every arrow present).
 * One work unit (replicate × year × stage², the unit of MAX_WORK) is about
 * one multiply-add of a dense projection.
 */
import { riskWork, type RiskSettings } from "../schemas/risk";

/** Bump when the cost model changes: plans (and so results) of new Runs change with it. */
export const PLAN_VERSION = 2;
/** Aimed-at duration of one chunk (seconds). */
export const TARGET_CHUNK_SECONDS = 0.75;
/** Never more chunks than this in one Run (larger chunks instead). */
export const MAX_CHUNKS = 2_000;

/** Fast path: nanoseconds per replicate-year besides the projection, and per work unit. */
export const NS_PER_YEAR = 30;
export const NS_PER_WORK_UNIT = 1;
/** General path (ceiling, demographic noise or vital rates): per replicate-year, and per work unit (two vectors, indexed access). */
export const NS_GENERAL_YEAR = 100;
export const NS_PER_GENERAL_UNIT = 8;
/** Demographic stochasticity: per replicate-year and stage (binomial fates, Poisson births). */
export const NS_PER_DEMOGRAPHIC_STAGE = 150;
/** Vital rates drawn each year: per drawn rate and per arrow, per replicate-year. */
export const NS_PER_DRAWN_RATE = 200;
export const NS_PER_ARROW = 250;
/** Arrows per stage assumed when the caller does not say (stasis, growth, some reproduction). */
export const DEFAULT_ARROWS_PER_STAGE = 3;

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

/** Estimated seconds per replicate-year (reference machine). `arrows`: the life cycle's arrow count, for vital-rate draws. */
export function secondsPerReplicateYear(settings: RiskSettings, stageCount: number, arrows = DEFAULT_ARROWS_PER_STAGE * stageCount): number {
  const n = stageCount;
  const vital = settings.environment.kind === "vital-rates";
  let ns: number;
  if (!vital && !settings.demographic && settings.ceiling === undefined) ns = NS_PER_YEAR + NS_PER_WORK_UNIT * n * n;
  else {
    ns = NS_GENERAL_YEAR + NS_PER_GENERAL_UNIT * n * n;
    if (settings.demographic) ns += NS_PER_DEMOGRAPHIC_STAGE * n;
    if (settings.environment.kind === "vital-rates") ns += NS_PER_DRAWN_RATE * settings.environment.rates.length + NS_PER_ARROW * arrows;
  }
  return ns * 1e-9;
}

/**
 * Split a Run's replicates into chunks of about TARGET_CHUNK_SECONDS each.
 * `transitionCount` (the life cycle's arrows) sharpens the estimate for
 * vital-rate draws; 3 per stage is assumed without it.
 */
export function planChunks(settings: RiskSettings, stageCount: number, options: { transitionCount?: number } = {}): ChunkPlan {
  if (!Number.isInteger(stageCount) || stageCount < 1) throw new RangeError(`stageCount must be a whole number ≥ 1; got ${stageCount}.`);
  const R = settings.replicates;
  const perReplicate = secondsPerReplicateYear(settings, stageCount, options.transitionCount) * settings.horizon;
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
