/**
 * Payloads of the Levers routes: scenario comparison, lever ranking and
 * break-even values of one life cycle (`POST /api/v1/levers`), and a
 * fixed-design LTRE between two life cycles (`POST /api/v1/ltre`). Both take
 * whole documents, so the editor can send the unsaved state it shows.
 */
import { z } from "zod";
import type { BreakEvenTable, LeverRanking, LifeCycleLtre, ScenarioComparison } from "../levers";

/** Largest relative change of the ranking (+1000 %). */
export const MAX_RELATIVE_CHANGE = 10;
/** Largest target λ of the break-even search. */
export const MAX_TARGET_LAMBDA = 100;

export const LeversRequestSchema = z.strictObject({
  /** A life-cycle document (any supported version). */
  document: z.unknown(),
  /** The same relative change for every lever, e.g. 0.1 for ±10 % (default 0.1). */
  relativeChange: z
    .number({ error: "The relative change is a number such as 0.1 (10 %)." })
    .gt(0, "The relative change is above 0, e.g. 0.1 for 10 %.")
    .max(MAX_RELATIVE_CHANGE, `The relative change is at most ${MAX_RELATIVE_CHANGE} (1000 %).`)
    .default(0.1),
  /** The λ break-even values aim at (default 1). */
  target: z
    .number({ error: "The target λ is a number such as 1." })
    .gt(0, "The target λ is above 0.")
    .max(MAX_TARGET_LAMBDA, `The target λ is at most ${MAX_TARGET_LAMBDA}.`)
    .default(1),
  /** Leave out the break-even search (the slowest part) when false. */
  breakEven: z.boolean({ error: "breakEven is true or false." }).default(true),
});
export type LeversRequest = z.infer<typeof LeversRequestSchema>;
export type LeversRequestInput = z.input<typeof LeversRequestSchema>;

export const LtreRequestSchema = z.strictObject({
  /** The reference life cycle (control, first period, first site). */
  reference: z.unknown(),
  /** The life cycle compared with it (treatment, later period, other site). */
  comparison: z.unknown(),
});
export type LtreRequest = z.infer<typeof LtreRequestSchema>;

export interface LeversResponse {
  comparison: ScenarioComparison;
  ranking: LeverRanking;
  breakEven: BreakEvenTable | null;
  timeStepUnit: string;
}

export type LtreResponse = LifeCycleLtre;
