// Public surface of Stagewright's numeric core: plain arrays in, plain
// JSON-serialisable objects out, no I/O. Conventions (METHODS.md §0): a_ij is
// the rate from stage j (column, time t) to stage i (row, time t+1); A = U + F.
export { analyzeMatrix, DEFAULT_PROJECTION_STEPS, type AnalyzeInput, type MatrixAnalysis } from "./analyze";
export {
  dominantEigen,
  stableStageDistribution,
  reproductiveValues,
  secondEigenvalue,
  dampingRatio,
  dampingFromEigenvalues,
  oscillationPeriod,
  convergenceTime,
  type DominantEigen,
  type DominantEigenOptions,
  type EigenMethod,
  type SecondEigenvalue,
} from "./eigen";
export { sensitivities, elasticities, structuralZeros, sensitivityAnalysis, type SensitivityAnalysis } from "./sensitivity";
export {
  diagnoseMatrix,
  isSound,
  type Diagnostic,
  type DiagnosticCode,
  type Severity,
  type StructureReport,
  type BlockReport,
} from "./diagnostics";
export { lifeHistory, type LifeHistory, type LifeHistoryOutcome } from "./life-history";
export { project, transientIndices, DEFAULT_TRANSIENT_HORIZON, type Projection, type TransientIndices } from "./projection";
export { MatrixInputError, MAX_STAGES, MAX_PROJECTION_STEPS } from "./input";
export { Random, createRandom, logFactorial, MAX_SEED } from "./random";
export { choleskyLower, CHOLESKY_PIVOT_TOLERANCE, type CholeskyResult } from "./cholesky";
export {
  simulateChunk,
  mergeChunks,
  growthRateApproximation,
  defaultBurnIn,
  SimulationError,
  FINAL_BINS_PER_DECADE,
  FINAL_LOG10_MIN,
  FINAL_LOG10_MAX,
  FINAL_QUANTILES,
  DISPLAY_BINS,
  DEFAULT_MOMENT_SAMPLES,
  MOMENT_STREAM,
  MAX_DEMOGRAPHIC_COUNT,
  type StochasticModel,
  type EnvironmentMatrices,
  type SampledMatrices,
  type MatrixSampler,
  type MatrixRows,
  type SimulationSettings,
  type ChunkSpec,
  type SimulationTuning,
  type ChunkResult,
  type FinalSummary,
  type Moments,
  type GrowthApproximation,
  type ExtinctionPoint,
  type StochasticResult,
} from "./stochastic";
export { wilsonInterval, Z95 } from "../stats/normal";
export { exactLambda, exactChange, boundedTarget, rankByMagnitude, type ParameterBounds, type MatrixAt, type Baseline, type ExactChange } from "./levers";
export { breakEvenValues, type BreakEven, type BreakEvenOptions, type Crossing, type LambdaAt } from "./break-even";
export { ltreContributions, midpointSensitivities, LtreError, type LtreResult } from "./ltre";
