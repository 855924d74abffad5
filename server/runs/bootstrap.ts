import { randomInt } from "node:crypto";
import { ZodError } from "zod";
import { bootstrapLambdas, estimateStageFates, groupByStage, summarizeBootstrap, type FateSample } from "../../shared/fielddata";
import { BootstrapSettingsSchema, type BootstrapRunResult, type BootstrapRunSettings } from "../../shared/schemas/field-data";
import type { Db } from "../db/client";
import { HttpError, zodFields } from "../http/errors";
import { getDataset, loadFateSample } from "../services/field-data";
import type { RunKind } from "./kinds";

/** Resamples per chunk: well under a second for a few thousand records. */
export const RESAMPLES_PER_CHUNK = 250;

/** Everything a bootstrap run needs, frozen when it starts: the records themselves, not a reference to them. */
export interface BootstrapInput {
  datasetId: string;
  datasetName: string;
  settings: BootstrapRunSettings;
  seed: number;
  stages: string[];
  stage: number[];
  fate: number[];
  /** null where no offspring were recorded. */
  offspring: (number | null)[];
  lambda: number;
}

const badSettings = (fields: { path: string; message: string }[]) =>
  new HttpError(400, `settings.${fields[0]!.path}: ${fields[0]!.message}`, "bad_request", fields.map((f) => ({ ...f, path: `settings.${f.path}` })));

function sampleOf(input: BootstrapInput): FateSample {
  return {
    stages: input.stages,
    stage: Int32Array.from(input.stage),
    fate: Int32Array.from(input.fate),
    offspring: Float64Array.from(input.offspring, (o) => (o === null ? NaN : o)),
  };
}

const estimateOptions = (s: BootstrapRunSettings) => ({ census: s.analysis.census, offspringSurvival: s.analysis.offspringSurvival, method: s.analysis.method });

export const bootstrapRun: RunKind<BootstrapInput, number[], BootstrapRunResult> = {
  async prepare(db: Db, target, raw) {
    if (!target.datasetId) throw new HttpError(400, "A bootstrap run works on a stage-fate dataset: start it from the dataset's page in Field data.");
    let settings: BootstrapRunSettings;
    try {
      settings = BootstrapSettingsSchema.parse(raw ?? {});
    } catch (err) {
      if (err instanceof ZodError) throw badSettings(zodFields(err));
      throw err;
    }
    const dataset = await getDataset(db, target.datasetId);
    const { sample } = await loadFateSample(db, target.datasetId, { site: settings.analysis.site, year: settings.analysis.year });
    if (sample.stage.length === 0) throw badSettings([{ path: "analysis", message: "No records match this site and year." }]);
    const estimate = estimateStageFates(sample, estimateOptions(settings));
    if (estimate.lambda === null) throw badSettings([{ path: "analysis", message: "λ cannot be estimated from these records." }]);
    const seed = settings.seed ?? randomInt(0, 2 ** 31);
    const input: BootstrapInput = {
      datasetId: target.datasetId,
      datasetName: dataset.name,
      settings: { ...settings, seed },
      seed,
      stages: [...sample.stages],
      stage: Array.from(sample.stage),
      fate: Array.from(sample.fate),
      offspring: Array.from(sample.offspring, (o) => (Number.isNaN(o) ? null : o)),
      lambda: estimate.lambda,
    };
    return { input, settings: input.settings, chunks: Math.ceil(settings.resamples / RESAMPLES_PER_CHUNK) };
  },

  runChunk(input, chunkIndex) {
    const count = Math.min(RESAMPLES_PER_CHUNK, input.settings.resamples - chunkIndex * RESAMPLES_PER_CHUNK);
    if (count <= 0) throw new Error(`Chunk ${chunkIndex} is not in the run's plan.`);
    const s = input.settings.analysis;
    const lambdas = bootstrapLambdas(groupByStage(sampleOf(input)), { census: s.census, offspringSurvival: s.census === "pre-breeding" ? s.offspringSurvival : 1, newbornStage: 0 }, { seed: input.seed, stream: chunkIndex, count });
    return Array.from(lambdas);
  },

  merge(input, partials) {
    const all = partials.flat();
    const summary = summarizeBootstrap(all, input.lambda);
    const recordsPerStage = input.stages.map((_, j) => input.stage.filter((s) => s === j).length);
    return { ...summary, datasetId: input.datasetId, datasetName: input.datasetName, stages: input.stages, recordsPerStage, settings: input.settings.analysis, seed: input.seed };
  },
};
