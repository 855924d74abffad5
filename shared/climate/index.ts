// Public surface of Stagewright's Climate core: thermal responses of vital
// rates, λ(T) with its persistence window, fitting, warming trajectories.
// Pure code, no I/O (METHODS.md §3).
export { BOLTZMANN_EV, KELVIN_OFFSET, kelvin, responseValue, responseOptimum, responseSlope, q10 } from "./responses";
export { brentRoot, goldenMaximum, type BrentOptions, type Root } from "../demography/roots";
export {
  thermalModel,
  lambdaCurve,
  lambdaSlope,
  responseOptima,
  ThermalValueError,
  SlopeUndefinedError,
  EDGE_TOLERANCE,
  MAX_CURVE_POINTS,
  DEFAULT_CURVE_POINTS,
  type ThermalModel,
  type LambdaCurve,
  type LambdaCurveOptions,
  type LambdaSlope,
  type PersistenceInterval,
  type WindowEdge,
  type ClampedRate,
} from "./lambda";
export { fitThermalResponse, modelJacobian, FIT_PARAMETERS, MIN_EXTRA_POINTS, type FitOptions, type FitResult, type FitParameter } from "./fit";
export {
  trajectoryTemperatures,
  projectTrajectory,
  simulateTrajectoryReplicates,
  summariseReplicates,
  REPLICATE_QUANTILES,
  type TrajectoryProjection,
  type ReplicateChunk,
  type ReplicateSummary,
} from "./trajectory";
export { parseNumericPairs, MAX_CSV_ROWS, type PairsResult, type PairsIssue } from "./csv";
export { RESPONSE_DEFAULTS, defaultResponse, FORM_LABELS, FORM_FORMULAS, THERMAL_PARAMETERS, parameterValue, type DefaultBasis, type ThermalParameter } from "./defaults";
export { describeTrajectory } from "./describe";
