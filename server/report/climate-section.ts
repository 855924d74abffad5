/**
 * The report's Climate section, built from a document (and its newest
 * finished warming Run, found by the report service): every thermal response
 * with its parameters, λ(T) over the document's range (the Climate tab's
 * default when it names none) at the tab's number of points, so the window's
 * edges and the optimum are the ones the tab shows; dλ/dT at the reference
 * temperature split by rate; the cautions that apply; and the charts. No I/O.
 */
import {
  DEFAULT_CURVE_POINTS,
  FORM_FORMULAS,
  FORM_LABELS,
  lambdaCurve,
  lambdaSlope,
  parameterValue,
  RESPONSE_DEFAULTS,
  responseOptimum,
  THERMAL_PARAMETERS,
  thermalModel,
  trajectoryTemperatures,
  type DefaultBasis,
  type LambdaCurve,
} from "../../shared/climate";
import { formatNumber } from "../../shared/format/number-format";
import { LifeCycleFormulaError, type LifeCycle } from "../../shared/lifecycle";
import { DEFAULT_CLIMATE_RANGE } from "../../shared/lifecycle/thermal";
import type { ReportClimate, ReportThermalResponse, ReportWarming } from "../../shared/report/model";
import type { WarmingRunResult } from "../../shared/schemas/climate";
import { climateChart, warmingChart } from "./charts";

export interface ClimateSection {
  summary: ReportClimate;
  figures: { climate: string | null; warming: string | null };
}

/** The Climate section of `doc`; null when no rate has a thermal response. `analysable`: the life cycle's own analysis succeeded. */
export function climateSection(doc: LifeCycle, analysable: boolean, warmingRun: { summary: ReportWarming; result: WarmingRunResult } | null): ClimateSection | null {
  const thermal = doc.rates.filter((r) => r.thermal);
  if (thermal.length === 0) return null;
  const range = { ...(doc.climate?.range ?? DEFAULT_CLIMATE_RANGE), saved: doc.climate?.range !== undefined };
  const responses = thermal.map((rate): ReportThermalResponse => {
    const t = rate.thermal!;
    return {
      rateName: rate.name,
      rateNotes: rate.notes ?? null,
      rateSource: rate.source ?? null,
      form: t.form,
      formLabel: FORM_LABELS[t.form],
      formula: FORM_FORMULAS[t.form],
      appliesTo: t.appliesTo,
      parameters: THERMAL_PARAMETERS[t.form].map((p) => {
        const value = parameterValue(t, p.key);
        const preset = (RESPONSE_DEFAULTS as Record<string, { value: number; basis: DefaultBasis; source: string } | undefined>)[p.key];
        const isPreset = preset !== undefined && preset.value === value;
        const unit = p.unit || (t.appliesTo === "hazard" ? `per ${doc.timeStepUnit} (hazard)` : (rate.unit ?? ""));
        return { key: p.key, label: p.label, value, unit, basis: isPreset ? preset.basis : null, note: isPreset ? preset.source : null };
      }),
      optimum: responseOptimum(t),
    };
  });
  const warming = warmingRun?.summary ?? null;
  const warmingFigure = warmingRun ? warmingChart(warmingRun.result) : null;
  const cautions = climateCautions(responses, warming !== null);
  const without = (problem: string): ClimateSection => ({
    summary: { range, responses, window: [], optimum: null, slope: null, clamped: [], warming, problem, cautions },
    figures: { climate: null, warming: warmingFigure },
  });
  if (!analysable) return without("λ(T) needs a life cycle that can be analysed (see Growth rate λ above).");
  try {
    const model = thermalModel(doc);
    const curve = lambdaCurve(model, { min: range.min, max: range.max, points: DEFAULT_CURVE_POINTS });
    const { temperature, basis } = slopeTemperature(doc, curve, range);
    const s = lambdaSlope(model, temperature);
    return {
      summary: {
        range,
        responses,
        window: curve.window.map((w) => ({ from: w.from, to: w.to, lower: w.lower?.temperature ?? null, upper: w.upper?.temperature ?? null })),
        optimum: curve.optimum,
        slope: {
          temperature,
          basis,
          lambda: s.lambda,
          slope: s.slope,
          contributions: s.contributions.map(({ name, value, rateSlope, sensitivity, contribution }) => ({ name, value, rateSlope, sensitivity, contribution })),
        },
        clamped: curve.clamped.map(({ name, from, to, worst }) => ({ name, from, to, worst })),
        warming,
        problem: null,
        cautions,
      },
      figures: { climate: climateChart(curve, doc.timeStepUnit), warming: warmingFigure },
    };
  } catch (err) {
    if (!(err instanceof LifeCycleFormulaError)) throw err;
    return without(`λ(T) cannot be computed: a rate's formula fails under the thermal responses (${err.errors[0]?.message ?? err.message}).`);
  }
}

/**
 * Where dλ/dT is reported: the first year of the warming trajectory (today's
 * conditions), else the reference temperature the Arrhenius-type responses
 * share, else the middle of the window (as the Climate tab), else of the range.
 */
function slopeTemperature(doc: LifeCycle, curve: LambdaCurve, range: { min: number; max: number }): { temperature: number; basis: "trajectory" | "reference" | "window" | "range" } {
  const trajectory = doc.climate?.trajectory;
  if (trajectory) return { temperature: trajectoryTemperatures(trajectory).temperatures[0]!, basis: "trajectory" };
  const references = new Set(doc.rates.flatMap((r) => (r.thermal && (r.thermal.form === "arrhenius" || r.thermal.form === "schoolfield") ? [r.thermal.referenceTemperature] : [])));
  if (references.size === 1) return { temperature: [...references][0]!, basis: "reference" };
  const w = curve.window[0];
  if (w) return { temperature: (w.from + w.to) / 2, basis: "window" };
  return { temperature: (range.min + range.max) / 2, basis: "range" };
}

/** The cautions that apply to this life cycle's Climate results. */
function climateCautions(responses: ReportThermalResponse[], hasWarming: boolean): string[] {
  const out = [
    "λ(T) is only as good as the thermal responses: outside the temperatures at which each response was measured, the curve, the window's edges and the optimum are extrapolation.",
  ];
  const arrhenius = responses.filter((r) => r.form === "arrhenius").map((r) => r.rateName);
  if (arrhenius.length > 0) out.push(`A Boltzmann–Arrhenius response (${arrhenius.join(", ")}) has no optimum: it keeps changing in the same direction however far the temperature moves from its reference.`);
  const illustrative = responses.flatMap((r) => r.parameters.filter((p) => p.basis === "illustrative").map((p) => `${r.rateName}: ${p.label} = ${formatNumber(p.value, 4)}${p.unit ? ` ${p.unit}` : ""}`));
  if (illustrative.length > 0) out.push(`Illustrative defaults, not measurements of this species: ${illustrative.join("; ")}. Replace them with the species' own values before relying on these results.`);
  out.push("Each rate follows temperature alone; other effects of warming (drying, food, disease, timing of breeding) are not in the model.");
  if (hasWarming) out.push("The warming Run draws each year's temperature independently around the trajectory, and used the life cycle as it was when the Run started.");
  return out;
}
