// Stochastic projection of many replicate futures, run in chunks.
//
// Units. Time is counted in projection intervals ("years" below: the
// interval of the life cycle's matrices); abundances are in the units of the
// initial vector (individuals). Year 0 is the initial vector; the projection
// from year t to t + 1 uses the environment of year t.
//
// Environmental stochasticity comes from the model: a set of matrices drawn
// independently each year with fixed weights, a Markov chain of environment
// states (one matrix set per state), or a caller's sampler that writes a
// fresh A (and U, F) each year — the core holds no vital-rate formulas.
// Demographic stochasticity (optional, for small populations) replaces
// n' = A n by integer draws: the individuals of stage j are distributed over
// their fates (move to stage i with probability u_ij, die with 1 − Σ_i u_ij)
// by a multinomial drawn as successive binomials, and stage i receives
// Poisson(Σ_j f_ij n_j) newborns.
//
// Chunks. A Run is split into chunks of consecutive replicates. The random
// stream of a chunk depends only on (seed, chunkIndex), and mergeChunks
// combines the partial results in chunk order, so the final result is the
// same however the chunks were scheduled, retried or distributed over
// workers. The chunk plan is part of the input: the same seed with a
// different plan gives a different (statistically equivalent) result.
//
// Memory stays flat: per chunk, counters of first passage by year, running
// moments of abundance by year, and a fixed logarithmic histogram of final
// abundance — never a trajectory per replicate.
//
// Stochastic growth rate by simulation (Tuljapurkar 1990, Population Dynamics
// in Variable Environments, ch. 4; Caswell 2001, §14.3):
// log λs = lim (1/T) Σ log(‖A_t x_t‖₁/‖x_t‖₁), x renormalised each step. The
// sum telescopes to log(‖A_{T−1}⋯A_B x_B‖₁/‖x_B‖₁), so each replicate gives
// one estimate over years B..T (B = burn-in) with a single logarithm at each
// end, not one per year. Replicates are independent, so each one is a batch
// of the batch-means method and the CI is mean ± 1.96·SD/√replicates. The
// sequence x is the environment-only product A_t⋯A_0 n_0 (neither ceiling nor
// demographic noise enter it): the abundance vector itself when neither is
// on, a separate vector otherwise.
//
// Speed. For matrix sets without demographic noise or ceiling, the products
// A_{k_m}⋯A_{k_1} of every sequence of up to MAX_BLOCK yearly choices are
// tabulated (while the table fits BLOCK_TABLE_LIMIT) and a block of years is
// applied as one dense product; the totals of the years inside a block come
// from the column sums of the partial products (n multiply-adds each). For
// 10×10 matrices this cuts the multiply-adds per year about threefold. It
// changes rounding only: the same sequence of matrices gives the same result
// to about 1e-15 relative.
//
// Tuljapurkar's small-noise approximation (Tuljapurkar 1982, Theor. Popul.
// Biol. 21:141) for independent years:
// log λs ≈ log λ̄ − τ²/(2λ̄²), τ² = Σ Cov(a_ij, a_kl) s_ij s_kl at the mean
// matrix Ā; τ² equals the variance of Σ_ij s_ij a_ij, which is how it is computed.
import { analyzeMatrix } from "./analyze";
import { MatrixInputError, MAX_PROJECTION_STEPS } from "./input";
import { createRandom, type Random } from "./random";
import { wilsonInterval, Z95 } from "../stats/normal";

/** A matrix as rows (row i = stage at t+1, column j = stage at t). */
export type MatrixRows = readonly (readonly number[])[];

/** One environment's matrices. U and F (A = U + F) are needed for demographic stochasticity. */
export interface EnvironmentMatrices {
  readonly A: MatrixRows;
  readonly U?: MatrixRows;
  readonly F?: MatrixRows;
}

/** Row-major n×n buffers a sampler writes into. */
export interface SampledMatrices {
  readonly A: Float64Array;
  readonly U: Float64Array;
  readonly F: Float64Array;
}

/**
 * Draws one year's matrices into `out` using `rng` only. The buffers keep the
 * previous draw (they start as zeros): overwrite every entry that may be
 * non-zero. Fill A always and, for demographic stochasticity, U and F with
 * A = U + F.
 */
export type MatrixSampler = (rng: Random, out: SampledMatrices) => void;

/** Environmental stochasticity. */
export type StochasticModel =
  | {
      /** Each year one of the matrix sets, chosen independently with the given weights (Σ = 1). */
      readonly kind: "independent";
      readonly matrices: readonly EnvironmentMatrices[];
      readonly weights: readonly number[];
    }
  | {
      /** Environment states follow a Markov chain; each state has its matrix set. */
      readonly kind: "markov";
      readonly matrices: readonly EnvironmentMatrices[];
      /** transition[i][j] = P(state j next year | state i this year); rows sum to 1. */
      readonly transition: MatrixRows;
      /** Distribution of the state in year 0 (Σ = 1). */
      readonly initial: readonly number[];
    }
  | {
      /** A fresh matrix drawn each year by the caller (e.g. from vital-rate distributions). */
      readonly kind: "sampler";
      readonly stageCount: number;
      readonly sample: MatrixSampler;
      /** Cells (row, column) that can be non-zero in any draw; all cells when absent. */
      readonly cells?: readonly (readonly [number, number])[];
      /** Expected matrix, or a matrix near it (e.g. at the rates' means): sets the default burn-in from its damping ratio. */
      readonly meanMatrix?: MatrixRows;
      /** True when meanMatrix is E[A] exactly: Tuljapurkar's approximation then samples only for τ², not for Ā. */
      readonly meanMatrixExact?: boolean;
      /** Matrices drawn for Tuljapurkar's approximation (default DEFAULT_MOMENT_SAMPLES, fewer for large matrices). */
      readonly momentSamples?: number;
    };

/** What a simulation does, in the core's terms (stage indices, not ids). */
export interface SimulationSettings {
  /** Years (projection intervals) simulated, 1..MAX_PROJECTION_STEPS. */
  readonly horizon: number;
  /** Replicate futures in the whole Run. */
  readonly replicates: number;
  /** Initial abundance per stage (individuals; whole numbers with demographic stochasticity). */
  readonly initial: readonly number[];
  /** Integer individuals with binomial fates and Poisson births. */
  readonly demographic: boolean;
  /** Largest total abundance: above it, every stage is scaled down by the same factor (rounded down with demographic stochasticity). */
  readonly ceiling?: number | null;
  /** Quasi-extinct when the abundance of `stages` (all stages when absent) is at or below `value`. */
  readonly threshold: { readonly value: number; readonly stages?: readonly number[] | null };
  /** Years for the table of quasi-extinction probabilities (default: 10, 20, 50, 100, … up to the horizon, and the horizon). */
  readonly reportYears?: readonly number[];
  /** Years discarded before estimating log λs (default from the mean matrix's damping ratio; see defaultBurnIn). */
  readonly burnIn?: number;
}

/**
 * Internal knobs for tests and benchmarks; Runs leave them unset. Results
 * for a seed depend on them (and on this file's algorithms), like on the plan.
 */
export interface SimulationTuning {
  /** Longest block of years applied as one precomputed matrix product (1 = year by year). */
  readonly maxBlockYears?: number;
}

/** One chunk of a Run. */
export interface ChunkSpec {
  /** Seed of the Run: a whole number from 0 to 2^53 − 1. */
  readonly seed: number;
  /** 0, 1, 2, … in the plan's order; selects the random stream. */
  readonly chunkIndex: number;
  /** Index of the chunk's first replicate in the Run. */
  readonly firstReplicate: number;
  readonly replicateCount: number;
}

/** Running moments (count, mean, sum of squared deviations) — merged exactly as Chan et al. 1979. */
export interface Moments {
  readonly count: number;
  readonly mean: number;
  readonly m2: number;
}

/** Approximation of the stochastic growth rate (per year). */
export interface GrowthApproximation {
  /** log λs ≈ log λ̄ − τ²/(2λ̄²). */
  readonly logLambdaS: number;
  readonly lambdaS: number;
  /** Dominant eigenvalue of the mean matrix Ā. */
  readonly lambdaMean: number;
  readonly logLambdaMean: number;
  /** τ² = Var(Σ s_ij a_ij), s at Ā (units of λ²). */
  readonly tau2: number;
  /** Standard error of τ² when it was estimated from sampled matrices, else 0. */
  readonly tau2StandardError: number;
  /** Monte Carlo standard error of logLambdaS from sampled matrices (Ā and τ²), else 0. */
  readonly standardError: number;
  /** Matrices sampled (0 when computed exactly from weighted matrices). */
  readonly samples: number;
  /** True when Ā is exact (weighted matrices, or a sampler's exact mean); false when it was estimated from samples. */
  readonly exactMean: boolean;
}

/** The compact, JSON-serialisable result of one chunk. */
export interface ChunkResult {
  readonly format: "stagewright-risk-chunk-1";
  /** The Run's seed (chunks of one Run share it). */
  readonly seed: number;
  readonly chunkIndex: number;
  readonly firstReplicate: number;
  readonly replicateCount: number;
  readonly horizon: number;
  readonly burnIn: number;
  /** firstPassage[t] = replicates first at or below the threshold in year t (t = 0..horizon). */
  readonly firstPassage: number[];
  /** Replicates at or below the threshold in the final year. */
  readonly belowAtHorizon: number;
  /** Per year t = 0..horizon: mean and sum of squared deviations of total abundance within the chunk. */
  readonly abundanceMean: number[];
  readonly abundanceM2: number[];
  readonly final: FinalSummary;
  /** Per-replicate estimates of log λs (each over years burnIn..horizon). */
  readonly growth: Moments & { readonly zeroReplicates: number };
  /** Tuljapurkar's approximation: computed by chunk 0 only. */
  readonly approximation: { readonly value: GrowthApproximation | null; readonly reason: string | null } | null;
}

