import { randomInt } from "node:crypto";
import { and, eq, isNull } from "drizzle-orm";
import { ZodError } from "zod";
import { projectTrajectory, simulateTrajectoryReplicates, summariseReplicates, thermalModel, trajectoryTemperatures, type ReplicateChunk } from "../../shared/climate";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import { WarmingSettingsSchema, type WarmingRunResult, type WarmingSettings } from "../../shared/schemas/climate";
import type { Db } from "../db/client";
import { lifeCycles } from "../db/schema";
import { HttpError, zodFields } from "../http/errors";
import { thermalModelOrBadRequest } from "../services/climate";
import type { RunKind } from "./kinds";

/** Everything a warming run needs, frozen when it starts. */
export interface WarmingInput {
  settings: WarmingSettings;
  seed: number;
  document: LifeCycle;
  /** Replicates per chunk, in chunk order. */
  chunkSizes: number[];
}

/**
 * Work per chunk in units of years × stages² (one dense eigen-solve of a
 * small matrix costs a few hundred of these): about 0.5 s on the 2-core
 * reference machine (bench/climate.ts).
 */
const WORK_PER_CHUNK = 1.5e6;

const badSettings = (fields: { path: string; message: string }[]) =>
  new HttpError(400, `settings.${fields[0]!.path}: ${fields[0]!.message}`, "bad_request", fields.map((f) => ({ ...f, path: `settings.${f.path}` })));

function sdOf(settings: WarmingSettings): number {
  return settings.trajectory.sd ?? 0;
}

/** Replicates split into chunks of roughly equal work. */
export function warmingChunks(replicates: number, years: number, stages: number): number[] {
  const perReplicate = years * Math.max(16, stages * stages + 200);
  const per = Math.max(1, Math.floor(WORK_PER_CHUNK / perReplicate));
  const sizes: number[] = [];
  for (let left = replicates; left > 0; left -= per) sizes.push(Math.min(per, left));
  return sizes;
}

/** Stochastic replicates of a warming trajectory: year-to-year temperature deviations around its mean. */
export const warmingRun: RunKind<WarmingInput, ReplicateChunk, WarmingRunResult> = {
  async prepare(db: Db, target, raw) {
    let settings: WarmingSettings;
    try {
      settings = WarmingSettingsSchema.parse(raw);
    } catch (err) {
      if (err instanceof ZodError) throw badSettings(zodFields(err));
      throw err;
    }
    if (!target.lifeCycleId) throw new HttpError(400, "A warming run works on a life cycle.");
    const [row] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.id, target.lifeCycleId), isNull(lifeCycles.deletedAt)));
    if (!row) throw new HttpError(404, "No such life cycle.");
    const document = upgradeLifeCycle(row.document);
    thermalModelOrBadRequest(document, "life cycle");
    if (!document.rates.some((r) => r.thermal)) {
      throw badSettings([{ path: "trajectory", message: "No vital rate of this life cycle has a thermal response, so temperature changes nothing: attach one on the Climate tab first." }]);
    }
    const seed = settings.seed ?? randomInt(0, 2 ** 31);
    const years = trajectoryTemperatures(settings.trajectory).years.length;
    const chunkSizes = warmingChunks(settings.replicates, years, document.stages.length);
    const input: WarmingInput = { settings: { ...settings, seed }, seed, document, chunkSizes };
    return { input, settings: input.settings, chunks: chunkSizes.length };
  },

  runChunk(input, chunkIndex) {
    const count = input.chunkSizes[chunkIndex];
    if (count === undefined) throw new Error(`Chunk ${chunkIndex} is not in the run's plan.`);
    const model = thermalModel(input.document);
    const { temperatures } = trajectoryTemperatures(input.settings.trajectory);
    return simulateTrajectoryReplicates(model, temperatures, sdOf(input.settings), input.settings.initialTotal, count, input.seed, chunkIndex);
  },

  merge(input, partials) {
    const model = thermalModel(input.document);
    const { years, temperatures } = trajectoryTemperatures(input.settings.trajectory);
    const threshold = input.settings.threshold ?? null;
    return {
      ...summariseReplicates(partials, years.length, threshold),
      years,
      meanTemperatures: temperatures,
      sd: sdOf(input.settings),
      seed: input.seed,
      threshold,
      timeStepUnit: input.document.timeStepUnit,
      deterministic: projectTrajectory(model, years, temperatures, input.settings.initialTotal),
    };
  },
};
