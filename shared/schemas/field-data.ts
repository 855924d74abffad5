/**
 * Field data payloads: uploads of census counts and stage-fate records, the
 * analyses' settings, and "start a life cycle from these estimates". Limits
 * are exported beside the schemas (the upload page states them).
 */
import { z } from "zod";
import type { BootstrapSummary, CountsAnalysis, StageFateEstimate } from "../fielddata";

export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;
export const MAX_UPLOAD_ROWS = 500_000;
export const MAX_DATASET_NAME_LENGTH = 120;
export const MAX_COLUMN_NAME_LENGTH = 200;
export const MAX_FATE_STAGES = 50;
/** Problems listed in a validation report (the total is always given). */
export const MAX_REPORTED_PROBLEMS = 200;
export const PREVIEW_ROWS = 10;

export const DATASET_KINDS = ["counts", "stage-fates"] as const;
export const DatasetKindSchema = z.enum(DATASET_KINDS, { error: 'The kind is "counts" or "stage-fates".' });
export type DatasetKind = z.infer<typeof DatasetKindSchema>;

export const DELIMITERS = [",", ";", "\t", "|"] as const;
export const DelimiterSchema = z.enum(["auto", ...DELIMITERS], { error: 'The delimiter is "auto", ",", ";", a tab or "|".' });
export type Delimiter = z.infer<typeof DelimiterSchema>;

const Column = z.string().trim().min(1, "Choose a column.").max(MAX_COLUMN_NAME_LENGTH);

export const CountsMappingSchema = z.strictObject({
  time: Column,
  count: Column,
  site: Column.optional(),
  /** Optional per-stage count columns: stage name → column. */
  stages: z
    .array(z.strictObject({ stage: z.string().trim().min(1, "Name the stage.").max(MAX_COLUMN_NAME_LENGTH), column: Column }))
    .max(MAX_FATE_STAGES)
    .optional(),
});
export type CountsMapping = z.infer<typeof CountsMappingSchema>;

export const FatesMappingSchema = z.strictObject({
  individual: Column,
  year: Column,
  stage: Column,
  fate: Column,
  offspring: Column.optional(),
  site: Column.optional(),
});
export type FatesMapping = z.infer<typeof FatesMappingSchema>;

export const ParseOptionsSchema = z.strictObject({
  delimiter: DelimiterSchema.default("auto"),
  /** "1,5" means 1.5; "auto" decides from the delimiter and the numbers seen. */
  decimalComma: z.union([z.boolean(), z.literal("auto")]).default("auto"),
});
export type ParseOptions = z.infer<typeof ParseOptionsSchema>;

/** The text fields sent with the file (multipart); `mapping` and `options` arrive as JSON text. */
export const UploadSchema = z.discriminatedUnion("kind", [
  z.strictObject({
    kind: z.literal("counts"),
    name: z.string().trim().min(1, "Name the dataset.").max(MAX_DATASET_NAME_LENGTH),
    mapping: CountsMappingSchema,
    options: ParseOptionsSchema.default({ delimiter: "auto", decimalComma: "auto" }),
  }),
  z.strictObject({
    kind: z.literal("stage-fates"),
    name: z.string().trim().min(1, "Name the dataset.").max(MAX_DATASET_NAME_LENGTH),
    mapping: FatesMappingSchema,
    options: ParseOptionsSchema.extend({
      /** The word that marks a death in the fate column (case is ignored). */
      deadValue: z.string().trim().min(1).max(40).default("dead"),
      /** Stage names in life-cycle order; the stage column may use no others. Taken from the data when absent. */
      stages: z.array(z.string().trim().min(1).max(MAX_COLUMN_NAME_LENGTH)).min(1).max(MAX_FATE_STAGES).optional(),
    }).default({ delimiter: "auto", decimalComma: "auto", deadValue: "dead" }),
  }),
]);
export type UploadRequest = z.infer<typeof UploadSchema>;

export const PreviewSchema = z.strictObject({ options: ParseOptionsSchema.default({ delimiter: "auto", decimalComma: "auto" }) });

export const DatasetRenameSchema = z.strictObject({ name: z.string().trim().min(1, "Name the dataset.").max(MAX_DATASET_NAME_LENGTH) });
export type DatasetRename = z.infer<typeof DatasetRenameSchema>;

export const CountsAnalysisQuerySchema = z.strictObject({
  threshold: z.coerce.number({ error: "The threshold is a number." }).positive("The threshold is a count above zero.").optional(),
  maxHorizon: z.coerce.number().int("The horizon is a whole number.").min(1, "The horizon is at least 1.").max(200, "The horizon is at most 200.").default(50),
  site: z.string().max(MAX_COLUMN_NAME_LENGTH).optional(),
});
export type CountsAnalysisQuery = z.infer<typeof CountsAnalysisQuerySchema>;