/** Final total abundance of the chunk's replicates. */
export interface FinalSummary extends Moments {
  readonly min: number;
  readonly max: number;
  /** Replicates with exactly 0 individuals. */
  readonly zero: number;
  /** 0 < N < 10^FINAL_LOG10_MIN. */
  readonly below: number;
  /** N ≥ 10^FINAL_LOG10_MAX. */
  readonly above: number;
  /** Sparse histogram: [bin, count], bin k covers [10^(MIN + k/B), 10^(MIN + (k+1)/B)), B = FINAL_BINS_PER_DECADE. */
  readonly bins: [number, number][];
}

/** Quasi-extinction probability by a given year with its 95 % Wilson interval. */
export interface ExtinctionPoint {
  readonly year: number;
  /** Cumulative: share of replicates first at or below the threshold in any year ≤ `year`. */
  readonly probability: number;
  readonly lower: number;
  readonly upper: number;
  readonly count: number;
}

export interface StochasticResult {
  readonly units: { readonly time: string; readonly abundance: string; readonly growthRate: string };
  readonly horizon: number;
  readonly replicates: number;
  /** Chunks merged; false `complete` when fewer replicates than planned were merged. */
  readonly chunks: number;
  readonly complete: boolean;
  readonly threshold: { readonly value: number; readonly stages: number[] | null; readonly rule: string };
  readonly quasiExtinction: {
    /** Year t = 0..horizon: cumulative probability and 95 % Wilson band. */
    readonly byYear: { readonly year: number[]; readonly probability: number[]; readonly lower: number[]; readonly upper: number[] };
    readonly table: ExtinctionPoint[];
    /** Share of replicates that went quasi-extinct within the horizon (= probability at the horizon). */
    readonly share: number;
    readonly count: number;
    /** Share of replicates at or below the threshold in the final year (some may have recovered). */
    readonly shareBelowAtHorizon: number;
    /** First year by which at least half of the replicates went quasi-extinct; null (see medianTimeReason) otherwise. */
    readonly medianTime: number | null;
    readonly medianTimeReason: string | null;
    /** Years where the 95 % band's upper and lower edges first reach 50 % (upper edge first); null edges never reach it. */
    readonly medianTimeBand: { readonly earliest: number | null; readonly latest: number | null };
    /** Mean year of first passage among replicates that went quasi-extinct (null when none did). */
    readonly meanTimeAmongExtinct: number | null;
  };
  readonly finalAbundance: {
    readonly mean: number;
    readonly sd: number;
    readonly min: number;
    readonly max: number;
    /** Replicates with exactly 0 individuals at the horizon. */
    readonly zeroCount: number;
    /** Quantiles from the fine histogram (relative resolution ≈ 2.3 %); `censored` marks values beyond its range, reported as the range's edge. */
    readonly quantiles: { readonly p: number; readonly value: number; readonly censored: "below" | "above" | null }[];
    /** Display histogram: counts[k] replicates with edges[k] ≤ N < edges[k+1] (log-spaced); zeros are in zeroCount. */
    readonly histogram: { readonly edges: number[]; readonly counts: number[]; readonly belowRange: number; readonly aboveRange: number };
  };
  /** Total abundance by year t = 0..horizon: mean and SD over replicates. */
  readonly abundance: { readonly mean: number[]; readonly sd: number[] };
  readonly growthRate: {
    readonly simulated: {
      readonly logLambdaS: number;
      readonly lower: number;
      readonly upper: number;
      readonly lambdaS: number;
      readonly standardError: number;
      readonly replicatesUsed: number;
      readonly burnIn: number;
      readonly yearsPerReplicate: number;
    } | null;
    readonly approximation: GrowthApproximation | null;
    readonly method: string;
  };
  /** Why a null above is null, by dotted field name. */
  readonly nullReasons: Record<string, string>;
}

/** A simulation could not go on (bad sampler output, population too large for integer draws). */
export class SimulationError extends Error {
  override readonly name = "SimulationError";
}

/** Fine histogram of final abundance: bins per decade and range (log10). */
export const FINAL_BINS_PER_DECADE = 100;
export const FINAL_LOG10_MIN = -6;
export const FINAL_LOG10_MAX = 15;
const FINE_BINS = (FINAL_LOG10_MAX - FINAL_LOG10_MIN) * FINAL_BINS_PER_DECADE;
/** Quantiles of final abundance reported. */
export const FINAL_QUANTILES = [0.025, 0.05, 0.1, 0.25, 0.5, 0.75, 0.9, 0.95, 0.975] as const;
/** Bars of the display histogram at most. */
export const DISPLAY_BINS = 30;
/** Default number of matrices a sampler model draws for Tuljapurkar's approximation (fewer for large matrices: at most 4e7/n²). */
export const DEFAULT_MOMENT_SAMPLES = 20_000;
/** Random stream used for those draws (chunk streams are 0, 1, 2, …). */
export const MOMENT_STREAM = 2 ** 52;
/** Largest count per stage with demographic stochasticity (integer draws stay exact below 2^53). */
export const MAX_DEMOGRAPHIC_COUNT = 1e15;
const RESCALE_HIGH = 2 ** 600;
const LOG10_2 = Math.log10(2);
const RESCALE_LOW = 2 ** -600;
const FORMAT = "stagewright-risk-chunk-1" as const;

// ---------------------------------------------------------------------------
// Model preparation (validated once per chunk)

interface Prepared {
  readonly n: number;
  readonly kind: StochasticModel["kind"];
  /** Matrix sets: K dense row-major n×n arrays concatenated (A, U, F). */
  readonly K: number;
  readonly denseA: Float64Array;
  readonly denseU: Float64Array | null;
  readonly denseF: Float64Array | null;
  /** Per-set CSR of A: rowPtr has K·(n+1) entries into cols/vals. */
  readonly rowPtr: Int32Array;
  readonly cols: Int32Array;
  readonly vals: Float64Array;
  /** Union pattern of all sets (or the sampler's cells): CSR and CSC. */
  readonly patRowPtr: Int32Array;
  readonly patCols: Int32Array;
  readonly patColPtr: Int32Array;
  readonly patRows: Int32Array;
  /** Choice thresholds on 32-bit draws: for "independent" K entries; for "markov" K rows of K. */
  readonly cum: Float64Array;
  /** Markov: thresholds of the initial distribution. */
  readonly cumInitial: Float64Array;
  /** Independent choice: the weights. */
  readonly weights: Float64Array | null;
  readonly sampler: MatrixSampler | null;
  readonly meanA: Float64Array | null;
}

function readMatrix(value: unknown, field: string, n: number | undefined): { n: number; data: Float64Array } {
  if (!Array.isArray(value) || value.length === 0) throw new MatrixInputError(`${field} must be a non-empty square matrix (array of rows).`, field);
  const size = n ?? value.length;
  if (value.length !== size) throw new MatrixInputError(`${field} must be ${size} × ${size}; it has ${value.length} rows.`, field);
  const data = new Float64Array(size * size);
  for (let i = 0; i < size; i++) {
    const row: unknown = value[i];
    if (!Array.isArray(row) || row.length !== size) throw new MatrixInputError(`${field} row ${i + 1} must have ${size} entries.`, field, [field, i]);
    for (let j = 0; j < size; j++) {
      const x: unknown = row[j];
      if (typeof x !== "number" || !Number.isFinite(x) || x < 0) {
        throw new MatrixInputError(`${field} row ${i + 1}, column ${j + 1} must be a finite number ≥ 0; got ${String(x)}.`, field, [field, i, j]);
      }
      data[i * size + j] = x;
    }
  }
  return { n: size, data };
}

function readDistribution(values: readonly number[], field: string, k: number): Float64Array {
  if (!Array.isArray(values) || values.length !== k) throw new MatrixInputError(`${field} must have ${k} entries, one per environment.`, field);
  let sum = 0;
  values.forEach((w, i) => {
    if (typeof w !== "number" || !Number.isFinite(w) || w < 0) throw new MatrixInputError(`${field} entry ${i + 1} must be a probability ≥ 0; got ${String(w)}.`, field, [field, i]);
    sum += w;
  });
  if (Math.abs(sum - 1) > 1e-9) throw new MatrixInputError(`${field} must sum to 1; it sums to ${sum}.`, field);
  return Float64Array.from(values);
}

/** Thresholds t_k = ⌊2^32 Σ_{i≤k} p_i⌋ (last = ∞) so that a 32-bit draw u picks the first k with u < t_k. */
function thresholds(p: Float64Array, out: Float64Array, offset: number): void {
  let c = 0;
  for (let k = 0; k < p.length; k++) {
    c += p[k]!;
    out[offset + k] = k === p.length - 1 ? Infinity : Math.floor(c * 2 ** 32);
  }
}

function buildPattern(n: number, mask: Uint8Array): { rowPtr: Int32Array; cols: Int32Array; colPtr: Int32Array; rows: Int32Array } {
  const rowPtr = new Int32Array(n + 1);
  const colPtr = new Int32Array(n + 1);
  let nnz = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (mask[i * n + j]) nnz++;
  const cols = new Int32Array(nnz);
  const rows = new Int32Array(nnz);
  let p = 0;
  for (let i = 0; i < n; i++) {
    rowPtr[i] = p;
    for (let j = 0; j < n; j++) if (mask[i * n + j]) cols[p++] = j;
  }
  rowPtr[n] = p;
  p = 0;
  for (let j = 0; j < n; j++) {
    colPtr[j] = p;
    for (let i = 0; i < n; i++) if (mask[i * n + j]) rows[p++] = i;
  }
  colPtr[n] = p;
  return { rowPtr, cols, colPtr, rows };
}

