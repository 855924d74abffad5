import type { LifeCycle } from "../../shared/lifecycle";
import type { ThermalResponse } from "../../shared/lifecycle/thermal";
import { withDemoClimate } from "../../server/seed/climate";
import { threeStageLifeCycle } from "./life-cycles";

/** Juvenile survival through an Arrhenius hazard (0.3 at 20 °C). */
export const JUVENILE_HAZARD: ThermalResponse = { form: "arrhenius", appliesTo: "hazard", activationEnergy: 0.65, referenceTemperature: 20, valueAtReference: -Math.log(0.3) };
/** Fecundity on a Gaussian–quadratic curve peaking at 21 °C. */
export const FECUNDITY_CURVE: ThermalResponse = { form: "gaussian-quadratic", appliesTo: "rate", valueAtOptimum: 2.4, optimum: 21, width: 5, criticalMaximum: 31 };

/** The factory's three-stage life cycle with thermal responses on s_j and f (λ ≥ 1 roughly between 12 and 28 °C). */
export function warmableLifeCycle(extra: Record<string, ThermalResponse> = {}, overrides: Partial<LifeCycle> = {}): LifeCycle {
  const doc = threeStageLifeCycle(overrides);
  const responses: Record<string, ThermalResponse> = { s_j: JUVENILE_HAZARD, f: FECUNDITY_CURVE, ...extra };
  return { ...doc, rates: doc.rates.map((r) => (responses[r.name] ? { ...r, thermal: responses[r.name] } : r)) };
}

/**
 * A life cycle shaped like the demo's Brannock Fen newts (three stages, eggs
 * per female × egg survival into efts) with the demo's invented thermal
 * responses, range 0–25 °C and warming trajectory (server/seed/climate.ts).
 */
export function demoLikeClimateLifeCycle(name = "Fen newts under warming"): LifeCycle {
  const doc = threeStageLifeCycle({ name });
  const values: Record<string, number> = { s_j: 0.45, s_s: 0.6, g: 0.4, s_a: 0.76 };
  return withDemoClimate({
    ...doc,
    rates: [...doc.rates.filter((r) => r.name !== "f").map((r) => ({ ...r, value: values[r.name] ?? r.value })), { id: "vr_se", name: "s_e", value: 0.035 }, { id: "vr_m", name: "m", value: 110, unit: "eggs per female" }],
    transitions: doc.transitions.map((t) => (t.id === "tr_aj" ? { ...t, rate: "m * 0.5 * s_e" } : t)),
  });
}
