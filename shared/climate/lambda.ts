/**
 * λ as a function of temperature: every vital rate with a thermal response is
 * evaluated at T, the others keep their values, and λ(T) is the dominant
 * eigenvalue of the matrix built from the arrows. Pure maths on Float64Array.
 *
 * Hazards: a response that applies to a hazard gives h(T) per time step and
 * the rate becomes the survival probability exp(−h(T)·Δt) with Δt = one time
 * step — this keeps probabilities in [0, 1] (METHODS.md §3). A response
 * applied to a probability directly is clamped to [0, 1], and each clamp is
 * reported.
 */
import { dominantEigenDense, PerronSolver } from "../demography/eigen";
import { compileLifeCycle, rateScale, type CompiledLifeCycle, type LifeCycle } from "../lifecycle";
import type { ThermalResponse } from "../lifecycle/thermal";
import { brentRoot, goldenMaximum } from "../demography/roots";
import { responseOptimum, responseSlope, responseValue } from "./responses";

/** |λ − 1| at a window edge is at most this. */
export const EDGE_TOLERANCE = 1e-9;
export const MAX_CURVE_POINTS = 2000;
export const DEFAULT_CURVE_POINTS = 200;

interface ThermalSlot {
  slot: number;
  rateId: string;
  name: string;
  response: ThermalResponse;
  /** The rate is a probability (value in [0, 1]): results are kept in [0, 1]. */
  probability: boolean;
}

/** A rate pushed outside [0, 1] by its response and clamped. */
export interface ClampedRate {
  rateId: string;
  name: string;
  /** °C range over which the clamp applied (within the temperatures evaluated). */
  from: number;
  to: number;
  /** The largest unclamped value seen. */
  worst: number;
}

export interface ThermalModel {
  readonly n: number;
  readonly stageIds: readonly string[];
  readonly stageNames: readonly string[];
  readonly thermalRates: readonly { rateId: string; name: string; response: ThermalResponse; probability: boolean }[];
  /** Vital-rate values at T (°C); `onClamp` hears every clamped rate. */
  ratesAt(celsius: number, onClamp?: (slot: number, raw: number) => void): Float64Array;
  /** A(T), row-major n×n. */
  matrixAt(celsius: number, out?: Float64Array): Float64Array;
  /** λ(T). */
  lambdaAt(celsius: number): number;
  /** λ of a matrix of this model (e.g. from matrixAt), by the same warm-started solver; `a` is not changed. */
  lambdaOf(a: Float64Array): number;
  readonly compiled: CompiledLifeCycle;
  /** The warm-started λ solver behind lambdaAt (its `fallbacks` count is for the benchmark). */
  readonly perron: PerronSolver;
}


/** A thermal response gives a value λ cannot be computed from (infinite or not a number) at some temperature. */
export class ThermalValueError extends RangeError {
  constructor(
    readonly rateId: string,
    readonly rateName: string,
    readonly celsius: number,
    readonly value: number,
  ) {
    super(`At ${Number(celsius.toPrecision(6))} °C the temperature response of ${rateName} gives ${value}, too large to compute λ from: check its parameters.`);
  }
}

/** Compiles a life cycle for evaluation at many temperatures. Throws LifeCycleFormulaError for a broken formula. */
export function thermalModel(doc: LifeCycle): ThermalModel {
  const compiled = compileLifeCycle(doc);
  const n = doc.stages.length;
  const stageIndex = new Map(doc.stages.map((s, i) => [s.id, i]));
  const cells = Int32Array.from(doc.transitions, (t) => stageIndex.get(t.to)! * n + stageIndex.get(t.from)!);
  const slots: ThermalSlot[] = [];
  doc.rates.forEach((rate, slot) => {
    // A probability (the rate's scale, or inferred from its value) is kept in [0, 1].
    if (rate.thermal) slots.push({ slot, rateId: rate.id, name: rate.name, response: rate.thermal, probability: rateScale(rate) === "probability" });
  });
  const values = Float64Array.from(compiled.baseValues);

  const ratesAt = (celsius: number, onClamp?: (slot: number, raw: number) => void) => {
    for (const s of slots) {
      let v = responseValue(s.response, celsius);
      if (s.response.appliesTo === "hazard") v = Math.exp(-v);
      else if (s.probability && (v > 1 || v < 0)) {
        onClamp?.(s.slot, v);
        v = Math.min(1, Math.max(0, v));
      }
      if (!Number.isFinite(v)) throw new ThermalValueError(s.rateId, s.name, celsius, v);
      values[s.slot] = v;
    }
    return values;
  };
  const matrixAt = (celsius: number, out = new Float64Array(n * n)) => {
    const t = compiled.transitionValues(ratesAt(celsius));
    out.fill(0);
    for (let k = 0; k < cells.length; k++) out[cells[k]!]! += t[k]!;
    return out;
  };
  const scratch = new Float64Array(n * n);
  // λ(T) is asked at nearby temperatures: each call starts from the previous Perron vector.
  const warm = new PerronSolver(n, { follow: true });
  const perronRoot = (a: Float64Array) => warm.solve(a)!.lambda;
  return {
    n,
    stageIds: compiled.stageIds,
    stageNames: compiled.stageNames,
    thermalRates: slots.map(({ rateId, name, response, probability }) => ({ rateId, name, response, probability })),
    ratesAt,
    matrixAt,
    // λ alone (the Perron root, no eigenvectors): the hot path of curves, edges and optima.
    lambdaAt: (celsius) => (n === 0 ? NaN : perronRoot(matrixAt(celsius, scratch))),
    compiled,
    lambdaOf: (a) => (n === 0 ? NaN : perronRoot(a)),
    perron: warm,
  };
}