function prepareModel(model: StochasticModel, settings: SimulationSettings): Prepared {
  const demographic = settings.demographic;
  if (model.kind === "sampler") {
    const n = model.stageCount;
    if (!Number.isInteger(n) || n < 1) throw new MatrixInputError("stageCount must be a whole number ≥ 1.", "stageCount");
    if (typeof model.sample !== "function") throw new MatrixInputError("The sampler model needs a sample(rng, out) function.", "sample");
    const mask = new Uint8Array(n * n);
    if (model.cells === undefined) mask.fill(1);
    else {
      model.cells.forEach(([i, j], k) => {
        if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i >= n || j >= n) {
          throw new MatrixInputError(`cells entry ${k + 1} is not a (row, column) of a ${n} × ${n} matrix.`, "cells", ["cells", k]);
        }
        mask[i * n + j] = 1;
      });
    }
    const pat = buildPattern(n, mask);
    const meanA = model.meanMatrix === undefined ? null : readMatrix(model.meanMatrix, "meanMatrix", n).data;
    return {
      n,
      kind: "sampler",
      K: 0,
      denseA: new Float64Array(0),
      denseU: null,
      denseF: null,
      rowPtr: new Int32Array(0),
      cols: new Int32Array(0),
      vals: new Float64Array(0),
      patRowPtr: pat.rowPtr,
      patCols: pat.cols,
      patColPtr: pat.colPtr,
      patRows: pat.rows,
      cum: new Float64Array(0),
      cumInitial: new Float64Array(0),
      weights: null,
      sampler: model.sample,
      meanA,
    };
  }

  const sets = model.matrices;
  if (!Array.isArray(sets) || sets.length === 0) throw new MatrixInputError("Give at least one matrix set.", "matrices");
  const K = sets.length;
  const first = readMatrix(sets[0]!.A, "matrices.0.A", undefined);
  const n = first.n;
  const nn = n * n;
  const denseA = new Float64Array(K * nn);
  const denseU = demographic ? new Float64Array(K * nn) : null;
  const denseF = demographic ? new Float64Array(K * nn) : null;
  const mask = new Uint8Array(nn);
  sets.forEach((set, k) => {
    const a = k === 0 ? first.data : readMatrix(set.A, `matrices.${k}.A`, n).data;
    denseA.set(a, k * nn);
    for (let c = 0; c < nn; c++) if (a[c]! > 0) mask[c] = 1;
    if (demographic) {
      if (set.U === undefined || set.F === undefined) {
        throw new MatrixInputError(`Demographic stochasticity needs U and F (survival and reproduction) for matrix set ${k + 1}.`, `matrices.${k}`);
      }
      const u = readMatrix(set.U, `matrices.${k}.U`, n).data;
      const f = readMatrix(set.F, `matrices.${k}.F`, n).data;
      for (let c = 0; c < nn; c++) {
        if (Math.abs(u[c]! + f[c]! - a[c]!) > 1e-9 * Math.max(1, a[c]!)) {
          throw new MatrixInputError(`Matrix set ${k + 1}: A must equal U + F (row ${Math.floor(c / n) + 1}, column ${(c % n) + 1}).`, `matrices.${k}.A`);
        }
      }
      for (let j = 0; j < n; j++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += u[i * n + j]!;
        if (s > 1 + 1e-9) {
          throw new MatrixInputError(
            `Matrix set ${k + 1}: survival out of stage ${j + 1} sums to ${s.toPrecision(6)} > 1; demographic stochasticity draws fates from U's columns, which must sum to at most 1.`,
            `matrices.${k}.U`,
            [`matrices.${k}.U`, j],
          );
        }
      }
      denseU!.set(u, k * nn);
      denseF!.set(f, k * nn);
    }
  });
  // Per-set CSR of A (structural zeros skipped).
  const rowPtr = new Int32Array(K * (n + 1));
  let nnz = 0;
  for (let c = 0; c < K * nn; c++) if (denseA[c]! !== 0) nnz++;
  const cols = new Int32Array(nnz);
  const vals = new Float64Array(nnz);
  let p = 0;
  for (let k = 0; k < K; k++) {
    for (let i = 0; i < n; i++) {
      rowPtr[k * (n + 1) + i] = p;
      for (let j = 0; j < n; j++) {
        const v = denseA[k * nn + i * n + j]!;
        if (v !== 0) {
          cols[p] = j;
          vals[p] = v;
          p++;
        }
      }
    }
    rowPtr[k * (n + 1) + n] = p;
  }
  const pat = buildPattern(n, mask);

  let cum: Float64Array;
  let cumInitial = new Float64Array(0);
  let weights: Float64Array | null = null;
  const meanA = new Float64Array(nn);
  if (model.kind === "independent") {
    const w = readDistribution(model.weights, "weights", K);
    weights = w;
    cum = new Float64Array(K);
    thresholds(w, cum, 0);
    for (let k = 0; k < K; k++) for (let c = 0; c < nn; c++) meanA[c] = meanA[c]! + w[k]! * denseA[k * nn + c]!;
  } else {
    if (!Array.isArray(model.transition) || model.transition.length !== K) throw new MatrixInputError(`transition must be ${K} × ${K}, one row per environment state.`, "transition");
    cum = new Float64Array(K * K);
    const P = new Float64Array(K * K);
    model.transition.forEach((row, i) => {
      const p = readDistribution(row, `transition.${i}`, K);
      P.set(p, i * K);
      thresholds(p, cum, i * K);
    });
    const init = readDistribution(model.initial, "initial", K);
    cumInitial = new Float64Array(K);
    thresholds(init, cumInitial, 0);
    const pi = stationaryDistribution(P, K);
    for (let k = 0; k < K; k++) for (let c = 0; c < nn; c++) meanA[c] = meanA[c]! + pi[k]! * denseA[k * nn + c]!;
  }
  return {
    n,
    kind: model.kind,
    K,
    denseA,
    denseU,
    denseF,
    rowPtr,
    cols,
    vals,
    patRowPtr: pat.rowPtr,
    patCols: pat.cols,
    patColPtr: pat.colPtr,
    patRows: pat.rows,
    cum,
    cumInitial,
    weights,
    sampler: null,
    meanA,
  };
}

/** Stationary distribution of a row-stochastic K×K chain: power iteration on the lazy chain (½I + ½P), which converges for any finite chain with a single closed class. */
function stationaryDistribution(P: Float64Array, K: number): Float64Array {
  let pi = new Float64Array(K).fill(1 / K);
  let next = new Float64Array(K);
  for (let it = 0; it < 100_000; it++) {
    next.fill(0);
    for (let i = 0; i < K; i++) {
      const pii = pi[i]!;
      next[i] = next[i]! + 0.5 * pii;
      for (let j = 0; j < K; j++) next[j] = next[j]! + 0.5 * pii * P[i * K + j]!;
    }
    let diff = 0;
    for (let i = 0; i < K; i++) diff += Math.abs(next[i]! - pi[i]!);
    [pi, next] = [next, pi];
    if (diff < 1e-14) break;
  }
  return pi;
}

interface CheckedSettings {
  readonly n: number;
  readonly T: number;
  readonly R: number;
  readonly initial: Float64Array;
  readonly mask: Float64Array;
  readonly stages: number[] | null;
  readonly threshold: number;
  readonly ceiling: number;
  readonly demographic: boolean;
}

function checkSettings(settings: SimulationSettings, n: number): CheckedSettings {
  const { horizon, replicates } = settings;
  if (!Number.isInteger(horizon) || horizon < 1 || horizon > MAX_PROJECTION_STEPS) throw new MatrixInputError(`horizon must be a whole number of years from 1 to ${MAX_PROJECTION_STEPS}.`, "horizon");
  if (!Number.isSafeInteger(replicates) || replicates < 1) throw new MatrixInputError("replicates must be a whole number ≥ 1.", "replicates");
  if (!Array.isArray(settings.initial) || settings.initial.length !== n) throw new MatrixInputError(`initial must have ${n} entries, one per stage.`, "initial");
  const initial = new Float64Array(n);
  let total = 0;
  settings.initial.forEach((x, i) => {
    if (typeof x !== "number" || !Number.isFinite(x) || x < 0) throw new MatrixInputError(`initial entry ${i + 1} must be a finite number ≥ 0.`, "initial", ["initial", i]);
    if (settings.demographic && !Number.isInteger(x)) {
      throw new MatrixInputError(`initial entry ${i + 1} is ${x}: with demographic stochasticity, stages hold whole individuals.`, "initial", ["initial", i]);
    }
    initial[i] = x;
    total += x;
  });
  if (!(total > 0)) throw new MatrixInputError("initial is all zeros: the population needs at least one individual.", "initial");
  const thr = settings.threshold?.value;
  if (typeof thr !== "number" || !Number.isFinite(thr) || thr < 0) throw new MatrixInputError("threshold.value must be a finite number ≥ 0.", "threshold.value");
  const mask = new Float64Array(n);
  let stages: number[] | null = null;
  if (settings.threshold.stages == null) mask.fill(1);
  else {
    stages = [...settings.threshold.stages];
    if (stages.length === 0) throw new MatrixInputError("threshold.stages must name at least one stage (or be left out for the total).", "threshold.stages");
    stages.forEach((s, k) => {
      if (!Number.isInteger(s) || s < 0 || s >= n) throw new MatrixInputError(`threshold.stages entry ${k + 1} is not a stage index (0..${n - 1}).`, "threshold.stages", ["threshold", "stages", k]);
      mask[s] = 1;
    });
  }
  const ceiling = settings.ceiling ?? Infinity;
  if (!(ceiling > 0)) throw new MatrixInputError("ceiling must be a number > 0.", "ceiling");
  return { n, T: horizon, R: replicates, initial, mask, stages, threshold: thr, ceiling, demographic: settings.demographic };
}

/**
 * Default burn-in (years discarded before estimating log λs): the time for
 * the mean matrix's transient to shrink 10⁸-fold, ln 10⁸ / ln ρ (ρ its
 * damping ratio), at least 5 years, at most half the horizon; half the
 * horizon when ρ is unknown or ≤ 1. A 100-fold shrink left a bias of order
 * 10⁻⁶ in log λs over 200 years of a constant environment — more than the
 * (zero) Monte Carlo error there, so the interval missed the truth.
 */
