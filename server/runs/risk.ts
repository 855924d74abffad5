import { randomInt } from "node:crypto";
import { and, eq, inArray, isNull } from "drizzle-orm";
import { ZodError } from "zod";
import { mergeChunks, simulateChunk, type ChunkResult } from "../../shared/demography";
import { applyScenario, LeverError } from "../../shared/levers";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import { applyOp } from "../../shared/lifecycle/scenarios";
import { buildRiskModel, iucnCriterionE, planChunks, RiskModelError, yearsPerTimeStep, type ChunkPlan } from "../../shared/risk";
import { RiskSettingsSchema, type RiskSettings } from "../../shared/schemas/risk";
import type { RiskRunResult } from "../../shared/schemas/runs";
import type { Db } from "../db/client";
import { lifeCycles } from "../db/schema";
import { HttpError, zodFields } from "../http/errors";
import type { RunKind } from "./kinds";

/** Everything a Risk run needs, frozen when it starts. */
export interface RiskInput {
  settings: RiskSettings;
  seed: number;
  document: LifeCycle;
  /** Life cycles used as environments, by id. */
  environments: Record<string, LifeCycle>;
  plan: ChunkPlan;
}

const badSettings = (fields: { path: string; message: string }[]) =>
  new HttpError(400, `settings.${fields[0]!.path}: ${fields[0]!.message}`, "bad_request", fields.map((f) => ({ ...f, path: `settings.${f.path}` })));

function model(input: RiskInput) {
  return buildRiskModel(input.document, input.settings, input.environments);
}

/**
 * A Run of a Levers scenario computes the life cycle with the scenario's
 * changes made. Drawn rates take their yearly mean from the settings, so a
 * scenario's change to such a rate is made to that mean too.
 */
function scenarioForRun(doc: LifeCycle, settings: RiskSettings): { document: LifeCycle; settings: RiskSettings } | null {
  if (settings.scenarioId === undefined) return null;
  const index = (doc.scenarios ?? []).findIndex((s) => s.id === settings.scenarioId);
  const scenario = doc.scenarios?.[index];
  if (!scenario) throw badSettings([{ path: "scenarioId", message: "The saved life cycle has no scenario with this id." }]);
  if (settings.environment.kind !== "vital-rates") {
    throw badSettings([{ path: "scenarioId", message: "A scenario run varies this life cycle's vital rates: choose the vital-rate environment." }]);
  }
  let document: LifeCycle;
  try {
    document = applyScenario(doc, scenario, { index });
  } catch (err) {
    if (err instanceof LeverError) throw badSettings([{ path: "scenarioId", message: err.message }]);
    throw err;
  }
  const rates = settings.environment.rates.map((r) => {
    let mean = r.mean;
    for (const c of scenario.changes) if (c.target.kind === "rate" && c.target.rateId === r.rateId) mean = applyOp(c.op, mean, c.value);
    return { ...r, mean };
  });
  return { document, settings: { ...settings, environment: { ...settings.environment, rates } } };
}

export const riskRun: RunKind<RiskInput, ChunkResult, RiskRunResult> = {
  async prepare(db: Db, target, raw) {
    let settings: RiskSettings;
    try {
      settings = RiskSettingsSchema.parse(raw);
    } catch (err) {
      if (err instanceof ZodError) throw badSettings(zodFields(err));
      throw err;
    }
    if (!target.lifeCycleId) throw new HttpError(400, "A Risk run works on a life cycle.");
    const [row] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.id, target.lifeCycleId), isNull(lifeCycles.deletedAt)));
    if (!row) throw new HttpError(404, "No such life cycle.");
    const saved = upgradeLifeCycle(row.document);
    const scenario = scenarioForRun(saved, settings);
    const document = scenario ? scenario.document : saved;
    const environments: Record<string, LifeCycle> = {};
    if (settings.environment.kind !== "vital-rates") {
      const ids = settings.environment.lifeCycleIds;
      const found = ids.length
        ? await db.select().from(lifeCycles).where(and(inArray(lifeCycles.id, ids.filter((id) => /^[0-9a-f-]{36}$/i.test(id))), eq(lifeCycles.studyId, target.studyId), isNull(lifeCycles.deletedAt)))
        : [];
      for (const [k, id] of ids.entries()) {
        const lc = found.find((f) => f.id === id);
        if (!lc) throw badSettings([{ path: `environment.lifeCycleIds.${k}`, message: "No life cycle with this id in the Study." }]);
        environments[id] = upgradeLifeCycle(lc.document);
      }
    }
    const seed = settings.seed ?? randomInt(0, 2 ** 31);
    // A scenario's run computes with the scenario's means; the Run keeps the settings as entered.
    const input: RiskInput = { settings: { ...(scenario ? scenario.settings : settings), seed }, seed, document, environments, plan: { chunks: [], version: 0, workUnits: 0, estimatedSeconds: 0, estimatedSecondsPerChunk: 0 } };
    try {
      model(input); // every check that needs the documents, before anything is queued
    } catch (err) {
      if (err instanceof RiskModelError) throw badSettings(err.fields);
      throw err;
    }
    input.plan = planChunks(settings, document.stages.length, { transitionCount: document.transitions.length });
    return { input, settings: { ...settings, seed }, chunks: input.plan.chunks.length };
  },

  runChunk(input, chunkIndex) {
    const chunk = input.plan.chunks[chunkIndex];
    if (!chunk) throw new Error(`Chunk ${chunkIndex} is not in the run's plan.`);
    const m = model(input);
    return simulateChunk(m.model, m.simulation, { seed: input.seed, ...chunk });
  },

  merge(input, partials) {
    const m = model(input);
    const result = mergeChunks(m.simulation, partials);
    return {
      ...result,
      stageIds: m.stageIds,
      stageNames: m.stageNames,
      timeStepUnit: m.timeStepUnit,
      seed: input.seed,
      generationLength: m.generationLength,
      generationLengthReason: m.generationLengthReason,
      criterionE: iucnCriterionE(result, m.generationLength, { yearsPerInterval: yearsPerTimeStep(input.document.timeStepUnit) ?? undefined }),
    };
  },
};
