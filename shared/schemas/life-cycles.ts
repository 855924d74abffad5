import { z } from "zod";
import type { MatrixAnalysis } from "../demography";
import { LifeCycleSchema, MAX_STAGES, type LifeCycle, type VitalRateSensitivity } from "../lifecycle";
import type { DeltaMethodResult } from "../uncertainty";

export const MAX_LIFE_CYCLE_NAME_LENGTH = 200;

/** A life cycle's version number as the editor last loaded it (stored as a 32-bit integer). */
export const LifeCycleVersionSchema = z
  .number({ error: "Give the version number the editor loaded." })
  .int("A version is a whole number.")
  .min(1, "Versions start at 1.")
  .max(2_147_483_647, "No life cycle has a version that high.");

/** Create a life cycle: a blank one by name, or from a complete Stagewright document. */
export const LifeCycleCreateSchema = z.union([
  z.strictObject({ name: z.string().trim().min(1, "Name the life cycle.").max(MAX_LIFE_CYCLE_NAME_LENGTH) }),
  z.strictObject({ document: z.unknown() }),
]);
export type LifeCycleCreate = z.infer<typeof LifeCycleCreateSchema>;

/** Save a life cycle: the version it was loaded at (optimistic concurrency) and the whole document. */
export const LifeCycleUpdateSchema = z.strictObject({
  version: LifeCycleVersionSchema,
  document: z.unknown(),
});
export type LifeCycleUpdate = z.infer<typeof LifeCycleUpdateSchema>;

export const LifeCycleSummarySchema = z.object({
  id: z.string(),
  studyId: z.string(),
  name: z.string(),
  version: z.number(),
  stageCount: z.number(),
  updatedAt: z.string(),
  updatedBy: z.string().nullable(),
});
export type LifeCycleSummary = z.infer<typeof LifeCycleSummarySchema>;

export const LifeCycleRecordSchema = LifeCycleSummarySchema.extend({ document: LifeCycleSchema });
export type LifeCycleRecord = z.infer<typeof LifeCycleRecordSchema>;

const finite = z.number({ error: "Each entry must be a number." });

/** A square, non-empty matrix of finite numbers with at most MAX_STAGES rows. */
export const MatrixSchema = z
  .array(z.array(finite, { error: "Each row must be an array of numbers." }), { error: "The matrix must be an array of rows." })
  .min(1, "The matrix is empty.")
  .max(MAX_STAGES, `At most ${MAX_STAGES} stages.`)
  .superRefine((rows, ctx) => {
    rows.forEach((row, i) => {
      if (row.length !== rows.length) {
        ctx.addIssue({ code: "custom", path: [i], message: `Row ${i + 1} has ${row.length} entries but there are ${rows.length} rows: a projection matrix is square.` });
      }
    });
  });

const nonNegativeMatrix = (label: string) =>
  MatrixSchema.superRefine((rows, ctx) => {
    rows.forEach((row, i) =>
      row.forEach((v, j) => {
        if (v < 0) ctx.addIssue({ code: "custom", path: [i, j], message: `${label} entry (${i + 1}, ${j + 1}) is negative (${v}); rates cannot be negative.` });
      }),
    );
  });

/** `POST /api/v1/analyze` with a bare matrix. */
export const AnalyzeMatrixRequestSchema = z
  .strictObject({
    matrix: nonNegativeMatrix("Matrix"),
    /** The reproduction part F of the matrix (A = U + F); needed for R0, generation time and life expectancy. */
    fertility: nonNegativeMatrix("Fertility").optional(),
    stages: z.array(z.string().trim().min(1).max(100)).optional(),
    initial: z.array(z.number().min(0, "Initial numbers cannot be negative.")).optional(),
    projectionSteps: z.number().int().min(1).max(1000).optional(),
  })
  .superRefine((v, ctx) => {
    const n = v.matrix.length;
    if (v.stages && v.stages.length !== n) ctx.addIssue({ code: "custom", path: ["stages"], message: `Give ${n} stage names, one per row.` });
    if (v.initial && v.initial.length !== n) ctx.addIssue({ code: "custom", path: ["initial"], message: `Give ${n} initial numbers, one per stage.` });
    if (v.fertility) {
      if (v.fertility.length !== n) ctx.addIssue({ code: "custom", path: ["fertility"], message: `The fertility matrix must be ${n}×${n} like the matrix.` });
      else
        v.fertility.forEach((row, i) =>
          row.forEach((f, j) => {
            if (f > (v.matrix[i]?.[j] ?? 0) + 1e-12) ctx.addIssue({ code: "custom", path: ["fertility", i, j], message: `Fertility (${i + 1}, ${j + 1}) exceeds the matrix entry: F is part of A.` });
          }),
        );
    }
  });