export function defaultBurnIn(meanMatrix: Float64Array | null, n: number, horizon: number): number {
  const half = Math.floor(horizon / 2);
  if (meanMatrix === null) return half;
  if (n === 1) return Math.min(half, 5);
  const rows = Array.from({ length: n }, (_, i) => Array.from(meanMatrix.subarray(i * n, i * n + n)));
  let rho: number | null;
  try {
    rho = analyzeMatrix({ A: rows }).dampingRatio;
  } catch {
    rho = null;
  }
  if (rho === null || !(rho > 1)) return half;
  const t = Number.isFinite(rho) ? Math.ceil(Math.log(1e8) / Math.log(rho)) : 0;
  return Math.min(half, Math.max(5, t));
}

// ---------------------------------------------------------------------------
// The chunk simulation

interface Accumulators {
  readonly firstPassage: Float64Array;
  belowAtHorizon: number;
  /** Total abundance by year: shifted sums Σ(v − shift), Σ(v − shift)², shift = the chunk's first replicate (exact for equal values, no cancellation). */
  readonly abShift: Float64Array;
  readonly abS1: Float64Array;
  readonly abS2: Float64Array;
  readonly bins: Int32Array;
  finalCount: number;
  finalMean: number;
  finalM2: number;
  finalMin: number;
  finalMax: number;
  zero: number;
  below: number;
  above: number;
  growthCount: number;
  growthMean: number;
  growthM2: number;
  growthZero: number;
}

function newAccumulators(T: number): Accumulators {
  return {
    firstPassage: new Float64Array(T + 1),
    belowAtHorizon: 0,
    abShift: new Float64Array(T + 1),
    abS1: new Float64Array(T + 1),
    abS2: new Float64Array(T + 1),
    bins: new Int32Array(FINE_BINS),
    finalCount: 0,
    finalMean: 0,
    finalM2: 0,
    finalMin: Infinity,
    finalMax: -Infinity,
    zero: 0,
    below: 0,
    above: 0,
    growthCount: 0,
    growthMean: 0,
    growthM2: 0,
    growthZero: 0,
  };
}

/** Records one replicate's final abundance (true scale) and its log λs estimate. */
function recordReplicate(acc: Accumulators, final: number, log10Final: number, growth: number, growthOk: boolean): void {
  acc.finalCount += 1;
  const d = final - acc.finalMean;
  acc.finalMean += d / acc.finalCount;
  acc.finalM2 += d * (final - acc.finalMean);
  if (final < acc.finalMin) acc.finalMin = final;
  if (final > acc.finalMax) acc.finalMax = final;
  if (log10Final === -Infinity) acc.zero += 1;
  else if (log10Final < FINAL_LOG10_MIN) acc.below += 1;
  else if (log10Final >= FINAL_LOG10_MAX) acc.above += 1;
  else {
    const k = Math.min(FINE_BINS - 1, Math.floor((log10Final - FINAL_LOG10_MIN) * FINAL_BINS_PER_DECADE));
    acc.bins[k] = acc.bins[k]! + 1;
  }
  if (growthOk) {
    acc.growthCount += 1;
    const g = growth - acc.growthMean;
    acc.growthMean += g / acc.growthCount;
    acc.growthM2 += g * (growth - acc.growthMean);
  } else acc.growthZero += 1;
}

/** Power of two that brings x (> 0) back near 1, as an exponent. */
function rescaleExponent(x: number): number {
  return Math.round(Math.log2(x));
}

/**
 * Fast path: matrix sets (independent or Markov), no demographic noise, no
 * ceiling. Sparse rows of A (dense rows when most entries are non-zero), the
 * abundance vector doubles as the growth-rate vector, and powers of two keep
 * it in range without rounding.
 */
function runLinearSets(p: Prepared, s: CheckedSettings, burnIn: number, rng: Random, count: number, acc: Accumulators): void {
  const { n, K, rowPtr, cols, vals, cum, cumInitial, denseA } = p;
  const { T, initial, mask, threshold } = s;
  const markov = p.kind === "markov";
  const nn = n * n;
  // Mostly full matrices: a dense kernel beats indexed access (measured on 10×10).
  const dense = vals.length > 0.6 * K * nn;
  const { firstPassage, abShift, abS1, abS2 } = acc;
  let x = new Float64Array(n);
  let y = new Float64Array(n);
  let total0 = 0;
  let sub0 = 0;
  for (let i = 0; i < n; i++) {
    total0 += initial[i]!;
    sub0 += mask[i]! * initial[i]!;
  }
  const startBelow = sub0 <= threshold;
  const years = T - burnIn;
  const stride = n + 1;
  for (let r = 0; r < count; r++) {
    x.set(initial);
    let scale = 1;
    let ex = 0; // true abundance = x · 2^ex (scale = 2^ex, which may under- or overflow; ex does not)
    let thr = threshold;
    let extinct = startBelow;
    if (startBelow) firstPassage[0] = firstPassage[0]! + 1;
    let state = 0;
    if (markov) {
      const u = rng.nextUint32();
      while (u >= cumInitial[state]!) state++;
    }
    let logStart = burnIn === 0 ? Math.log(total0) : NaN;
    let total = total0;
    let sub = sub0;
    for (let t = 1; t <= T; t++) {
      let k: number;
      if (markov) {
        k = state;
        const row = state * K;
        const u = rng.nextUint32();
        let next = 0;
        while (u >= cum[row + next]!) next++;
        state = next;
      } else if (K === 1) k = 0;
      else {
        const u = rng.nextUint32();
        k = 0;
        while (u >= cum[k]!) k++;
      }
      total = 0;
      sub = 0;
      if (dense) {
        // Two accumulators per row: independent add chains run in parallel.
        let off = k * nn;
        for (let i = 0; i < n; i++) {
          let a0 = 0;
          let a1 = 0;
          let j = 0;
          for (; j + 1 < n; j += 2) {
            a0 += denseA[off + j]! * x[j]!;
            a1 += denseA[off + j + 1]! * x[j + 1]!;
          }
          if (j < n) a0 += denseA[off + j]! * x[j]!;
          off += n;
          a0 += a1;
          y[i] = a0;
          total += a0;
          sub += mask[i]! * a0;
        }
      } else {
        const base = k * stride;
        let start = rowPtr[base]!;
        for (let i = 0; i < n; i++) {
          const end = rowPtr[base + i + 1]!;
          let a0 = 0;
          for (let q = start; q < end; q++) a0 += vals[q]! * x[cols[q]!]!;
          start = end;
          y[i] = a0;
          total += a0;
          sub += mask[i]! * a0;
        }
      }
      const swap = x;
      x = y;
      y = swap;
      if (!extinct && sub <= thr) {
        extinct = true;
        firstPassage[t] = firstPassage[t]! + 1;
      }
      if (total > RESCALE_HIGH || (total < RESCALE_LOW && total > 0)) {
        const e = rescaleExponent(total);
        const f = 2 ** -e;
        for (let i = 0; i < n; i++) x[i] = x[i]! * f;
        total *= f;
        sub *= f;
        ex += e;
        scale = 2 ** ex;
        thr = threshold * 2 ** -ex;
      }
      const v = total * scale;
      if (r === 0) abShift[t] = v;
      const d = v - abShift[t]!;
      abS1[t] = abS1[t]! + d;
      abS2[t] = abS2[t]! + d * d;
      if (t === burnIn) logStart = Math.log(total) + ex * Math.LN2;
    }
    if (sub <= thr) acc.belowAtHorizon += 1;
    const final = total * scale;
    const log10Final = total > 0 ? Math.log10(total) + ex * LOG10_2 : -Infinity;
    const logEnd = Math.log(total) + ex * Math.LN2;
    const ok = years > 0 && total > 0 && Number.isFinite(logStart);
    recordReplicate(acc, final, log10Final, ok ? (logEnd - logStart) / years : 0, ok);
  }
}

/** Largest table of block products (doubles, all lengths together): 1 MiB, the L2 cache of one core here. */
const BLOCK_TABLE_LIMIT = 131_072;
/** Longest block of years applied as one precomputed product. */
const MAX_BLOCK = 4;

/**
 * Years per block for the linear fast path. With K matrices, the products
 * A_{k_m}⋯A_{k_1} of every sequence of m choices can be tabulated
 * (K^m dense n×n matrices); a block of m years then costs one dense
 * product with the vector (n² multiply-adds) plus, for each of the m − 1
 * years inside it, a dot product with the column sums of the partial
 * product, which gives that year's total (and another with the chosen
 * stages' sums when the threshold is on some stages) — all a year's
 * bookkeeping needs. Chosen when it cuts the multiply-adds per year and the
 * table stays small; 1 means year by year.
 */
function chooseBlockLength(p: Prepared, subset: boolean): number {
  const { n, K } = p;
  const nn = n * n;
  if (K < 1) return 1;
  const denseSingle = p.vals.length > 0.6 * K * nn;
  // Indexed (sparse) access costs about 1.7 dense multiply-adds per non-zero (measured on 10×10).
  let bestCost = denseSingle ? nn : (1.7 * p.vals.length) / K;
  let best = 1;
  let tableSize = K * nn;
  for (let m = 2; m <= MAX_BLOCK; m++) {
    tableSize += K ** m * nn + K ** (m - 1) * n * 2;
    if (tableSize > BLOCK_TABLE_LIMIT) break;
    const cost = (nn + (m - 1) * n * (subset ? 2 : 1)) / m;
    if (cost < 0.9 * bestCost) {
      best = m;
      bestCost = cost;
    }
  }
  return best;
}

