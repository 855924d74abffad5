/**
 * Thermal responses of vital rates and the Climate settings of a life-cycle
 * document (version 2; owner: Climate). Every field is optional: a rate may
 * carry `thermal`, the document may carry `climate`. Temperatures are in °C
 * here, as people enter them; the response formulas convert to kelvin where
 * the published form uses it (shared/climate/responses.ts). Activation
 * energies are in eV.
 */
import { z } from "zod";

export const THERMAL_FORMS = ["arrhenius", "schoolfield", "gaussian-quadratic", "briere"] as const;
export type ThermalForm = (typeof THERMAL_FORMS)[number];
/** How the response enters the model: as the rate itself, or as a hazard h(T) with survival exp(−h Δt). */
export const THERMAL_TARGETS = ["rate", "hazard"] as const;

/** Temperatures (°C) accepted anywhere in Climate: parameters, ranges, trajectories. */
export const MIN_TEMPERATURE = -60;
export const MAX_TEMPERATURE = 80;
/** Widest λ(T) range, °C. */
export const MAX_TEMPERATURE_SPAN = 100;
/** λ(T) range used when a life cycle saves none (the Climate tab and the report), °C. */
export const DEFAULT_CLIMATE_RANGE = { min: 0, max: 35 } as const;
/** Activation and inactivation energies above this (eV) are not physiological. */
export const MAX_ENERGY = 20;
/** Years in a warming trajectory. */
export const MAX_TRAJECTORY_YEARS = 500;
export const MIN_YEAR = 1000;
export const MAX_YEAR = 3000;

const celsius = (what: string) =>
  z
    .number({ error: `${what} is a temperature in °C (a finite number).` })
    .min(MIN_TEMPERATURE, `${what} lies between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.`)
    .max(MAX_TEMPERATURE, `${what} lies between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.`);
const positive = (what: string) => z.number({ error: `${what} is a finite number.` }).gt(0, `${what} is above 0.`);
const energy = (what: string) =>
  z
    .number({ error: `${what} is a finite number of eV.` })
    .gt(0, `${what} is above 0 eV (typically 0.2–1.2 eV for the rise).`)
    .max(MAX_ENERGY, `${what} is at most ${MAX_ENERGY} eV.`);
const year = (what: string) =>
  z
    .number({ error: `${what} is a whole number.` })
    .int(`${what} is a whole number.`)
    .min(MIN_YEAR, `${what} lies between ${MIN_YEAR} and ${MAX_YEAR}.`)
    .max(MAX_YEAR, `${what} lies between ${MIN_YEAR} and ${MAX_YEAR}.`);
const sd = z.number({ error: "The year-to-year SD is a finite number of °C." }).min(0, "An SD cannot be negative.").max(20, "The year-to-year SD is at most 20 °C.");

export const ThermalTargetSchema = z.enum(THERMAL_TARGETS, { error: 'A thermal response applies to the "rate" itself or to a "hazard".' });
const appliesTo = ThermalTargetSchema;

export const ArrheniusSchema = z.strictObject({
  form: z.literal("arrhenius"),
  appliesTo,
  /** E, eV. */
  activationEnergy: energy("The activation energy"),
  /** T_ref, °C. */
  referenceTemperature: celsius("The reference temperature"),
  /** r(T_ref), in the rate's units (a hazard per time step when appliesTo is "hazard"). */
  valueAtReference: positive("The value at the reference temperature"),
});

export const SchoolfieldSchema = z.strictObject({
  form: z.literal("schoolfield"),
  appliesTo,
  activationEnergy: energy("The activation energy"),
  referenceTemperature: celsius("The reference temperature"),
  valueAtReference: positive("The value at the reference temperature"),
  /** E_h, eV: steepness of the high-temperature fall; above E. */
  inactivationEnergy: energy("The high-temperature inactivation energy"),
  /** T_h, °C: half the enzyme is inactive here. */
  inactivationTemperature: celsius("The high-temperature inactivation temperature"),
});

export const GaussianQuadraticSchema = z.strictObject({
  form: z.literal("gaussian-quadratic"),
  appliesTo,
  /** T_opt, °C. */
  optimum: celsius("The optimum temperature"),
  /** σ, °C: width of the Gaussian rise. */
  width: positive("The width σ (°C)").max(MAX_TEMPERATURE_SPAN, `The width σ is at most ${MAX_TEMPERATURE_SPAN} °C.`),
  /** CT_max, °C: the rate is 0 here and above. */
  criticalMaximum: celsius("The critical thermal maximum"),
  /** The rate at the optimum. */
  valueAtOptimum: positive("The value at the optimum"),
});

export const BriereSchema = z.strictObject({
  form: z.literal("briere"),
  appliesTo,
  /** a, rate units per °C^2.5. */
  coefficient: positive("The coefficient a"),
  /** T₀, °C; at least 0 °C, since the published formula multiplies by T in °C. */
  lower: celsius("The lower temperature limit").min(0, "The lower temperature limit is at least 0 °C: the Brière formula multiplies by T in °C, so it would turn negative below 0 °C."),
  /** T_L, °C. */
  upper: celsius("The upper temperature limit"),
});

export const ThermalResponseSchema = z.discriminatedUnion("form", [ArrheniusSchema, SchoolfieldSchema, GaussianQuadraticSchema, BriereSchema], {
  error: 'The thermal response form is "arrhenius", "schoolfield", "gaussian-quadratic" or "briere".',
});

export const TemperatureRangeSchema = z.strictObject({ min: celsius("The lowest temperature"), max: celsius("The highest temperature") });

