/**
 * Risk: stochastic viability of a life cycle. Connects life-cycle documents
 * and Risk settings (shared/schemas/risk.ts) to the numeric core's chunked
 * simulation (shared/demography/stochastic.ts).
 *
 * A Run, end to end:
 * 1. `RiskSettingsSchema.parse(body)`; pick and store a seed when absent.
 * 2. `planChunks(settings, stageCount)`: store the plan with the Run.
 * 3. Per chunk (any worker, any order): `buildRiskModel(doc, settings, docs)`,
 *    then `simulateChunk(model, simulation, { seed, ...chunk })`; store the
 *    JSON partial.
 * 4. `mergeChunks(simulation, partials in chunk order)`, then
 *    `iucnCriterionE(result, generationLength)`.
 */
export { buildRiskModel, RiskModelError, type RiskModel } from "./model";
export { iucnCriterionE, yearsPerTimeStep, CRITERION_E, CRITERION_E_MAX_YEARS, CRITERION_E_CAUTION, type CriterionECategory, type CriterionECheck, type CriterionEAssessment } from "./iucn";
export {
  planChunks,
  secondsPerReplicateYear,
  PLAN_VERSION,
  TARGET_CHUNK_SECONDS,
  MAX_CHUNKS,
  NS_PER_WORK_UNIT,
  NS_PER_YEAR,
  NS_GENERAL_YEAR,
  NS_PER_GENERAL_UNIT,
  NS_PER_DEMOGRAPHIC_STAGE,
  NS_PER_DRAWN_RATE,
  NS_PER_ARROW,
  DEFAULT_ARROWS_PER_STAGE,
  type ChunkPlan,
  type PlannedChunk,
} from "./plan";
export { rateLaw, drawRate, normalScoreMap, quantileOfNormalScore, NormalScoreQuantile, type RateLaw, type RateDistribution } from "./distributions";
export { normalCdf, normalDensity } from "../stats/normal";