interface BlockTables {
  /** products[L]: K^L dense products, code = k₁ + K k₂ + … (k₁ the first year). */
  readonly products: Float64Array[];
  /** prefix[j][code] = code mod K^j: the code of the block's first j years. */
  readonly prefix: Int32Array[];
  /**
   * Independent years: the code of a whole block of L years is one draw from
   * K^L outcomes with probabilities Π w_{k_j}; codeThresholds[L] are their
   * cumulative 32-bit thresholds and codeGuide[L] a guide table (Chen &
   * Asau 1974) indexed by the draw's top GUIDE_BITS bits, giving the first
   * code to test.
   */
  readonly codeThresholds: Float64Array[];
  readonly codeGuide: Int32Array[];
  /** columnSums[L]: 1ᵀ·product, K^L vectors of n. */
  readonly columnSums: Float64Array[];
  /** maskSums[L]: maskᵀ·product (chosen stages only). */
  readonly maskSums: Float64Array[];
}

const GUIDE_BITS = 12;

function blockTables(p: Prepared, mask: Float64Array, m: number, weights: Float64Array | null): BlockTables {
  const { n, K, denseA } = p;
  const nn = n * n;
  const prefix: Int32Array[] = [new Int32Array(0)];
  for (let j = 1; j < m; j++) prefix.push(Int32Array.from({ length: K ** m }, (_, c) => c % K ** j));
  const codeThresholds: Float64Array[] = [new Float64Array(0)];
  const codeGuide: Int32Array[] = [new Int32Array(0)];
  if (weights !== null) {
    for (let L = 1; L <= m; L++) {
      const count = K ** L;
      const probs = new Float64Array(count);
      for (let c = 0; c < count; c++) {
        let q = 1;
        let rest = c;
        for (let j = 0; j < L; j++) {
          q *= weights[rest % K]!;
          rest = Math.floor(rest / K);
        }
        probs[c] = q;
      }
      const thr = new Float64Array(count);
      thresholds(probs, thr, 0);
      const guide = new Int32Array(2 ** GUIDE_BITS);
      let c = 0;
      for (let g = 0; g < guide.length; g++) {
        const lowest = g * 2 ** (32 - GUIDE_BITS);
        while (lowest >= thr[c]!) c++;
        guide[g] = c;
      }
      codeThresholds.push(thr);
      codeGuide.push(guide);
    }
  }
  const products: Float64Array[] = [new Float64Array(0), denseA];
  for (let L = 2; L <= m; L++) {
    const prev = products[L - 1]!;
    const count = K ** (L - 1);
    const next = new Float64Array(count * K * nn);
    for (let k = 0; k < K; k++) {
      for (let c = 0; c < count; c++) {
        // next[c + count·k] = A_k · prev[c]
        const out = (c + count * k) * nn;
        const a = k * nn;
        const b = c * nn;
        for (let i = 0; i < n; i++) {
          for (let l = 0; l < n; l++) {
            const ail = denseA[a + i * n + l]!;
            if (ail === 0) continue;
            for (let j = 0; j < n; j++) next[out + i * n + j] = next[out + i * n + j]! + ail * prev[b + l * n + j]!;
          }
        }
      }
    }
    products.push(next);
  }
  const columnSums: Float64Array[] = [new Float64Array(0)];
  const maskSums: Float64Array[] = [new Float64Array(0)];
  for (let L = 1; L <= m; L++) {
    const prod = products[L]!;
    const count = K ** L;
    const cs = new Float64Array(count * n);
    const ms = new Float64Array(count * n);
    for (let c = 0; c < count; c++) {
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const v = prod[c * nn + i * n + j]!;
          cs[c * n + j] = cs[c * n + j]! + v;
          ms[c * n + j] = ms[c * n + j]! + mask[i]! * v;
        }
      }
    }
    columnSums.push(cs);
    maskSums.push(ms);
  }
  return { products, prefix, codeThresholds, codeGuide, columnSums, maskSums };
}

/** The linear fast path with blocks of m years (see chooseBlockLength); otherwise as runLinearSets. */
function runLinearBlocks(p: Prepared, s: CheckedSettings, burnIn: number, rng: Random, count: number, acc: Accumulators, m: number): void {
  const { n, K, cum, cumInitial } = p;
  const { T, initial, mask, threshold } = s;
  const markov = p.kind === "markov";
  const subset = s.stages !== null;
  const nn = n * n;
  const { products, prefix, codeThresholds, codeGuide, columnSums, maskSums } = blockTables(p, mask, m, markov ? null : p.weights);
  const { firstPassage, abShift, abS1, abS2 } = acc;
  let x = new Float64Array(n);
  let y = new Float64Array(n);
  let total0 = 0;
  let sub0 = 0;
  for (let i = 0; i < n; i++) {
    total0 += initial[i]!;
    sub0 += mask[i]! * initial[i]!;
  }
  const startBelow = sub0 <= threshold;
  const years = T - burnIn;
  for (let r = 0; r < count; r++) {
    x.set(initial);
    let scale = 1;
    let ex = 0; // true abundance = x · 2^ex (scale = 2^ex, which may under- or overflow; ex does not)
    let thr = threshold;
    let extinct = startBelow;
    if (startBelow) firstPassage[0] = firstPassage[0]! + 1;
    let state = 0;
    if (markov) {
      const u = rng.nextUint32();
      while (u >= cumInitial[state]!) state++;
    }
    let logStart = burnIn === 0 ? Math.log(total0) : NaN;
    let total = total0;
    let sub = sub0;
    let t = 0;
    while (t < T) {
      const L = T - t < m ? T - t : m;
      let code = 0;
      if (markov) {
        let power = 1;
        for (let j = 0; j < L; j++) {
          const u = rng.nextUint32();
          let next = 0;
          while (u >= cum[state * K + next]!) next++;
          code += state * power;
          power *= K;
          state = next;
        }
      } else {
        const u = rng.nextUint32();
        const thr32 = codeThresholds[L]!;
        code = codeGuide[L]![u >>> (32 - GUIDE_BITS)]!;
        while (u >= thr32[code]!) code++;
      }
      for (let j = 1; j < L; j++) {
        // Year t + j inside the block: totals from the partial product's column sums.
        const cs = columnSums[j]!;
        const base = prefix[j]![code]! * n;
        let tot = 0;
        for (let i = 0; i < n; i++) tot += cs[base + i]! * x[i]!;
        let sb = tot;
        if (subset) {
          const ms = maskSums[j]!;
          sb = 0;
          for (let i = 0; i < n; i++) sb += ms[base + i]! * x[i]!;
        }
        const year = t + j;
        if (!extinct && sb <= thr) {
          extinct = true;
          firstPassage[year] = firstPassage[year]! + 1;
        }
        const v = tot * scale;
        if (r === 0) abShift[year] = v;
        const d = v - abShift[year]!;
        abS1[year] = abS1[year]! + d;
        abS2[year] = abS2[year]! + d * d;
        if (year === burnIn) logStart = Math.log(tot) + ex * Math.LN2;
      }
      // The whole block: y = (A_{k_L}⋯A_{k_1}) x.
      const prod = products[L]!;
      let off = code * nn;
      total = 0;
      sub = 0;
      for (let i = 0; i < n; i++) {
        let a0 = 0;
        let a1 = 0;
        let j = 0;
        for (; j + 1 < n; j += 2) {
          a0 += prod[off + j]! * x[j]!;
          a1 += prod[off + j + 1]! * x[j + 1]!;
        }
        if (j < n) a0 += prod[off + j]! * x[j]!;
        off += n;
        a0 += a1;
        y[i] = a0;
        total += a0;
        if (subset) sub += mask[i]! * a0;
      }
      if (!subset) sub = total;
      const swap = x;
      x = y;
      y = swap;
      t += L;
      if (!extinct && sub <= thr) {
        extinct = true;
        firstPassage[t] = firstPassage[t]! + 1;
      }
      if (total > RESCALE_HIGH || (total < RESCALE_LOW && total > 0)) {
        const e = rescaleExponent(total);
        const f = 2 ** -e;
        for (let i = 0; i < n; i++) x[i] = x[i]! * f;
        total *= f;
        sub *= f;
        ex += e;
        scale = 2 ** ex;
        thr = threshold * 2 ** -ex;
      }
      const v = total * scale;
      if (r === 0) abShift[t] = v;
      const d = v - abShift[t]!;
      abS1[t] = abS1[t]! + d;
      abS2[t] = abS2[t]! + d * d;
      if (t === burnIn) logStart = Math.log(total) + ex * Math.LN2;
    }
    if (sub <= thr) acc.belowAtHorizon += 1;
    const final = total * scale;
    const log10Final = total > 0 ? Math.log10(total) + ex * LOG10_2 : -Infinity;
    const logEnd = Math.log(total) + ex * Math.LN2;
    const ok = years > 0 && total > 0 && Number.isFinite(logStart);
    recordReplicate(acc, final, log10Final, ok ? (logEnd - logStart) / years : 0, ok);
  }
}

/**
 * General path: sampler models, demographic stochasticity, ceilings. Dense
 * matrices read through the union sparsity pattern.
 */
