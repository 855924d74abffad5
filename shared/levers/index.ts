/**
 * Levers: management scenarios, lever ranking, break-even values and LTRE.
 * Connects life-cycle documents (shared/lifecycle, scenarios in
 * shared/lifecycle/scenarios.ts) to the numeric core's exact-λ levers,
 * break-even search and fixed-design LTRE (shared/demography).
 */
export { leverModel, LeverError, entryKey, type LeverModel, type Lever, type RateLever, type EntryLever } from "./model";
export { rankLevers, DEFAULT_RELATIVE_CHANGE, type LeverRanking, type LeverRow, type LeverStep, type AchievableStep } from "./ranking";
export { applyScenario, type ApplyOptions } from "./apply";
export { compareScenarios, type ScenarioComparison, type ScenarioComparisonRow, type ScenarioOutcome } from "./compare";
export { breakEvenTable, type BreakEvenRow, type BreakEvenTable } from "./break-even";
export { lifeCycleLtre, type LifeCycleLtre, type RateContribution } from "./ltre";