export interface WindowEdge {
  /** °C. */
  temperature: number;
  /** λ there (1 within EDGE_TOLERANCE). */
  lambda: number;
  /** "lower": λ rises through 1 here; "upper": λ falls through 1. */
  side: "lower" | "upper";
}

/** One stretch of temperatures with λ ≥ 1. An edge is null where the stretch runs to the end of the range. */
export interface PersistenceInterval {
  lower: WindowEdge | null;
  upper: WindowEdge | null;
  from: number;
  to: number;
}

export interface LambdaCurve {
  temperatures: number[];
  lambda: number[];
  /** Each thermal rate's value over the temperatures (after hazard conversion and clamping). */
  rates: { rateId: string; name: string; values: number[] }[];
  /** Stretches with λ ≥ 1, in order; empty when λ < 1 throughout. */
  window: PersistenceInterval[];
  /** Temperature of the highest λ in the range, °C, and λ there; `atBoundary` when it lies at an end of the range. */
  optimum: { temperature: number; lambda: number; atBoundary: boolean } | null;
  clamped: ClampedRate[];
}

export interface LambdaCurveOptions {
  min: number;
  max: number;
  points?: number;
}

/**
 * λ(T) over [min, max] at `points` evenly spaced temperatures, with the
 * persistence window (λ ≥ 1) whose edges are found by Brent's method inside
 * each grid interval where λ − 1 changes sign, and the optimum by
 * golden-section search around the best grid point.
 */
export function lambdaCurve(model: ThermalModel, options: LambdaCurveOptions): LambdaCurve {
  const points = options.points ?? DEFAULT_CURVE_POINTS;
  const { min, max } = options;
  if (!(max > min)) throw new RangeError("The highest temperature must lie above the lowest.");
  if (!Number.isInteger(points) || points < 3 || points > MAX_CURVE_POINTS) throw new RangeError(`Use 3 to ${MAX_CURVE_POINTS} points.`);
  const temperatures = Array.from({ length: points }, (_, i) => (i === points - 1 ? max : min + ((max - min) * i) / (points - 1)));
  const clampRanges = new Map<number, { from: number; to: number; worst: number }>();
  const slotIndex = new Map<number, number>();
  const thermalSlots = model.thermalRates.map((r) => model.compiled.rateIds.indexOf(r.rateId));
  thermalSlots.forEach((slot, k) => slotIndex.set(slot, k));
  const rateValues = model.thermalRates.map(() => new Array<number>(points));
  const lambda = new Array<number>(points);
  temperatures.forEach((T, i) => {
    const x = model.ratesAt(T, (slot, raw) => {
      const c = clampRanges.get(slot);
      if (c) {
        c.to = T;
        if (Math.abs(raw - 0.5) > Math.abs(c.worst - 0.5)) c.worst = raw;
      } else clampRanges.set(slot, { from: T, to: T, worst: raw });
    });
    thermalSlots.forEach((slot, k) => (rateValues[k]![i] = x[slot]!));
    lambda[i] = model.lambdaAt(T);
  });

  const g = (T: number) => model.lambdaAt(T) - 1;
  const edge = (a: number, b: number, side: "lower" | "upper"): WindowEdge => {
    const root = brentRoot(g, a, b, { ftol: EDGE_TOLERANCE / 10, xtol: 1e-13 });
    return { temperature: root.x, lambda: root.fx + 1, side };
  };
  const window: PersistenceInterval[] = [];
  let open: { lower: WindowEdge | null; from: number } | null = lambda[0]! >= 1 ? { lower: null, from: min } : null;
  for (let i = 1; i < points; i++) {
    const a = lambda[i - 1]!;
    const b = lambda[i]!;
    if (a < 1 && b >= 1) {
      const e = b === 1 ? { temperature: temperatures[i]!, lambda: 1, side: "lower" as const } : edge(temperatures[i - 1]!, temperatures[i]!, "lower");
      open = { lower: e, from: e.temperature };
    } else if (a >= 1 && b < 1) {
      const e = a === 1 ? { temperature: temperatures[i - 1]!, lambda: 1, side: "upper" as const } : edge(temperatures[i - 1]!, temperatures[i]!, "upper");
      window.push({ lower: open?.lower ?? null, upper: e, from: open?.from ?? min, to: e.temperature });
      open = null;
    }
  }
  if (open) window.push({ lower: open.lower, upper: null, from: open.from, to: max });

  let best = -1;
  lambda.forEach((l, i) => {
    if (Number.isFinite(l) && (best < 0 || l > lambda[best]!)) best = i;
  });
  let optimum: LambdaCurve["optimum"] = null;
  if (best >= 0) {
    const lo = temperatures[Math.max(0, best - 1)]!;
    const hi = temperatures[Math.min(points - 1, best + 1)]!;
    const m = goldenMaximum((T) => model.lambdaAt(T), lo, hi, 1e-6 * Math.max(1, max - min));
    const gridBest = { x: temperatures[best]!, fx: lambda[best]! };
    const pick = m.fx >= gridBest.fx ? m : gridBest;
    const atBoundary = (best === 0 || best === points - 1) && Math.min(pick.x - min, max - pick.x) < 1e-6 * (max - min);
    optimum = { temperature: pick.x, lambda: pick.fx, atBoundary };
  }

  const clamped: ClampedRate[] = [];
  for (const [slot, c] of clampRanges) {
    const r = model.thermalRates[slotIndex.get(slot)!]!;
    clamped.push({ rateId: r.rateId, name: r.name, from: c.from, to: c.to, worst: c.worst });
  }
  return {
    temperatures,
    lambda,
    rates: model.thermalRates.map((r, k) => ({ rateId: r.rateId, name: r.name, values: rateValues[k]! })),
    window,
    optimum,
    clamped,
  };
}