function runGeneral(p: Prepared, s: CheckedSettings, burnIn: number, rng: Random, count: number, acc: Accumulators): void {
  const { n, K, cum, cumInitial, patRowPtr, patCols, patColPtr, patRows } = p;
  const { T, initial, mask, threshold, ceiling, demographic } = s;
  const nn = n * n;
  const markov = p.kind === "markov";
  const sampled = p.kind === "sampler";
  const separate = demographic || Number.isFinite(ceiling);
  const out: SampledMatrices = { A: new Float64Array(nn), U: new Float64Array(nn), F: new Float64Array(nn) };
  const { firstPassage, abShift, abS1, abS2 } = acc;
  let x = new Float64Array(n);
  let y = new Float64Array(n);
  let z = new Float64Array(n);
  let zy = new Float64Array(n);
  let total0 = 0;
  let sub0 = 0;
  for (let i = 0; i < n; i++) {
    total0 += initial[i]!;
    sub0 += mask[i]! * initial[i]!;
  }
  const startBelow = sub0 <= threshold;
  const years = T - burnIn;
  for (let r = 0; r < count; r++) {
    x.set(initial);
    let scale = 1;
    let ex = 0; // true abundance = x · 2^ex (scale = 2^ex, which may under- or overflow; ex does not)
    let thr = threshold;
    let ceil = ceiling;
    let extinct = startBelow;
    if (startBelow) firstPassage[0] = firstPassage[0]! + 1;
    for (let i = 0; i < n; i++) z[i] = initial[i]! / total0;
    let zEx = 0; // environment-only total = zTotal · 2^zEx · total0
    const zLog0 = Math.log(total0);
    let state = 0;
    if (markov) {
      const u = rng.nextUint32();
      while (u >= cumInitial[state]!) state++;
    }
    let logStart = burnIn === 0 ? Math.log(total0) : NaN;
    let total = total0;
    let sub = sub0;
    let zTotal = 1;
    for (let t = 1; t <= T; t++) {
      // This year's matrices.
      let A: Float64Array;
      let U: Float64Array | null = null;
      let F: Float64Array | null = null;
      let off = 0;
      if (sampled) {
        p.sampler!(rng, out);
        checkSample(out, p, demographic, r, t);
        A = out.A;
        U = out.U;
        F = out.F;
      } else {
        let k: number;
        if (markov) {
          k = state;
          const u = rng.nextUint32();
          let next = 0;
          while (u >= cum[state * K + next]!) next++;
          state = next;
        } else if (K === 1) k = 0;
        else {
          const u = rng.nextUint32();
          k = 0;
          while (u >= cum[k]!) k++;
        }
        off = k * nn;
        A = p.denseA;
        U = p.denseU;
        F = p.denseF;
      }

      // Environment-only vector for log λs.
      if (separate) {
        zTotal = 0;
        for (let i = 0; i < n; i++) {
          let a = 0;
          const row = off + i * n;
          for (let q = patRowPtr[i]!; q < patRowPtr[i + 1]!; q++) {
            const j = patCols[q]!;
            a += A[row + j]! * z[j]!;
          }
          zy[i] = a;
          zTotal += a;
        }
        const sw = z;
        z = zy;
        zy = sw;
        if (zTotal > RESCALE_HIGH || (zTotal < RESCALE_LOW && zTotal > 0)) {
          const e = rescaleExponent(zTotal);
          const f = 2 ** -e;
          for (let i = 0; i < n; i++) z[i] = z[i]! * f;
          zTotal *= f;
          zEx += e;
        }
      }

      // Abundance.
      const alive = total > 0;
      total = 0;
      if (demographic) {
        y.fill(0);
        if (alive) {
          for (let j = 0; j < n; j++) {
            let left = x[j]!;
            if (left === 0) continue;
            let pLeft = 1;
            for (let q = patColPtr[j]!; q < patColPtr[j + 1]! && left > 0; q++) {
              const i = patRows[q]!;
              const u = U![off + i * n + j]!;
              if (u <= 0) continue;
              const prob = pLeft <= u ? 1 : u / pLeft;
              const moved = rng.binomial(left, prob > 1 ? 1 : prob);
              y[i] = y[i]! + moved;
              left -= moved;
              pLeft -= u;
            }
          }
          for (let i = 0; i < n; i++) {
            let births = 0;
            const row = off + i * n;
            for (let q = patRowPtr[i]!; q < patRowPtr[i + 1]!; q++) {
              const j = patCols[q]!;
              births += F![row + j]! * x[j]!;
            }
            if (births > 0) y[i] = y[i]! + rng.poisson(births);
          }
        }
        for (let i = 0; i < n; i++) {
          if (y[i]! > MAX_DEMOGRAPHIC_COUNT) {
            throw new SimulationError(
              `Replicate ${r + 1}, year ${t}: a stage exceeded ${MAX_DEMOGRAPHIC_COUNT.toExponential(0)} individuals, beyond exact integer draws. Set a ceiling on total abundance or turn demographic stochasticity off for populations this large.`,
            );
          }
          total += y[i]!;
        }
      } else {
        for (let i = 0; i < n; i++) {
          let a = 0;
          const row = off + i * n;
          for (let q = patRowPtr[i]!; q < patRowPtr[i + 1]!; q++) {
            const j = patCols[q]!;
            a += A[row + j]! * x[j]!;
          }
          y[i] = a;
          total += a;
        }
      }
      const sw = x;
      x = y;
      y = sw;
      if (total > ceil) {
        const f = ceil / total;
        total = 0;
        for (let i = 0; i < n; i++) {
          const v = demographic ? Math.floor(x[i]! * f) : x[i]! * f;
          x[i] = v;
          total += v;
        }
      }
      sub = 0;
      for (let i = 0; i < n; i++) sub += mask[i]! * x[i]!;
      if (!extinct && sub <= thr) {
        extinct = true;
        firstPassage[t] = firstPassage[t]! + 1;
      }
      if (!demographic && (total > RESCALE_HIGH || (total < RESCALE_LOW && total > 0))) {
        const e = rescaleExponent(total);
        const f = 2 ** -e;
        for (let i = 0; i < n; i++) x[i] = x[i]! * f;
        total *= f;
        sub *= f;
        ex += e;
        scale = 2 ** ex;
        thr = threshold * 2 ** -ex;
        ceil = ceiling * 2 ** -ex;
      }
      const v = total * scale;
      if (r === 0) abShift[t] = v;
      const d = v - abShift[t]!;
      abS1[t] = abS1[t]! + d;
      abS2[t] = abS2[t]! + d * d;
      if (t === burnIn) logStart = separate ? Math.log(zTotal) + zEx * Math.LN2 + zLog0 : Math.log(total) + ex * Math.LN2;
    }
    if (sub <= thr) acc.belowAtHorizon += 1;
    const final = total * scale;
    const log10Final = total > 0 ? Math.log10(total) + ex * LOG10_2 : -Infinity;
    const endTotal = separate ? zTotal : total;
    const logEnd = separate ? Math.log(zTotal) + zEx * Math.LN2 + zLog0 : Math.log(total) + ex * Math.LN2;
    const ok = years > 0 && endTotal > 0 && Number.isFinite(logStart);
    recordReplicate(acc, final, log10Final, ok ? (logEnd - logStart) / years : 0, ok);
  }
}

/** A sampler's draw must be usable: finite, non-negative, and for demographic noise U columns summing to at most 1. */
function checkSample(out: SampledMatrices, p: Prepared, demographic: boolean, r: number, t: number): void {
  const { n, patColPtr, patRows } = p;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let q = patColPtr[j]!; q < patColPtr[j + 1]!; q++) {
      const c = patRows[q]! * n + j;
      const a = out.A[c]!;
      if (!(a >= 0) || a === Infinity) {
        throw new SimulationError(`Replicate ${r + 1}, year ${t}: the sampled matrix has ${String(a)} in row ${patRows[q]! + 1}, column ${j + 1}; entries must be finite and ≥ 0.`);
      }
      if (demographic) s += out.U[c]!;
    }
    if (demographic && s > 1 + 1e-9) {
      throw new SimulationError(
        `Replicate ${r + 1}, year ${t}: the sampled survival out of stage ${j + 1} sums to ${s.toPrecision(6)} > 1; demographic stochasticity needs each column of U to sum to at most 1.`,
      );
    }
  }
}

/**
 * Simulate one chunk of replicates (years = projection intervals). The
 * chunk's random stream depends only on (seed, chunkIndex). Returns a
 * compact, JSON-serialisable partial result for mergeChunks.
 */
export function simulateChunk(model: StochasticModel, settings: SimulationSettings, chunk: ChunkSpec, tuning: SimulationTuning = {}): ChunkResult {
  const p = prepareModel(model, settings);
  const s = checkSettings(settings, p.n);
  const { seed, chunkIndex, firstReplicate, replicateCount } = chunk;
  if (!Number.isSafeInteger(chunkIndex) || chunkIndex < 0 || chunkIndex >= MOMENT_STREAM) throw new MatrixInputError("chunkIndex must be a whole number ≥ 0.", "chunkIndex");
  if (!Number.isSafeInteger(firstReplicate) || firstReplicate < 0) throw new MatrixInputError("firstReplicate must be a whole number ≥ 0.", "firstReplicate");
  if (!Number.isSafeInteger(replicateCount) || replicateCount < 1 || firstReplicate + replicateCount > s.R) {
    throw new MatrixInputError(`replicateCount must be ≥ 1 and the chunk must lie within the ${s.R} replicates.`, "replicateCount");
  }
  const burnIn = resolveBurnIn(settings, p, s.T);
  const rng = createRandom(seed, chunkIndex);
  const acc = newAccumulators(s.T);
  if (p.kind !== "sampler" && !s.demographic && !Number.isFinite(s.ceiling)) {
    const m = Math.min(chooseBlockLength(p, s.stages !== null), Math.max(1, Math.floor(tuning.maxBlockYears ?? MAX_BLOCK)));
    if (m > 1) runLinearBlocks(p, s, burnIn, rng, replicateCount, acc, m);
    else runLinearSets(p, s, burnIn, rng, replicateCount, acc);
  } else runGeneral(p, s, burnIn, rng, replicateCount, acc);

  let approximation: ChunkResult["approximation"] = null;
  if (chunkIndex === 0) approximation = approximateGrowth(model, p, seed);

  // Moments by year from the shifted sums; year 0 is the initial vector in every replicate.
  const N = replicateCount;
  const abundanceMean = Array.from(acc.abShift, (shift, t) => (t === 0 ? s.initial.reduce((a, b) => a + b, 0) : shift + acc.abS1[t]! / N));
  const abundanceM2 = Array.from(acc.abS2, (s2, t) => (t === 0 ? 0 : Math.max(0, s2 - acc.abS1[t]! ** 2 / N)));
  const bins: [number, number][] = [];
  acc.bins.forEach((c, k) => {
    if (c > 0) bins.push([k, c]);
  });
  return {
    format: FORMAT,
    seed,
    chunkIndex,
    firstReplicate,
    replicateCount,
    horizon: s.T,
    burnIn,
    firstPassage: Array.from(acc.firstPassage),
    belowAtHorizon: acc.belowAtHorizon,
    abundanceMean,
    abundanceM2,
    final: {
      count: acc.finalCount,
      mean: acc.finalMean,
      m2: acc.finalM2,
      min: acc.finalMin,
      max: acc.finalMax,
      zero: acc.zero,
      below: acc.below,
      above: acc.above,
      bins,
    },
    growth: { count: acc.growthCount, mean: acc.growthMean, m2: acc.growthM2, zeroReplicates: acc.growthZero },
    approximation,
  };
}

