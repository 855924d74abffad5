/**
 * The Climate area's computations for the routes: λ(T) with its persistence
 * window and slope, fits of thermal responses to measurements, and
 * deterministic warming projections. Nothing is stored here; attaching a
 * fitted curve to a rate is an ordinary save of the life cycle.
 */
import {
  fitThermalResponse,
  lambdaCurve,
  lambdaSlope,
  parseNumericPairs,
  projectTrajectory,
  responseOptima,
  responseValue,
  SlopeUndefinedError,
  thermalModel,
  ThermalValueError,
  trajectoryTemperatures,
  type ThermalModel,
} from "../../shared/climate";
import { buildMatrices, LifeCycleFormulaError, type LifeCycle } from "../../shared/lifecycle";
import type { WarmingTrajectory } from "../../shared/lifecycle/thermal";
import type {
  ClimateFitRequest,
  ClimateFitResponse,
  ClimateLambdaRequest,
  ClimateLambdaResponse,
  ClimateTrajectoryResponse,
} from "../../shared/schemas/climate";
import { badRequest } from "../http/errors";

/** A model for the document, or a 400 naming the arrow whose formula breaks. */
export function thermalModelOrBadRequest(doc: LifeCycle, field = "document"): ThermalModel {
  if (doc.stages.length === 0) throw badRequest("The life cycle has no stages yet: add a stage first.", [{ path: `${field}.stages`, message: "Add at least one stage." }]);
  const m = buildMatrices(doc);
  if (m.errors.length > 0) {
    const index = new Map(doc.transitions.map((t, i) => [t.id, i]));
    const fields = m.errors.map((e) => ({ path: `${field}.transitions.${index.get(e.transitionId)}.rate`, message: e.message }));
    throw badRequest(`The life cycle cannot be analysed: ${fields[0]!.message}`, fields);
  }
  return thermalModel(doc);
}

/** Runs `fn`; a formula that fails at some temperature (a negative entry, say), or a response too large to compute with, is the request's problem. */
function atTemperatures<T>(doc: LifeCycle, fn: () => T, field = "document"): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof ThermalValueError) {
      const path = `${field}.rates.${doc.rates.findIndex((r) => r.id === err.rateId)}.thermal`;
      throw badRequest(`${path}: ${err.message}`, [{ path, message: err.message }]);
    }
    if (err instanceof SlopeUndefinedError) throw badRequest(`at: ${err.message}`, [{ path: "at", message: err.message }]);
    if (err instanceof LifeCycleFormulaError) {
      const index = new Map(doc.transitions.map((t, i) => [t.id, i]));
      const fields = err.errors.map((e) => ({ path: `${field}.transitions.${index.get(e.transitionId)}.rate`, message: `Under the thermal responses: ${e.message}` }));
      throw badRequest(fields[0]!.message, fields);
    }
    throw err;
  }
}

export function climateLambda(doc: LifeCycle, req: Omit<ClimateLambdaRequest, "document">): ClimateLambdaResponse {
  const model = thermalModelOrBadRequest(doc);
  return atTemperatures(doc, () => {
    const curve = lambdaCurve(model, { min: req.range.min, max: req.range.max, points: req.points });
    const w = curve.window[0];
    const at = req.at ?? (w ? (w.from + w.to) / 2 : (req.range.min + req.range.max) / 2);
    return { ...curve, timeStepUnit: doc.timeStepUnit, slope: lambdaSlope(model, at), responseOptima: responseOptima(model) };
  });
}

export function climateFit(req: ClimateFitRequest): ClimateFitResponse {
  let temperatures: number[];
  let values: number[];
  if (req.csv !== undefined) {
    const parsed = parseNumericPairs(req.csv, ["temperature", "value"]);
    if (!parsed.ok) throw badRequest(`csv: ${parsed.issues[0]!.message}`, parsed.issues.map((i) => ({ path: "csv", message: i.message })));
    temperatures = parsed.x;
    values = parsed.y;
    const bad = temperatures.findIndex((t) => t < -60 || t > 80);
    if (bad >= 0) throw badRequest(`csv: Row ${bad + 1}: the temperature ${temperatures[bad]} °C lies outside −60 to 80 °C; the first column is the temperature in °C.`, [{ path: "csv", message: `Row ${bad + 1}: the temperature ${temperatures[bad]} °C lies outside −60 to 80 °C.` }]);
  } else {
    temperatures = req.measurements!.map((m) => m.temperature);
    values = req.measurements!.map((m) => m.value);
  }
  if (values.some((v) => v < 0)) {
    const i = values.findIndex((v) => v < 0);
    throw badRequest(`Measurement ${i + 1} is negative (${values[i]}); a rate or hazard is ≥ 0.`, [{ path: req.csv !== undefined ? "csv" : `measurements.${i}.value`, message: "A rate or hazard is ≥ 0." }]);
  }
  if (new Set(temperatures).size < 3) throw badRequest("Measure at 3 or more different temperatures to fit a curve.", [{ path: req.csv !== undefined ? "csv" : "measurements", message: "Measure at 3 or more different temperatures." }]);
  let fit;
  try {
    fit = fitThermalResponse(temperatures, values, { form: req.form, appliesTo: req.appliesTo, referenceTemperature: req.referenceTemperature });
  } catch (err) {
    if (err instanceof RangeError) throw badRequest(err.message, [{ path: req.csv !== undefined ? "csv" : "measurements", message: err.message }]);
    throw err;
  }
  const lo = Math.min(...temperatures);
  const hi = Math.max(...temperatures);
  const pad = 0.1 * Math.max(1, hi - lo);
  const grid = Array.from({ length: 121 }, (_, i) => lo - pad + ((hi - lo + 2 * pad) * i) / 120);
  return { ...fit, temperatures, values, curve: { temperatures: grid, values: grid.map((t) => responseValue(fit.response, t)) } };
}

export function climateTrajectory(doc: LifeCycle, trajectory: WarmingTrajectory, initialTotal = 1000): ClimateTrajectoryResponse {
  const model = thermalModelOrBadRequest(doc);
  const { years, temperatures } = trajectoryTemperatures(trajectory);
  return atTemperatures(doc, () => ({ ...projectTrajectory(model, years, temperatures, initialTotal), timeStepUnit: doc.timeStepUnit }));
}