export interface LambdaSlope {
  temperature: number;
  lambda: number;
  /** dλ/dT, per °C. */
  slope: number;
  /** Each thermal rate's part of the slope, (∂λ/∂x)(dx/dT), per °C. */
  contributions: { rateId: string; name: string; value: number; rateSlope: number; sensitivity: number; contribution: number }[];
}

/** dλ/dT asked for at a temperature where λ is 0 (or not finite). */
export class SlopeUndefinedError extends RangeError {
  constructor(
    readonly celsius: number,
    readonly lambda: number,
  ) {
    super(`At ${Number(celsius.toPrecision(6))} °C λ is ${lambda}: nothing survives or reproduces there, so dλ/dT has no meaning. Choose a temperature for the slope where λ is above 0.`);
  }
}

/**
 * dλ/dT at T by the chain rule: Σ_k (∂λ/∂x_k)(dx_k/dT), with ∂λ/∂x_k from the
 * vital-rate sensitivities (Caswell 2001 §9) and dx_k/dT from the response
 * (d exp(−h)/dT = −exp(−h)·h′ for a hazard; 0 where a probability is clamped).
 */
export function lambdaSlope(model: ThermalModel, celsius: number): LambdaSlope {
  const { n } = model;
  if (n === 0) throw new RangeError("The life cycle has no stages.");
  let clampedSlots = new Set<number>();
  const x = Float64Array.from(model.ratesAt(celsius, (slot) => clampedSlots.add(slot)));
  const eig = dominantEigenDense(model.matrixAt(celsius), n, { second: false });
  const { w, v, lambda } = eig;
  // Sensitivities divide by λ: at a temperature where nothing survives or reproduces, the slope has no meaning.
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw new SlopeUndefinedError(celsius, lambda);
  let vw = 0;
  for (let i = 0; i < n; i++) vw += v[i]! * w[i]!;
  const S = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (v[i]! * w[j]!) / vw));
  const sens = model.compiled.vitalRateSensitivities(S, lambda, x);
  let slope = 0;
  const contributions = model.thermalRates.map((r) => {
    const slot = model.compiled.rateIds.indexOf(r.rateId);
    const value = x[slot]!;
    let rateSlope = responseSlope(r.response, celsius);
    if (r.response.appliesTo === "hazard") rateSlope = -value * rateSlope;
    else if (clampedSlots.has(slot)) rateSlope = 0;
    const sensitivity = sens[slot]!.sensitivity;
    const contribution = sensitivity * rateSlope;
    slope += contribution;
    return { rateId: r.rateId, name: r.name, value, rateSlope, sensitivity, contribution };
  });
  clampedSlots = new Set();
  return { temperature: celsius, lambda, slope, contributions };
}

/** Each thermal rate's optimum by its published formula (°C), for display beside λ's optimum. */
export function responseOptima(model: ThermalModel): { rateId: string; name: string; optimum: number | null }[] {
  return model.thermalRates.map((r) => ({ rateId: r.rateId, name: r.name, optimum: responseOptimum(r.response) }));
}
