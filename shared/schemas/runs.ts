import { z } from "zod";
import type { StochasticResult } from "../demography";
import type { CriterionEAssessment } from "../risk";

export const RUN_KINDS = ["risk", "uncertainty", "bootstrap", "warming"] as const;
export const RunKindSchema = z.enum(RUN_KINDS, { error: `The run kind is one of: ${RUN_KINDS.join(", ")}.` });
export type RunKindName = z.infer<typeof RunKindSchema>;

/** Start a run on a life cycle; `settings` is checked by the kind's own schema (e.g. RiskSettingsSchema). */
export const RunCreateSchema = z.strictObject({
  kind: RunKindSchema,
  settings: z.unknown(),
});
export type RunCreate = z.infer<typeof RunCreateSchema>;

export type RunStatus = "queued" | "running" | "succeeded" | "failed" | "cancelled";

export interface RunSummary {
  id: string;
  lifeCycleId: string | null;
  /** Runs on Field data (the λ bootstrap) name their dataset. */
  datasetId: string | null;
  kind: string;
  status: RunStatus;
  /** Share of chunks finished, 0–1. */
  progress: number;
  chunksDone: number;
  chunksTotal: number;
  settings: unknown;
  error: string | null;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export interface RunRecord<Result = unknown> extends RunSummary {
  result: Result | null;
}

/** What a finished Risk run holds. */
export interface RiskRunResult extends StochasticResult {
  stageIds: string[];
  stageNames: string[];
  timeStepUnit: string;
  seed: number;
  /** Mean age of parents of the mean matrix (projection intervals), used as the IUCN generation length. */
  generationLength: number | null;
  generationLengthReason: string | null;
  criterionE: CriterionEAssessment;
}
