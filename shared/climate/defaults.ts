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

/** How a default parameter value is backed: a typical published value, a convention, or only an illustrative start. */
export type DefaultBasis = "typical" | "convention" | "illustrative";

/** Source notes shown beside the defaults, by parameter key. */
export const RESPONSE_DEFAULTS = {
  activationEnergy: { value: 0.65, basis: "typical", source: "0.65 eV: typical activation energy of metabolic rates, 0.6–0.7 eV (Gillooly et al. 2001, Science 293:2248; Brown et al. 2004, Ecology 85:1771)." },
  referenceTemperature: { value: 20, basis: "convention", source: "20 °C: a round reference; the rate at the reference is this rate's current value." },
  inactivationEnergy: { value: 3, basis: "illustrative", source: "3 eV: illustrative start for the high-temperature fall; set it from your species' data." },
  inactivationTemperature: { value: 30, basis: "illustrative", source: "30 °C: illustrative start; set it from your species' data." },
  optimum: { value: 22, basis: "illustrative", source: "22 °C: illustrative start; set it from your species' data." },
  width: { value: 5, basis: "illustrative", source: "5 °C: illustrative start; set it from your species' data." },
  criticalMaximum: { value: 34, basis: "illustrative", source: "34 °C: illustrative start; set it from your species' data." },
  lower: { value: 5, basis: "illustrative", source: "5 °C: illustrative start; set it from your species' data." },
  upper: { value: 35, basis: "illustrative", source: "35 °C: illustrative start; the coefficient a is chosen so the rate at 20 °C equals its current value." },
} as const satisfies Record<string, { value: number; basis: DefaultBasis; source: string }>;

/** A parameter of a response form as people read it; `unit` is empty for the rate's own units. */
export interface ThermalParameter {
  key: string;
  label: string;
  unit: string;
}

const ARRHENIUS_PARAMETERS: ThermalParameter[] = [
  { key: "activationEnergy", label: "Activation energy E", unit: "eV" },
  { key: "referenceTemperature", label: "Reference temperature", unit: "°C" },
  { key: "valueAtReference", label: "Value at the reference temperature", unit: "" },
];

/** Each form's parameters in the order the Climate tab and the report list them; the fit labels its estimates with them too. */
export const THERMAL_PARAMETERS: Record<ThermalForm, ThermalParameter[]> = {
  arrhenius: ARRHENIUS_PARAMETERS,
  // Sharpe–Schoolfield: the Arrhenius rise and a high-temperature inactivation.
  schoolfield: [
    ...ARRHENIUS_PARAMETERS,
    { key: "inactivationEnergy", label: "High-temperature inactivation energy E_h", unit: "eV" },
    { key: "inactivationTemperature", label: "Inactivation temperature T_h (half inactive)", unit: "°C" },
  ],
  "gaussian-quadratic": [
    { key: "optimum", label: "Optimum temperature", unit: "°C" },
    { key: "width", label: "Width σ of the rise", unit: "°C" },
    { key: "criticalMaximum", label: "Critical thermal maximum", unit: "°C" },
    { key: "valueAtOptimum", label: "Value at the optimum", unit: "" },
  ],
  briere: [
    { key: "coefficient", label: "Coefficient a", unit: "per °C^2.5" },
    { key: "lower", label: "Lower limit T₀", unit: "°C" },
    { key: "upper", label: "Upper limit T_L", unit: "°C" },
  ],
};

/** Each form's formula with the papers it comes from. */
export const FORM_FORMULAS: Record<ThermalForm, string> = {
  arrhenius: "r(T) = r_ref · exp[−(E/k)(1/T − 1/T_ref)], T in kelvin (Gillooly et al. 2001; Brown et al. 2004)",
  schoolfield: "r(T) = r_ref · exp[−(E/k)(1/T − 1/T_ref)] / (1 + exp[(E_h/k)(1/T_h − 1/T)]), T in kelvin (Schoolfield, Sharpe & Magnuson 1981)",
  "gaussian-quadratic": "exp{−[(T − T_opt)/(2σ)]²} below T_opt, 1 − [(T − T_opt)/(T_opt − CT_max)]² above, 0 from CT_max, T in °C (Deutsch et al. 2008)",
  briere: "r(T) = a · T · (T − T₀) · √(T_L − T) between T₀ and T_L, else 0, T in °C (Brière et al. 1999)",
};

/** A response's parameter by key (every key of THERMAL_PARAMETERS[form] is a number of the response). */
export function parameterValue(r: ThermalResponse, key: string): number {
  return (r as unknown as Record<string, number>)[key]!;
}

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
