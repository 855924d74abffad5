import { z } from "zod";
import type { MonteCarloResult } from "../uncertainty/monte-carlo";

/** Fewest and most draws of a Monte Carlo run. */
export const MIN_DRAWS = 1_000;
export const MAX_DRAWS = 200_000;
export const DEFAULT_DRAWS = 10_000;

const wholeNumber = (what: string, min: number, max: number) =>
  z
    .number({ error: `${what} is a whole number.` })
    .int(`${what} is a whole number.`)
    .min(min, `${what} is at least ${min.toLocaleString("en")}.`)
    .max(max, `${what} is at most ${max.toLocaleString("en")}.`);

/** Settings of a Monte Carlo uncertainty run; the rates' uncertainty comes from the life cycle itself. */
export const UncertaintySettingsSchema = z.strictObject({
  draws: wholeNumber("The number of draws", MIN_DRAWS, MAX_DRAWS).default(DEFAULT_DRAWS),
  /** Seed of the random streams; the service picks and stores one when absent. */
  seed: wholeNumber("The seed", 0, Number.MAX_SAFE_INTEGER).optional(),
});
export type UncertaintySettings = z.infer<typeof UncertaintySettingsSchema>;
export type UncertaintySettingsInput = z.input<typeof UncertaintySettingsSchema>;

/** What a finished Monte Carlo uncertainty run holds. */
export interface UncertaintyRunResult extends MonteCarloResult {
  timeStepUnit: string;
  /** The life cycle's version the run was computed from. */
  lifeCycleVersion: number;
}
