/**
 * Payloads of the Climate area: λ(T) of a document, a fit of a thermal
 * response to measurements, a deterministic warming projection, and the
 * settings of a warming Run (stochastic replicates). One schema per payload.
 */
import { z } from "zod";
import type { FitResult, LambdaCurve, LambdaSlope, ReplicateSummary, TrajectoryProjection } from "../climate";
import { MAX_CURVE_POINTS } from "../climate/lambda";
import { MAX_TEMPERATURE, MIN_TEMPERATURE, temperatureRangeProblems, TemperatureRangeSchema, THERMAL_FORMS, ThermalTargetSchema, trajectoryProblems, WarmingTrajectorySchema } from "../lifecycle/thermal";

export const MAX_FIT_CSV_LENGTH = 200_000;
export const MAX_FIT_POINTS = 5_000;
export const MAX_WARMING_REPLICATES = 5_000;
export const MAX_INITIAL_TOTAL = 1e12;

const temperature = (what: string) =>
  z
    .number({ error: `The ${what} is a number of °C.` })
    .min(MIN_TEMPERATURE, `The ${what} lies between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.`)
    .max(MAX_TEMPERATURE, `The ${what} lies between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.`);

/** A λ(T) range with its order and width checked. */
const RangeSchema = TemperatureRangeSchema.superRefine((r, ctx) => {
  for (const p of temperatureRangeProblems(r)) ctx.addIssue({ code: "custom", path: [p.field], message: p.message });
});
/** A trajectory with consecutive years checked. */
const TrajectorySchema = WarmingTrajectorySchema.superRefine((t, ctx) => {
  for (const p of trajectoryProblems(t)) ctx.addIssue({ code: "custom", path: p.path, message: p.message });
});

const initialTotal = z
  .number({ error: "The starting population is a number of individuals." })
  .gt(0, "The starting population must be above 0.")
  .max(MAX_INITIAL_TOTAL, `The starting population is at most ${MAX_INITIAL_TOTAL}.`);

/** POST /climate/lambda: λ(T) of a (possibly unsaved) life cycle. */
export const ClimateLambdaRequestSchema = z.strictObject({
  document: z.unknown(),
  range: RangeSchema,
  points: z
    .number({ error: "The number of points is a whole number." })
    .int("The number of points is a whole number.")
    .min(3, "Use at least 3 points.")
    .max(MAX_CURVE_POINTS, `Use at most ${MAX_CURVE_POINTS} points.`)
    .optional(),
  /** Temperature at which to report dλ/dT, °C. */
  at: temperature("temperature for the slope").optional(),
});
export type ClimateLambdaRequest = z.infer<typeof ClimateLambdaRequestSchema>;

export interface ClimateLambdaResponse extends LambdaCurve {
  timeStepUnit: string;
  /** dλ/dT at `at` (or the middle of the window, else of the range). */
  slope: LambdaSlope;
  /** Each thermal rate's own optimum by its form's formula, °C (null for Arrhenius). */
  responseOptima: { rateId: string; name: string; optimum: number | null }[];
}

const measurement = z.strictObject({ temperature: temperature("temperature"), value: z.number({ error: "A measured value is a finite number." }) });

/** POST /climate/fit: measurements as CSV text (temperature °C, value) or as a list. */
export const ClimateFitRequestSchema = z
  .strictObject({
    form: z.enum(THERMAL_FORMS, { error: `The form is one of: ${THERMAL_FORMS.join(", ")}.` }),
    appliesTo: ThermalTargetSchema.optional(),
    referenceTemperature: temperature("reference temperature").optional(),
    csv: z.string({ error: "The CSV is text." }).max(MAX_FIT_CSV_LENGTH, `The CSV has at most ${MAX_FIT_CSV_LENGTH} characters.`).optional(),
    measurements: z.array(measurement).max(MAX_FIT_POINTS, `At most ${MAX_FIT_POINTS} measurements.`).optional(),
  })
  .superRefine((r, ctx) => {
    if ((r.csv === undefined) === (r.measurements === undefined)) {
      ctx.addIssue({ code: "custom", path: ["csv"], message: "Send the measurements either as CSV text or as a list, not both or neither." });
    }
  });
export type ClimateFitRequest = z.infer<typeof ClimateFitRequestSchema>;

export interface ClimateFitResponse extends FitResult {
  temperatures: number[];
  values: number[];
  /** The fitted curve at evenly spaced temperatures across the data, for a chart. */
  curve: { temperatures: number[]; values: number[] };
}

/** POST /climate/trajectory: deterministic projection through the trajectory's mean temperatures. */
export const ClimateTrajectoryRequestSchema = z.strictObject({
  document: z.unknown(),
  trajectory: TrajectorySchema,
  initialTotal: initialTotal.optional(),
});
export type ClimateTrajectoryRequest = z.infer<typeof ClimateTrajectoryRequestSchema>;
export interface ClimateTrajectoryResponse extends TrajectoryProjection {
  timeStepUnit: string;
}

/** Settings of a warming Run: stochastic year-to-year temperatures around the trajectory. */
export const WarmingSettingsSchema = z.strictObject({
  trajectory: TrajectorySchema,
  replicates: z
    .number({ error: "The number of replicates is a whole number." })
    .int("The number of replicates is a whole number.")
    .min(10, "Use at least 10 replicates.")
    .max(MAX_WARMING_REPLICATES, `Use at most ${MAX_WARMING_REPLICATES} replicates.`),
  initialTotal,
  /** Quasi-extinction threshold (individuals); the share of replicates below it is reported by year. */
  threshold: z.number({ error: "The threshold is a number of individuals." }).min(0, "The threshold cannot be negative.").optional(),
  seed: z.number({ error: "The seed is a whole number." }).int("The seed is a whole number.").min(0, "The seed is a whole number ≥ 0.").max(2 ** 31 - 1, "The seed is below 2³¹.").optional(),
});
export type WarmingSettings = z.infer<typeof WarmingSettingsSchema>;
export type WarmingSettingsInput = z.input<typeof WarmingSettingsSchema>;

/** What a finished warming Run holds. */
export interface WarmingRunResult extends ReplicateSummary {
  years: number[];
  /** The trajectory's mean temperatures, °C. */
  meanTemperatures: number[];
  /** Year-to-year SD of the temperatures, °C. */
  sd: number;
  seed: number;
  threshold: number | null;
  timeStepUnit: string;
  /** The projection without year-to-year noise, for comparison. */
  deterministic: TrajectoryProjection;
}
