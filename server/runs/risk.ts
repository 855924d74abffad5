import { randomInt } from "node:crypto";
import { and, eq, inArray, isNull } from "drizzle-orm";
import { ZodError } from "zod";
import { mergeChunks, simulateChunk, type ChunkResult } from "../../shared/demography";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
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

export const riskRun: RunKind<RiskInput, ChunkResult, RiskRunResult> = {
  async prepare(db: Db, target, raw) {
    let settings: RiskSettings;
    try {
      settings = RiskSettingsSchema.parse(raw);
    } catch (err) {
      if (err instanceof ZodError) throw badSettings(zodFields(err));
      throw err;
    }
    const [row] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.id, target.lifeCycleId), isNull(lifeCycles.deletedAt)));
    if (!row) throw new HttpError(404, "No such life cycle.");
    const document = upgradeLifeCycle(row.document);
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
    const input: RiskInput = { settings: { ...settings, seed }, seed, document, environments, plan: { chunks: [], version: 0, workUnits: 0, estimatedSeconds: 0, estimatedSecondsPerChunk: 0 } };
    try {
      model(input); // every check that needs the documents, before anything is queued
    } catch (err) {
      if (err instanceof RiskModelError) throw badSettings(err.fields);
      throw err;
    }
    input.plan = planChunks(settings, document.stages.length, { transitionCount: document.transitions.length });
    return { input, settings: input.settings, chunks: input.plan.chunks.length };
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
