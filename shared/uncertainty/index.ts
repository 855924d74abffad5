/**
 * Uncertainty of the results from the vital rates' uncertainty: each rate's
 * law (laws.ts), the delta method (delta.ts), Monte Carlo draws in chunks
 * (monte-carlo.ts) and the rank stability of levers (rank-stability.ts).
 * Pure code, no I/O.
 */
export {
  uncertaintyModel,
  rateUncertainty,
  blockingIssues,
  inferredScale,
  type RateScale,
  type UncertainRateFields,
  type UncertaintyDocument,
  type SamplingLaw,
  type UncertaintySource,
  type RateUncertainty,
  type UncertaintyIssue,
  type UncertaintyModel,
} from "./laws";
export { normalQuantile } from "../stats/normal";
export { drawEvaluator, ratesUsedByFormulas, type DrawEvaluator, type DrawResult } from "./evaluate";
export { deltaMethod, lifeCycleDeltaMethod, DELTA_LEVEL, type DeltaEstimate, type DeltaContribution, type DeltaMethodResult, type DeltaInput } from "./delta";
export {
  monteCarloSetup,
  monteCarloChunk,
  rateSampler,
  mergeMonteCarlo,
  UncertaintyModelError,
  MONTE_CARLO_LEVEL,
  LAMBDA_HISTOGRAM_BINS,
  type MonteCarloSetup,
  type MonteCarloPartial,
  type MonteCarloResult,
  type LambdaHistogram,
} from "./monte-carlo";
export { rankStability, rankStabilityLookup, recordRanks, emptyRankCounts, mergeRankCounts, type RankCounts, type LeverStability, type RankStabilitySource } from "./rank-stability";
export { summarizeDraws, summarizeHistogram, histogramQuantile, addToHistogram, emptyHistogram, mergeHistograms, LOG_BINS_PER_DECADE, type ItemHistogram, type ItemSummary } from "./summaries";