function resolveBurnIn(settings: SimulationSettings, p: Prepared, T: number): number {
  if (settings.burnIn !== undefined) {
    const b = settings.burnIn;
    if (!Number.isInteger(b) || b < 0 || b >= T) throw new MatrixInputError(`burnIn must be a whole number of years from 0 to ${T - 1} (less than the horizon).`, "burnIn");
    return b;
  }
  return defaultBurnIn(p.meanA, p.n, T);
}

// ---------------------------------------------------------------------------
// Tuljapurkar's approximation

/**
 * Tuljapurkar's small-noise approximation of log λs (per year) for
 * independent years: exact weighted moments for a matrix set, moments of
 * sampled matrices (stream MOMENT_STREAM of `seed`) for a sampler. Markov
 * environments are autocorrelated, which this formula leaves out: the
 * result is null with the reason.
 */
export function growthRateApproximation(model: StochasticModel, seed = 0): { value: GrowthApproximation | null; reason: string | null } {
  const p = prepareModel(model, { horizon: 1, replicates: 1, initial: [], demographic: false, threshold: { value: 0 } });
  return approximateGrowth(model, p, seed);
}

function approximateGrowth(model: StochasticModel, p: Prepared, seed: number): { value: GrowthApproximation | null; reason: string | null } {
  const n = p.n;
  const nn = n * n;
  if (p.kind === "markov") {
    return {
      value: null,
      reason: "Tuljapurkar's small-noise formula used here is for environments drawn independently each year; a Markov chain of environments is autocorrelated, which adds terms it leaves out.",
    };
  }
  if (p.kind === "independent" && model.kind === "independent") {
    const w = model.weights;
    const mean = p.meanA!;
    const s = sensitivityAt(mean, n);
    if (typeof s === "string") return { value: null, reason: s };
    let dMean = 0;
    const d = new Float64Array(p.K);
    for (let k = 0; k < p.K; k++) {
      let acc = 0;
      for (let c = 0; c < nn; c++) acc += s.s[c]! * p.denseA[k * nn + c]!;
      d[k] = acc;
      dMean += w[k]! * acc;
    }
    let tau2 = 0;
    for (let k = 0; k < p.K; k++) tau2 += w[k]! * (d[k]! - dMean) ** 2;
    return { value: approximation(s.lambda, tau2, { tau2StandardError: 0, standardError: 0, samples: 0, exactMean: true }), reason: null };
  }
  if (model.kind !== "sampler") return { value: null, reason: "Unknown model kind." };
  const M = Math.max(200, Math.min(model.momentSamples ?? DEFAULT_MOMENT_SAMPLES, Math.floor(4e7 / nn)));
  const out: SampledMatrices = { A: new Float64Array(nn), U: new Float64Array(nn), F: new Float64Array(nn) };
  const exact = model.meanMatrixExact === true && p.meanA !== null;
  let mean: Float64Array;
  if (exact) mean = p.meanA!;
  else {
    // Pass 1 estimates Ā; pass 2 replays the same stream for Σ s_ij a_ij.
    mean = new Float64Array(nn);
    const rng = createRandom(seed, MOMENT_STREAM);
    for (let m = 0; m < M; m++) {
      model.sample(rng, out);
      for (let c = 0; c < nn; c++) mean[c] = mean[c]! + out.A[c]!;
    }
    for (let c = 0; c < nn; c++) mean[c] = mean[c]! / M;
    out.A.fill(0);
    out.U.fill(0);
    out.F.fill(0);
  }
  const s = sensitivityAt(mean, n);
  if (typeof s === "string") return { value: null, reason: s };
  const rng = createRandom(seed, MOMENT_STREAM);
  const ds = new Float64Array(M);
  let dm = 0;
  for (let m = 0; m < M; m++) {
    model.sample(rng, out);
    let acc = 0;
    for (let c = 0; c < nn; c++) acc += s.s[c]! * out.A[c]!;
    ds[m] = acc;
    dm += acc;
  }
  // E[Σ s_ij a_ij] = Σ s_ij ā_ij = λ̄ when Ā is exact; otherwise the sample mean.
  const centre = exact ? s.lambda : dm / M;
  let d2 = 0;
  let d4 = 0;
  for (let m = 0; m < M; m++) {
    const e = ds[m]! - centre;
    d2 += e * e;
    d4 += e ** 4;
  }
  const tau2 = d2 / (exact ? M : M - 1);
  const tau2Se = Math.sqrt(Math.max(0, d4 / M - (d2 / M) ** 2) / M);
  // log λ(Ā) estimated from M matrices varies like Σ s_ij (Ā − E A)_ij / λ̄: variance τ²/(M λ̄²).
  const lambda = s.lambda;
  const se = Math.hypot(exact ? 0 : Math.sqrt(tau2 / M) / lambda, tau2Se / (2 * lambda * lambda));
  return { value: approximation(lambda, tau2, { tau2StandardError: tau2Se, standardError: se, samples: M, exactMean: exact }), reason: null };
}

function approximation(lambda: number, tau2: number, sampling: { tau2StandardError: number; standardError: number; samples: number; exactMean: boolean }): GrowthApproximation {
  const logLambdaS = Math.log(lambda) - tau2 / (2 * lambda * lambda);
  return { logLambdaS, lambdaS: Math.exp(logLambdaS), lambdaMean: lambda, logLambdaMean: Math.log(lambda), tau2, ...sampling };
}

function sensitivityAt(mean: Float64Array, n: number): { lambda: number; s: Float64Array } | string {
  const rows = Array.from({ length: n }, (_, i) => Array.from(mean.subarray(i * n, i * n + n)));
  const a = analyzeMatrix({ A: rows });
  if (a.sensitivity === null || !(a.lambda > 0)) {
    return `The mean matrix has no usable sensitivities (${a.nullReasons.sensitivity ?? "λ = 0"}), which the approximation needs.`;
  }
  const s = new Float64Array(n * n);
  a.sensitivity.forEach((row, i) => row.forEach((v, j) => (s[i * n + j] = v)));
  return { lambda: a.lambda, s };
}

// ---------------------------------------------------------------------------
// Merging

function mergeMoments(a: Moments, b: Moments): Moments {
  if (a.count === 0) return b;
  if (b.count === 0) return a;
  const count = a.count + b.count;
  const delta = b.mean - a.mean;
  return { count, mean: a.mean + (delta * b.count) / count, m2: a.m2 + b.m2 + (delta * delta * a.count * b.count) / count };
}

function defaultReportYears(T: number): number[] {
  const years = [10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000].filter((y) => y < T);
  years.push(T);
  return years;
}

const binLower = (k: number): number => 10 ** (FINAL_LOG10_MIN + k / FINAL_BINS_PER_DECADE);

/**
 * Combine chunk results (ordered by chunkIndex 0, 1, 2, …) into the Run's
 * result. Throws when chunks are missing, out of order or from other
 * settings; with `allowIncomplete`, a prefix of the chunks gives a provisional
 * result (complete = false) for progress displays.
 */