/** `POST /api/v1/analyze` with a life-cycle document. */
export const AnalyzeDocumentRequestSchema = z.strictObject({
  document: z.unknown(),
  initial: z.array(z.number().min(0, "Initial numbers cannot be negative.")).optional(),
  projectionSteps: z.number().int().min(1).max(1000).optional(),
});

export type AnalyzeMatrixRequest = z.infer<typeof AnalyzeMatrixRequestSchema>;
export type AnalyzeDocumentRequest = z.infer<typeof AnalyzeDocumentRequestSchema>;

/** The body of `POST /api/v1/analyze`: a life-cycle document when it has `document`, a bare matrix otherwise. */
export function parseAnalyzeRequest(body: unknown): ({ kind: "document" } & AnalyzeDocumentRequest) | ({ kind: "matrix" } & AnalyzeMatrixRequest) {
  if (body && typeof body === "object" && "document" in body) return { kind: "document", ...AnalyzeDocumentRequestSchema.parse(body) };
  return { kind: "matrix", ...AnalyzeMatrixRequestSchema.parse(body ?? {}) };
}

export const DELETED_LIFE_CYCLE_DAYS = 30;

export const LifeCycleDuplicateSchema = z.strictObject({
  name: z.string().trim().min(1, "Name the copy.").max(MAX_LIFE_CYCLE_NAME_LENGTH).optional(),
});
export type LifeCycleDuplicate = z.infer<typeof LifeCycleDuplicateSchema>;

export const DeletedLifeCycleSchema = z.object({
  id: z.string(),
  name: z.string(),
  deletedAt: z.string(),
  deletedBy: z.string().nullable(),
  /** After this moment the life cycle can no longer be restored. */
  recoverableUntil: z.string(),
});
export type DeletedLifeCycle = z.infer<typeof DeletedLifeCycleSchema>;

export const MAX_SNAPSHOT_MESSAGE_LENGTH = 500;

export const SnapshotCreateSchema = z.strictObject({
  message: z.string().trim().min(1, "Say what this snapshot is, e.g. “rates from the 2026 survey”.").max(MAX_SNAPSHOT_MESSAGE_LENGTH),
});
export type SnapshotCreate = z.infer<typeof SnapshotCreateSchema>;

export const SnapshotRestoreSchema = z.strictObject({
  /** The life cycle's version the editor has loaded (a stale one gets 409). */
  version: LifeCycleVersionSchema,
});
export type SnapshotRestore = z.infer<typeof SnapshotRestoreSchema>;

export const SnapshotSummarySchema = z.object({
  id: z.string(),
  lifeCycleId: z.string(),
  number: z.number(),
  message: z.string(),
  authorName: z.string().nullable(),
  createdAt: z.string(),
  lifeCycleVersion: z.number(),
});
export type SnapshotSummary = z.infer<typeof SnapshotSummarySchema>;

export const SnapshotSchema = SnapshotSummarySchema.extend({ document: LifeCycleSchema });
export type Snapshot = z.infer<typeof SnapshotSchema>;

/** What `GET /life-cycles/:id/analysis` and `POST /analyze` with a document return. */
export interface LifeCycleAnalysis extends MatrixAnalysis {
  stageIds: string[];
  census: LifeCycle["census"];
  timeStepUnit: string;
  /** The matrices built from the arrows: A = U + F. */
  matrices: { A: number[][]; U: number[][]; F: number[][] };
  /** ∂λ/∂x and (x/λ)∂λ/∂x for each named vital rate, by the chain rule through the formulas. */
  vitalRates: VitalRateSensitivity[];
  /** Delta-method intervals from the rates' SEs, CIs, counts or distributions; null when no rate gives any. */
  uncertainty: DeltaMethodResult | null;
}
