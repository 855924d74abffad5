// Public surface of Stagewright's field-data estimators: census counts and
// stage-fate records in, plain JSON-serialisable estimates out, no I/O.
export { wilson, clopperPearson, binomialInterval, studentTTwoSided, chiSquareQuantile, type Interval, type BinomialMethod } from "./intervals";
export { normalQuantile } from "../stats/normal";
export {
  analyzeCounts,
  quasiExtinctionProbability,
  quasiExtinctionCurve,
  logNormalCdf,
  percentile,
  DEFAULT_MAX_HORIZON,
  DEFAULT_COUNT_BOOTSTRAP,
  DEFAULT_COUNT_SEED,
  type CountPoint,
  type CountInterval,
  type CountsAnalysis,
  type CountsNote,
  type CountsOptions,
  type QuasiExtinctionCurve,
} from "./counts";
export {
  estimateStageFates,
  tallyFates,
  fillMatrix,
  lambdaOf,
  FATE_DEAD,
  FATE_UNKNOWN,
  type FateSample,
  type CensusTiming,
  type EstimateOptions,
  type StageFateEstimate,
  type TransitionEstimate,
  type FecundityEstimate,
  type FertilityEstimate,
  type StageFateNote,
  type FateTallies,
} from "./estimate";
export { bootstrapLambdas, groupByStage, summarizeBootstrap, MIN_BOOTSTRAP_RESAMPLES, MAX_BOOTSTRAP_RESAMPLES, type BootstrapSettings, type BootstrapSummary, type StageGroups } from "./bootstrap";
export {
  sniffDelimiter,
  sniffDecimalComma,
  parseNumber,
  parseCensusTime,
  resolveColumns,
  wrongDelimiterProblem,
  delimiterName,
  CountsChecker,
  FatesChecker,
  DELIMITER_CANDIDATES,
  type RecordProblem,
  type CountsColumns,
  type FateColumns,
} from "./records";
export { lifeCycleFromEstimate, type LifeCycleSource } from "./life-cycle";