export const WarmingTrajectorySchema = z.discriminatedUnion(
  "kind",
  [
    /** Observed or projected temperatures, one per year, in consecutive years. */
    z.strictObject({
      kind: z.literal("series"),
      points: z
        .array(z.strictObject({ year: year("A year"), temperature: celsius("A temperature") }))
        .min(1, "Give at least one year.")
        .max(MAX_TRAJECTORY_YEARS, `At most ${MAX_TRAJECTORY_YEARS} years.`),
      /** Year-to-year SD added around the series by stochastic replicates, °C (default 0). */
      sd: sd.optional(),
    }),
    /** A baseline, a linear trend and year-to-year variation. */
    z.strictObject({
      kind: z.literal("trend"),
      startYear: year("The first year"),
      years: z.number().int("The number of years is a whole number.").min(1, "At least 1 year.").max(MAX_TRAJECTORY_YEARS, `At most ${MAX_TRAJECTORY_YEARS} years.`),
      /** Mean temperature of the first year, °C. */
      baseline: celsius("The baseline temperature"),
      trendPerDecade: z.number({ error: "The trend is a finite number of °C per decade." }).min(-10, "A trend beyond ±10 °C per decade is not plausible.").max(10, "A trend beyond ±10 °C per decade is not plausible."),
      /** Year-to-year SD around the trend, °C (used by stochastic replicates). */
      sd,
    }),
  ],
  { error: 'A warming trajectory is a "series" of yearly temperatures or a "trend".' },
);

export const ClimateSettingsSchema = z.strictObject({
  /** Temperature range for λ(T), °C. */
  range: TemperatureRangeSchema.optional(),
  trajectory: WarmingTrajectorySchema.optional(),
});

export type ThermalResponse = z.infer<typeof ThermalResponseSchema>;
export type ThermalTarget = z.infer<typeof ThermalTargetSchema>;
export type TemperatureRange = z.infer<typeof TemperatureRangeSchema>;
export type WarmingTrajectory = z.infer<typeof WarmingTrajectorySchema>;
export type ClimateSettings = z.infer<typeof ClimateSettingsSchema>;

type Issue = (path: (string | number)[], message: string) => void;

/** Cross-parameter problems of one response, as (field, message); `who` names the rate in messages. */
export function thermalResponseProblems(t: ThermalResponse, who = "This thermal response"): { field: string; message: string }[] {
  const out: { field: string; message: string }[] = [];
  if (t.form === "schoolfield" && !(t.inactivationEnergy > t.activationEnergy)) {
    out.push({ field: "inactivationEnergy", message: `${who}: the inactivation energy (${t.inactivationEnergy} eV) must exceed the activation energy (${t.activationEnergy} eV), or the rate never turns down.` });
  }
  if (t.form === "gaussian-quadratic" && !(t.criticalMaximum > t.optimum)) {
    out.push({ field: "criticalMaximum", message: `${who}: the critical maximum (${t.criticalMaximum} °C) must lie above the optimum (${t.optimum} °C).` });
  }
  if (t.form === "briere" && !(t.upper > t.lower)) {
    out.push({ field: "upper", message: `${who}: the upper limit (${t.upper} °C) must lie above the lower limit (${t.lower} °C).` });
  }
  return out;
}

/** Problems of a λ(T) range: reversed, or absurdly wide. */
export function temperatureRangeProblems(range: TemperatureRange): { field: "max"; message: string }[] {
  if (!(range.max > range.min)) return [{ field: "max", message: `The highest temperature (${range.max} °C) must lie above the lowest (${range.min} °C).` }];
  if (range.max - range.min > MAX_TEMPERATURE_SPAN) return [{ field: "max", message: `A temperature range spans at most ${MAX_TEMPERATURE_SPAN} °C; this one spans ${range.max - range.min} °C.` }];
  return [];
}

/** Problems of a trajectory: series years must follow one another. */
export function trajectoryProblems(t: WarmingTrajectory): { path: (string | number)[]; message: string }[] {
  const out: { path: (string | number)[]; message: string }[] = [];
  if (t.kind === "series") {
    for (let i = 1; i < t.points.length; i++) {
      const prev = t.points[i - 1]!.year;
      if (t.points[i]!.year !== prev + 1) {
        out.push({ path: ["points", i, "year"], message: `Years follow one another: ${prev} is followed by ${t.points[i]!.year}.` });
        break;
      }
    }
  }
  return out;
}

interface ThermalFields {
  rates: readonly { name: string; value: number; scale?: string | undefined; thermal?: ThermalResponse | undefined }[];
  climate?: ClimateSettings | undefined;
}

/**
 * Cross-field rules: limits in order, optimum inside them, inactivation above
 * activation, a hazard only on a probability, a sensible range, consecutive
 * years. Messages name the rate.
 */
export function checkThermalRules(doc: ThermalFields, issue: Issue): void {
  doc.rates.forEach((rate, i) => {
    const t = rate.thermal;
    if (!t) return;
    const who = `The thermal response of "${rate.name}"`;
    for (const p of thermalResponseProblems(t, who)) issue(["rates", i, "thermal", p.field], p.message);
    const probability = rate.scale !== undefined ? rate.scale === "probability" : rate.value >= 0 && rate.value <= 1;
    if (t.appliesTo === "hazard" && !probability) {
      issue(["rates", i, "thermal", "appliesTo"], `${who} applies to a hazard, which turns into a survival probability exp(−h); but "${rate.name}" is not a probability. Apply it to the rate itself.`);
    }
  });
  const range = doc.climate?.range;
  if (range) for (const p of temperatureRangeProblems(range)) issue(["climate", "range", p.field], p.message);
  const trajectory = doc.climate?.trajectory;
  if (trajectory) for (const p of trajectoryProblems(trajectory)) issue(["climate", "trajectory", ...p.path], p.message);
}
