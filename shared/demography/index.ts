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
