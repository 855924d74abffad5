/**
 * Thermal responses of vital rates and the Climate settings of a life-cycle
 * document (version 2). Temperatures are in °C here, as people enter them;
 * the response formulas convert to kelvin where the published form uses it.
 * Activation energies are in eV.
 */
import { z } from "zod";

const celsius = (what: string) =>
  z
    .number({ error: `${what} is a temperature in °C (a finite number).` })
    .min(-273.15, `${what} cannot be below absolute zero (−273.15 °C).`)
    .max(1000, `${what} is at most 1000 °C.`);
const positive = (what: string) => z.number({ error: `${what} is a finite number.` }).gt(0, `${what} is above 0.`);

/** How the response enters the model: as the rate itself, or as a hazard h(T) with survival exp(−h Δt). */
export const THERMAL_TARGETS = ["rate", "hazard"] as const;
const appliesTo = z.enum(THERMAL_TARGETS, { error: 'A thermal response applies to the "rate" itself or to a "hazard".' });

export const ThermalResponseSchema = z.discriminatedUnion(
  "form",
  [
    z.strictObject({
      form: z.literal("arrhenius"),
      appliesTo,
      activationEnergy: positive("The activation energy (eV)"),
      referenceTemperature: celsius("The reference temperature"),
      valueAtReference: positive("The value at the reference temperature"),
    }),
    z.strictObject({
      form: z.literal("schoolfield"),
      appliesTo,
      activationEnergy: positive("The activation energy (eV)"),
      referenceTemperature: celsius("The reference temperature"),
      valueAtReference: positive("The value at the reference temperature"),
      inactivationEnergy: positive("The high-temperature inactivation energy (eV)"),
      inactivationTemperature: celsius("The high-temperature inactivation temperature"),
    }),
    z.strictObject({
      form: z.literal("gaussian-quadratic"),
      appliesTo,
      optimum: celsius("The optimum temperature"),
      width: positive("The width σ (°C)"),
      criticalMaximum: celsius("The critical thermal maximum"),
      valueAtOptimum: positive("The value at the optimum"),
    }),
    z.strictObject({
      form: z.literal("briere"),
      appliesTo,
      coefficient: positive("The coefficient a"),
      lower: celsius("The lower temperature limit"),
      upper: celsius("The upper temperature limit"),
    }),
  ],
  { error: 'The thermal response form is "arrhenius", "schoolfield", "gaussian-quadratic" or "briere".' },
);

export const WarmingTrajectorySchema = z.discriminatedUnion(
  "kind",
  [
    /** Observed or projected temperatures, one per year. */
    z.strictObject({
      kind: z.literal("series"),
      points: z.array(z.strictObject({ year: z.number().int("A year is a whole number."), temperature: celsius("A temperature") })).min(1, "Give at least one year.").max(1000, "At most 1000 years."),
    }),
    /** A baseline, a linear trend and year-to-year variation. */
    z.strictObject({
      kind: z.literal("trend"),
      startYear: z.number().int("The first year is a whole number."),
      years: z.number().int("The number of years is a whole number.").min(1, "At least 1 year.").max(1000, "At most 1000 years."),
      baseline: celsius("The baseline temperature"),
      trendPerDecade: z.number({ error: "The trend is a finite number of °C per decade." }).min(-10, "A trend beyond ±10 °C per decade is not plausible.").max(10, "A trend beyond ±10 °C per decade is not plausible."),
      sd: z.number({ error: "The SD is a finite number." }).min(0, "An SD cannot be negative.").max(20, "The year-to-year SD is at most 20 °C."),
    }),
  ],
  { error: 'A warming trajectory is a "series" of yearly temperatures or a "trend".' },
);

export const ClimateSettingsSchema = z.strictObject({
  /** Temperature range for λ(T), °C. */
  range: z.strictObject({ min: celsius("The lowest temperature"), max: celsius("The highest temperature") }).optional(),
  trajectory: WarmingTrajectorySchema.optional(),
});

export type ThermalResponse = z.infer<typeof ThermalResponseSchema>;
export type WarmingTrajectory = z.infer<typeof WarmingTrajectorySchema>;
export type ClimateSettings = z.infer<typeof ClimateSettingsSchema>;

type Issue = (path: (string | number)[], message: string) => void;

interface ThermalFields {
  rates: readonly { name: string; thermal?: ThermalResponse | undefined }[];
  climate?: ClimateSettings | undefined;
}

/** Cross-field rules: limits in order, optimum inside them, a sensible range. */
export function checkThermalRules(doc: ThermalFields, issue: Issue): void {
  doc.rates.forEach((rate, i) => {
    const t = rate.thermal;
    const at = (field: string) => ["rates", i, "thermal", field];
    if (t?.form === "gaussian-quadratic" && t.criticalMaximum <= t.optimum) {
      issue(at("criticalMaximum"), `The thermal response of "${rate.name}": the critical maximum (${t.criticalMaximum} °C) must lie above the optimum (${t.optimum} °C).`);
    }
    if (t?.form === "briere" && t.upper <= t.lower) {
      issue(at("upper"), `The thermal response of "${rate.name}": the upper limit (${t.upper} °C) must lie above the lower limit (${t.lower} °C).`);
    }
  });
  const range = doc.climate?.range;
  if (range && range.max <= range.min) issue(["climate", "range", "max"], `The highest temperature (${range.max} °C) must lie above the lowest (${range.min} °C).`);
}
