/**
 * Starting values for a new thermal response, with where each comes from.
 * Only the activation energy has a published typical value; the shape
 * parameters of the peaked forms are illustrative starts to be replaced by
 * the species' own values (a fit on this tab, or the literature).
 */
import type { ThermalForm, ThermalResponse } from "../lifecycle/thermal";
import { responseValue } from "./responses";

export const FORM_LABELS: Record<ThermalForm, string> = {
  arrhenius: "Boltzmann–Arrhenius",
  schoolfield: "Sharpe–Schoolfield",
  "gaussian-quadratic": "Gaussian–quadratic",
  briere: "Brière",
};

/** Source notes shown beside the defaults, by parameter key. */
export const RESPONSE_DEFAULTS = {
  activationEnergy: { value: 0.65, source: "0.65 eV: typical activation energy of metabolic rates, 0.6–0.7 eV (Gillooly et al. 2001, Science 293:2248; Brown et al. 2004, Ecology 85:1771)." },
  referenceTemperature: { value: 20, source: "20 °C: a round reference; the rate at the reference is this rate's current value." },
  inactivationEnergy: { value: 3, source: "3 eV: illustrative start for the high-temperature fall; set it from your species' data." },
  inactivationTemperature: { value: 30, source: "30 °C: illustrative start; set it from your species' data." },
  optimum: { value: 22, source: "22 °C: illustrative start; set it from your species' data." },
  width: { value: 5, source: "5 °C: illustrative start; set it from your species' data." },
  criticalMaximum: { value: 34, source: "34 °C: illustrative start; set it from your species' data." },
  lower: { value: 5, source: "5 °C: illustrative start; set it from your species' data." },
  upper: { value: 35, source: "35 °C: illustrative start; the coefficient a is chosen so the rate at 20 °C equals its current value." },
} as const;

/**
 * A response of `form` for a rate with this value: the rate (or, for a
 * probability under Arrhenius or Schoolfield, the hazard −ln value) equals
 * the current value at 20 °C, so attaching it changes nothing at 20 °C.
 */
export function defaultResponse(form: ThermalForm, rate: { value: number; probability: boolean }): ThermalResponse {
  const d = RESPONSE_DEFAULTS;
  const hazard = rate.probability && (form === "arrhenius" || form === "schoolfield") && rate.value > 0 && rate.value < 1;
  const level = hazard ? -Math.log(rate.value) : rate.value > 0 ? rate.value : 1;
  const appliesTo = hazard ? "hazard" : "rate";
  const Tref = d.referenceTemperature.value;
  switch (form) {
    case "arrhenius":
      return { form, appliesTo, activationEnergy: d.activationEnergy.value, referenceTemperature: Tref, valueAtReference: level };
    case "schoolfield": {
      const base = { form, appliesTo, activationEnergy: d.activationEnergy.value, referenceTemperature: Tref, inactivationEnergy: d.inactivationEnergy.value, inactivationTemperature: d.inactivationTemperature.value, valueAtReference: 1 } as const;
      return { ...base, valueAtReference: level / responseValue(base, Tref) };
    }
    case "gaussian-quadratic": {
      const base = { form, appliesTo, valueAtOptimum: 1, optimum: d.optimum.value, width: d.width.value, criticalMaximum: d.criticalMaximum.value } as const;
      return { ...base, valueAtOptimum: Math.min(rate.probability ? 1 : Infinity, level / responseValue(base, Tref)) };
    }
    case "briere": {
      const base = { form, appliesTo, coefficient: 1, lower: d.lower.value, upper: d.upper.value } as const;
      return { ...base, coefficient: level / responseValue(base, Tref) };
    }
  }
}
