import { randomInt } from "node:crypto";
import { and, eq, isNull } from "drizzle-orm";
import { ZodError } from "zod";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import { UncertaintySettingsSchema, type UncertaintyRunResult, type UncertaintySettings } from "../../shared/schemas/uncertainty";
import { mergeMonteCarlo, monteCarloChunk, monteCarloSetup, UncertaintyModelError, type MonteCarloPartial } from "../../shared/uncertainty";
import type { Db } from "../db/client";
import { lifeCycles } from "../db/schema";
import { HttpError, zodFields } from "../http/errors";
import type { RunKind } from "./kinds";

/** Everything a Monte Carlo uncertainty run needs, frozen when it starts. */
export interface UncertaintyInput {
  settings: UncertaintySettings & { seed: number };
  document: LifeCycle;
  lifeCycleVersion: number;
  /** Draws of each chunk, in chunk order. */
  chunkDraws: number[];
}

/**
 * Draws per chunk: about half a second of work each on one core (a draw
 * costs a few n³/3 LU factorisations plus formulas), so a killed worker loses
 * little and the 20 s job expiry is far away.
 */
export function drawsPerChunk(stages: number): number {
  const n = Math.max(1, stages);
  return Math.max(50, Math.min(5_000, Math.floor(5e8 / (n * n * n + 2_000 * n))));
}

const bad = (message: string, fields: { path: string; message: string }[]) => new HttpError(400, message, "bad_request", fields);

export const uncertaintyRun: RunKind<UncertaintyInput, MonteCarloPartial, UncertaintyRunResult> = {
  async prepare(db: Db, target, raw) {
    let settings: UncertaintySettings;
    try {
      settings = UncertaintySettingsSchema.parse(raw ?? {});
    } catch (err) {
      if (err instanceof ZodError) {
        const fields = zodFields(err).map((f) => ({ ...f, path: `settings.${f.path}` }));
        throw bad(`${fields[0]!.path}: ${fields[0]!.message}`, fields);
      }
      throw err;
    }
    if (!target.lifeCycleId) throw new HttpError(400, "An uncertainty run works on a life cycle.");
    const [row] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.id, target.lifeCycleId), isNull(lifeCycles.deletedAt)));
    if (!row) throw new HttpError(404, "No such life cycle.");
    const document = upgradeLifeCycle(row.document);
    try {
      monteCarloSetup(document); // every check of the rates' uncertainty, before anything is queued
    } catch (err) {
      if (err instanceof UncertaintyModelError) {
        const fields = err.issues.map((i) => ({ path: `lifeCycle.${i.path.join(".")}`, message: i.message }));
        throw bad(`The life cycle's uncertainty cannot be used: ${fields[0]!.message}`, fields);
      }
      throw err;
    }
    const seed = settings.seed ?? randomInt(0, 2 ** 31);
    const per = drawsPerChunk(document.stages.length);
    const chunkDraws: number[] = [];
    for (let left = settings.draws; left > 0; left -= per) chunkDraws.push(Math.min(per, left));
    const input: UncertaintyInput = { settings: { ...settings, seed }, document, lifeCycleVersion: row.version, chunkDraws };
    return { input, settings: input.settings, chunks: chunkDraws.length };
  },

  runChunk(input, chunkIndex) {
    const count = input.chunkDraws[chunkIndex];
    if (count === undefined) throw new Error(`Chunk ${chunkIndex} is not in the run's plan.`);
    return monteCarloChunk(monteCarloSetup(input.document), input.settings.seed, chunkIndex, count);
  },

  merge(input, partials) {
    const result = mergeMonteCarlo(monteCarloSetup(input.document), input.settings.seed, partials);
    return { ...result, timeStepUnit: input.document.timeStepUnit, lifeCycleVersion: input.lifeCycleVersion };
  },
};