export const CENSUS_CHOICES = ["pre-breeding", "post-breeding"] as const;
export const FateAnalysisSettingsSchema = z.strictObject({
  census: z.enum(CENSUS_CHOICES, { error: 'The census is "pre-breeding" or "post-breeding".' }).default("pre-breeding"),
  /** Pre-breeding census: survival of offspring from birth to their first census (1 when offspring are counted as recruits). */
  offspringSurvival: z.coerce.number({ error: "Offspring survival is a number." }).min(0, "Offspring survival is between 0 and 1.").max(1, "Offspring survival is between 0 and 1.").default(1),
  method: z.enum(["wilson", "clopper-pearson"], { error: 'The interval is "wilson" or "clopper-pearson".' }).default("wilson"),
  /** Limit to one site / one year (t → t+1); all records pooled when absent. */
  site: z.string().max(MAX_COLUMN_NAME_LENGTH).optional(),
  year: z.coerce.number().int().optional(),
});
export type FateAnalysisSettings = z.infer<typeof FateAnalysisSettingsSchema>;

export const StartLifeCycleSchema = z.strictObject({
  name: z.string().trim().min(1, "Name the life cycle.").max(200),
  settings: FateAnalysisSettingsSchema.default({ census: "pre-breeding", offspringSurvival: 1, method: "wilson" }),
});
export type StartLifeCycle = z.input<typeof StartLifeCycleSchema>;

export const BootstrapSettingsSchema = z.strictObject({
  analysis: FateAnalysisSettingsSchema.default({ census: "pre-breeding", offspringSurvival: 1, method: "wilson" }),
  resamples: z.number({ error: "The number of resamples is a whole number." }).int("The number of resamples is a whole number.").min(2000, "Use at least 2,000 resamples.").max(100_000, "At most 100,000 resamples.").default(2000),
  seed: z.number().int().min(0).max(2 ** 31 - 1).optional(),
});
export type BootstrapRunSettings = z.infer<typeof BootstrapSettingsSchema>;

/** Start a Run on a dataset (the λ bootstrap); `settings` is checked by BootstrapSettingsSchema. */
export const RunOnDatasetSchema = z.strictObject({
  kind: z.literal("bootstrap", { error: 'Runs on Field data are of kind "bootstrap".' }),
  settings: z.unknown(),
});

// --------------------------------------------------------------- answers

/** One site's census series and its count-based analysis. */
export interface SiteSeries {
  site: string;
  points: { t: number; label: string; count: number; stageCounts: Record<string, number | null> | null }[];
  analysis: CountsAnalysis;
}

/** The answer of the counts analysis. */
export interface CountsAnalysisResult {
  datasetId: string;
  stages: string[];
  threshold: number | null;
  sites: SiteSeries[];
}

/** Stage-fate estimates from one group of records (all, one site or one year). */
export interface FateGroup {
  label: string;
  site: string | null;
  year: number | null;
  records: number;
  estimate: StageFateEstimate;
}

/** The answer of the stage-fate analysis. */
export interface FateAnalysisResult {
  datasetId: string;
  stages: string[];
  settings: FateAnalysisSettings;
  pooled: FateGroup;
  bySite: FateGroup[];
  byYear: FateGroup[];
}

/** What a finished λ bootstrap Run holds. */
export interface BootstrapRunResult extends BootstrapSummary {
  datasetId: string;
  datasetName: string;
  stages: string[];
  /** Records of each stage resampled (all records of the stage, fates known or not). */
  recordsPerStage: number[];
  settings: FateAnalysisSettings;
  seed: number;
}

export interface ValidationProblem {
  /** Line of the file (1 = first line, the header). */
  line: number;
  /** Column name as in the header, or null for a problem of the whole row or file. */
  column: string | null;
  problem: string;
}

export interface ValidationReport {
  ok: boolean;
  rows: number;
  problems: ValidationProblem[];
  /** All problems found, of which `problems` lists the first MAX_REPORTED_PROBLEMS. */
  problemCount: number;
  delimiter: string;
  decimalComma: boolean;
}

export interface UploadPreview {
  delimiter: string;
  decimalComma: boolean;
  header: string[];
  rows: string[][];
  /** Suggested mapping by kind, from the column names. */
  suggested: { counts: Partial<CountsMapping>; "stage-fates": Partial<FatesMapping> };
  /** Rough number of lines in the file. */
  lines: number;
  /** When the chosen delimiter looks wrong. */
  warning?: string;
}

export interface DatasetSummary {
  id: string;
  studyId: string;
  name: string;
  kind: DatasetKind;
  fileName: string;
  fileBytes: number;
  rowCount: number;
  sites: string[];
  stages: string[];
  /** First and last census year. */
  firstYear: number | null;
  lastYear: number | null;
  uploadedBy: string | null;
  uploadedAt: string;
  mapping: CountsMapping | FatesMapping;
}