export function mergeChunks(settings: SimulationSettings, partials: readonly ChunkResult[], options: { allowIncomplete?: boolean } = {}): StochasticResult {
  const T = settings.horizon;
  if (partials.length === 0) throw new MatrixInputError("No chunk results to merge.", "partials");
  let next = 0;
  partials.forEach((c, k) => {
    if (c.format !== FORMAT) throw new MatrixInputError(`Chunk ${k} has format "${String(c.format)}", expected "${FORMAT}".`, "partials", ["partials", k]);
    if (c.chunkIndex !== k) throw new MatrixInputError(`Chunk results must be ordered by chunkIndex 0, 1, 2, …; position ${k} holds chunk ${c.chunkIndex}.`, "partials", ["partials", k]);
    if (c.firstReplicate !== next) throw new MatrixInputError(`Chunk ${k} starts at replicate ${c.firstReplicate}, but the chunks before it end at ${next}.`, "partials", ["partials", k]);
    if (c.horizon !== T || c.firstPassage.length !== T + 1) throw new MatrixInputError(`Chunk ${k} was simulated over ${c.horizon} years, not ${T}.`, "partials", ["partials", k]);
    if (c.burnIn !== partials[0]!.burnIn) throw new MatrixInputError(`Chunk ${k} used a different burn-in.`, "partials", ["partials", k]);
    if (c.seed !== partials[0]!.seed) throw new MatrixInputError(`Chunk ${k} was simulated with seed ${c.seed}, chunk 0 with ${partials[0]!.seed}: chunks of one Run share its seed.`, "partials", ["partials", k]);
    next += c.replicateCount;
  });
  if (next > settings.replicates) throw new MatrixInputError(`The chunks hold ${next} replicates but the settings ask for ${settings.replicates}.`, "partials");
  const complete = next === settings.replicates;
  if (!complete && !options.allowIncomplete) throw new MatrixInputError(`The chunks hold ${next} of the ${settings.replicates} replicates; merge all of them (or pass allowIncomplete).`, "partials");
  const R = next;
  const burnIn = partials[0]!.burnIn;
  const nullReasons: Record<string, string> = {};

  // Quasi-extinction.
  const first = new Float64Array(T + 1);
  let belowAtHorizon = 0;
  for (const c of partials) {
    for (let t = 0; t <= T; t++) first[t] = first[t]! + c.firstPassage[t]!;
    belowAtHorizon += c.belowAtHorizon;
  }
  const year: number[] = [];
  const probability: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  const cumCount: number[] = [];
  let cumulative = 0;
  let weightedYears = 0;
  for (let t = 0; t <= T; t++) {
    cumulative += first[t]!;
    weightedYears += t * first[t]!;
    const w = wilsonInterval(cumulative, R);
    year.push(t);
    cumCount.push(cumulative);
    probability.push(cumulative / R);
    lower.push(w.lower);
    upper.push(w.upper);
  }
  const reportYears = [...new Set((settings.reportYears ?? defaultReportYears(T)).filter((y) => Number.isInteger(y) && y >= 0 && y <= T))].sort((a, b) => a - b);
  const table: ExtinctionPoint[] = reportYears.map((y) => ({ year: y, probability: probability[y]!, lower: lower[y]!, upper: upper[y]!, count: cumCount[y]! }));
  let medianTime: number | null = null;
  let medianTimeReason: string | null = null;
  const idx = probability.findIndex((q) => q >= 0.5);
  if (idx >= 0) medianTime = idx;
  else {
    medianTimeReason = `Fewer than half of the replicates (${fmtPercent(cumulative / R)}) went quasi-extinct within the ${T}-year horizon, so the median time to quasi-extinction is beyond the horizon.`;
    nullReasons["quasiExtinction.medianTime"] = medianTimeReason;
  }
  const earliest = upper.findIndex((q) => q >= 0.5);
  const latest = lower.findIndex((q) => q >= 0.5);

  // Abundance by year.
  let byYear: Moments[] = Array.from({ length: T + 1 }, () => ({ count: 0, mean: 0, m2: 0 }));
  for (const c of partials) {
    byYear = byYear.map((m, t) => mergeMoments(m, { count: c.replicateCount, mean: c.abundanceMean[t]!, m2: c.abundanceM2[t]! }));
  }
  const abundance = {
    mean: byYear.map((m) => m.mean),
    sd: byYear.map((m) => (m.count > 1 ? Math.sqrt(Math.max(0, m.m2) / (m.count - 1)) : 0)),
  };

  // Final abundance.
  let fm: Moments = { count: 0, mean: 0, m2: 0 };
  let fMin = Infinity;
  let fMax = -Infinity;
  let zero = 0;
  let below = 0;
  let above = 0;
  const bins = new Float64Array(FINE_BINS);
  for (const c of partials) {
    fm = mergeMoments(fm, c.final);
    fMin = Math.min(fMin, c.final.min);
    fMax = Math.max(fMax, c.final.max);
    zero += c.final.zero;
    below += c.final.below;
    above += c.final.above;
    for (const [k, n] of c.final.bins) bins[k] = bins[k]! + n;
  }
  const quantiles = FINAL_QUANTILES.map((q) => finalQuantile(q, R, zero, below, above, bins, fMin, fMax));
  const histogram = displayHistogram(bins, below, above);

  // Growth rate.
  let gm: Moments = { count: 0, mean: 0, m2: 0 };
  let zeroReplicates = 0;
  for (const c of partials) {
    gm = mergeMoments(gm, c.growth);
    zeroReplicates += c.growth.zeroReplicates;
  }
  const years = T - burnIn;
  let simulated: StochasticResult["growthRate"]["simulated"] = null;
  if (years < 1) nullReasons["growthRate.simulated"] = `The ${T}-year horizon leaves no years after the ${burnIn}-year burn-in.`;
  else if (zeroReplicates > 0) {
    nullReasons["growthRate.simulated"] = `The environment-only projection reached exactly 0 individuals in ${zeroReplicates} replicate(s): log λs is −∞ there (every matrix sequence can wipe the population out), so no finite estimate exists.`;
  } else if (gm.count > 0) {
    const sd = gm.count > 1 ? Math.sqrt(Math.max(0, gm.m2) / (gm.count - 1)) : 0;
    const se = sd / Math.sqrt(gm.count);
    simulated = {
      logLambdaS: gm.mean,
      lower: gm.mean - Z95 * se,
      upper: gm.mean + Z95 * se,
      lambdaS: Math.exp(gm.mean),
      standardError: se,
      replicatesUsed: gm.count,
      burnIn,
      yearsPerReplicate: years,
    };
    if (gm.count < 2) nullReasons["growthRate.simulated.standardError"] = "One replicate gives no spread, so the interval has zero width.";
  }
  if (!Number.isFinite(fm.mean) || !Number.isFinite(fm.m2) || abundance.mean.some((m) => !Number.isFinite(m))) {
    nullReasons["finalAbundance.mean"] =
      "Some replicates grew beyond 1.8e308 individuals, past floating-point range: means and SDs of abundance are infinite (they read as null in JSON). Quantiles, quasi-extinction and log λs are unaffected.";
  }
  const approx = partials[0]!.approximation;
  const approximation = approx?.value ?? null;
  if (approximation === null) nullReasons["growthRate.approximation"] = approx?.reason ?? "Chunk 0 did not compute the approximation.";

  return {
    units: {
      time: "years = projection intervals of the matrices; year 0 is the initial population",
      abundance: "individuals, in the units of the initial vector",
      growthRate: "log λs per projection interval (natural logarithm); λs per interval",
    },
    horizon: T,
    replicates: R,
    chunks: partials.length,
    complete,
    threshold: {
      value: settings.threshold.value,
      stages: settings.threshold.stages == null ? null : [...settings.threshold.stages],
      rule: `quasi-extinct when the ${settings.threshold.stages == null ? "total abundance" : "abundance of the chosen stages"} is at or below ${settings.threshold.value}; first passage counts, later recovery does not undo it`,
    },
    quasiExtinction: {
      byYear: { year, probability, lower, upper },
      table,
      share: cumulative / R,
      count: cumulative,
      shareBelowAtHorizon: belowAtHorizon / R,
      medianTime,
      medianTimeReason,
      medianTimeBand: { earliest: earliest >= 0 ? earliest : null, latest: latest >= 0 ? latest : null },
      meanTimeAmongExtinct: cumulative > 0 ? weightedYears / cumulative : null,
    },
    finalAbundance: {
      mean: fm.mean,
      sd: fm.count > 1 ? Math.sqrt(Math.max(0, fm.m2) / (fm.count - 1)) : 0,
      min: fMin,
      max: fMax,
      zeroCount: zero,
      quantiles,
      histogram,
    },
    abundance,
    growthRate: {
      simulated,
      approximation,
      method: `Simulation: each replicate's (1/(T−B)) log(‖A_{T−1}⋯A_B x_B‖₁/‖x_B‖₁) over years B = ${burnIn} to T = ${T} of the environment-only projection; replicates are independent batches, CI = mean ± 1.96 SE. Approximation: Tuljapurkar (1982) small-noise formula for independent years.`,
    },
    nullReasons,
  };
}

function fmtPercent(x: number): string {
  return `${(100 * x).toFixed(1)} %`;
}

/** Quantile of final abundance: zeros, then the open range below 10^MIN, the fine bins (geometric interpolation), the open range above. */
function finalQuantile(
  q: number,
  R: number,
  zero: number,
  below: number,
  above: number,
  bins: Float64Array,
  min: number,
  max: number,
): { p: number; value: number; censored: "below" | "above" | null } {
  const target = q * R;
  const clamp = (v: number) => Math.min(max, Math.max(min, v));
  if (target <= zero && zero > 0) return { p: q, value: 0, censored: null };
  let cum = zero;
  // Every replicate equal (and representable): that value is exact.
  const single = min === max && min > 0 && Number.isFinite(min);
  if (below > 0 && target <= cum + below) return single ? { p: q, value: min, censored: null } : { p: q, value: 10 ** FINAL_LOG10_MIN, censored: "below" };
  cum += below;
  for (let k = 0; k < FINE_BINS; k++) {
    const c = bins[k]!;
    if (c === 0) continue;
    if (target <= cum + c) {
      const frac = Math.max(0, Math.min(1, (target - cum) / c));
      const logValue = FINAL_LOG10_MIN + (k + frac) / FINAL_BINS_PER_DECADE;
      return { p: q, value: clamp(10 ** logValue), censored: null };
    }
    cum += c;
  }
  if (above > 0) return single ? { p: q, value: max, censored: null } : { p: q, value: 10 ** FINAL_LOG10_MAX, censored: "above" };
  return { p: q, value: max, censored: null };
}

/** Regroup the fine bins into at most DISPLAY_BINS log-spaced bars spanning the occupied range. */
function displayHistogram(bins: Float64Array, below: number, above: number): StochasticResult["finalAbundance"]["histogram"] {
  let lo = -1;
  let hi = -1;
  for (let k = 0; k < FINE_BINS; k++) {
    if (bins[k]! > 0) {
      if (lo < 0) lo = k;
      hi = k;
    }
  }
  if (lo < 0) return { edges: [], counts: [], belowRange: below, aboveRange: above };
  const span = hi - lo + 1;
  const width = Math.max(1, Math.ceil(span / DISPLAY_BINS));
  const edges: number[] = [];
  const counts: number[] = [];
  for (let k = lo; k <= hi; k += width) {
    edges.push(binLower(k));
    let c = 0;
    for (let m = k; m < Math.min(k + width, FINE_BINS); m++) c += bins[m]!;
    counts.push(c);
  }
  edges.push(binLower(lo + counts.length * width));
  return { edges, counts, belowRange: below, aboveRange: above };
}
