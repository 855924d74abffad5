/**
 * Fitting a thermal response to measurements of a rate at several
 * temperatures by nonlinear least squares (Levenberg–Marquardt, from
 * ml-levenberg-marquardt), with standard errors from the Jacobian at the
 * optimum: SE = √diag((JᵀJ)⁻¹ · RSS/(n − p)) (e.g. Bates & Watts 1988,
 * "Nonlinear Regression Analysis", §2.3). The package's own error figure is
 * the residual sum of squares, not a standard error, so the Jacobian here is
 * our own (central differences, step relative to each parameter).
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { inverse, Matrix } from "ml-matrix";
import type { ThermalForm, ThermalResponse, ThermalTarget } from "../lifecycle/thermal";
import { RESPONSE_DEFAULTS, THERMAL_PARAMETERS } from "./defaults";
import { BOLTZMANN_EV, kelvin, responseValue } from "./responses";

export interface FitParameter {
  key: string;
  label: string;
  unit: string;
}

/** The order in which each form's parameters are fitted (that of `build`). Schoolfield and Arrhenius keep T_ref fixed. */
const FIT_ORDER: Record<ThermalForm, string[]> = {
  arrhenius: ["valueAtReference", "activationEnergy"],
  schoolfield: ["valueAtReference", "activationEnergy", "inactivationEnergy", "inactivationTemperature"],
  "gaussian-quadratic": ["valueAtOptimum", "optimum", "width", "criticalMaximum"],
  briere: ["coefficient", "lower", "upper"],
};

/** The parameters each form fits, in order, labelled as the response form labels them. */
export const FIT_PARAMETERS = Object.fromEntries(
  (Object.keys(FIT_ORDER) as ThermalForm[]).map((form) => [
    form,
    FIT_ORDER[form].map((key): FitParameter => {
      const p = THERMAL_PARAMETERS[form].find((q) => q.key === key)!;
      return { key, label: p.label, unit: p.unit || "rate units" };
    }),
  ]),
) as Record<ThermalForm, FitParameter[]>;

export interface FitOptions {
  form: ThermalForm;
  appliesTo?: ThermalTarget;
  /** Reference temperature (°C) for Arrhenius and Schoolfield; default: the mean measured temperature, rounded. */
  referenceTemperature?: number;
  /** Start values by parameter key; missing ones are guessed from the data. */
  start?: Record<string, number>;
  maxIterations?: number;
}

export interface FitResult {
  form: ThermalForm;
  converged: boolean;
  /** Why the fit is not trusted, when it is not. */
  problem: string | null;
  /** The fitted (or, when not converged, the last) response. */
  response: ThermalResponse;
  estimates: { key: string; label: string; unit: string; estimate: number; se: number | null }[];
  n: number;
  p: number;
  rss: number;
  /** Residual standard error √(RSS/(n − p)). */
  sigma: number | null;
  iterations: number;
  fitted: number[];
  residuals: number[];
}

/** Minimum points beyond the number of parameters, so SEs have degrees of freedom. */
export const MIN_EXTRA_POINTS = 1;

function build(form: ThermalForm, p: readonly number[], appliesTo: ThermalTarget, Tref: number): ThermalResponse {
  switch (form) {
    case "arrhenius":
      return { form, appliesTo, valueAtReference: p[0]!, activationEnergy: p[1]!, referenceTemperature: Tref };
    case "schoolfield":
      return { form, appliesTo, valueAtReference: p[0]!, activationEnergy: p[1]!, inactivationEnergy: p[2]!, inactivationTemperature: p[3]!, referenceTemperature: Tref };
    case "gaussian-quadratic":
      return { form, appliesTo, valueAtOptimum: p[0]!, optimum: p[1]!, width: p[2]!, criticalMaximum: p[3]! };
    case "briere":
      return { form, appliesTo, coefficient: p[0]!, lower: p[1]!, upper: p[2]! };
  }
}

/** Arrhenius start: ordinary least squares of ln y on −1/(kT) − (−1/(kT_ref)) over the positive y. */
function arrheniusStart(T: readonly number[], y: readonly number[], Tref: number): [number, number] {
  const xs: number[] = [];
  const ys: number[] = [];
  T.forEach((t, i) => {
    if (y[i]! > 0) {
      xs.push(-(1 / kelvin(t) - 1 / kelvin(Tref)) / BOLTZMANN_EV);
      ys.push(Math.log(y[i]!));
    }
  });
  const typicalE = RESPONSE_DEFAULTS.activationEnergy.value;
  if (xs.length < 2) return [Math.max(1e-6, Math.max(...y)), typicalE];
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxy = 0;
  let sxx = 0;
  xs.forEach((x, i) => {
    sxy += (x - mx) * (ys[i]! - my);
    sxx += (x - mx) ** 2;
  });
  const E = sxx > 0 ? sxy / sxx : typicalE;
  return [Math.exp(my - E * mx), E > 0.01 ? E : typicalE];
}

function guess(form: ThermalForm, T: readonly number[], y: readonly number[], Tref: number): number[] {
  const iMax = y.reduce((best, v, i) => (v > y[best]! ? i : best), 0);
  const Tpeak = T[iMax]!;
  const ymax = y[iMax]!;
  const Tmin = Math.min(...T);
  const Tmax = Math.max(...T);
  const span = Math.max(1, Tmax - Tmin);
  switch (form) {
    case "arrhenius":
      return arrheniusStart(T, y, Tref);
    case "schoolfield": {
      const rising = T.map((t, i) => [t, y[i]!] as const).filter(([t]) => t <= Tpeak);
      const [r0, E] = rising.length >= 2 ? arrheniusStart(rising.map((p) => p[0]), rising.map((p) => p[1]), Tref) : arrheniusStart(T, y, Tref);
      return [r0, E, Math.max(3, 4 * E), Tpeak + 0.1 * span];
    }
    case "gaussian-quadratic":
      return [ymax, Tpeak, Math.max(0.5, (Tpeak - Tmin) / 3), Tpeak + Math.max(1, (Tmax - Tpeak) * 1.2)];
    case "briere": {
      const T0 = Math.max(0, Tmin - 0.1 * span);
      const TL = Tmax + 0.1 * span;
      // With T₀ and T_L fixed the model is linear in a: least squares a = Σ g y / Σ g².
      let gy = 0;
      let gg = 0;
      T.forEach((t, i) => {
        const g = t > T0 && t < TL ? t * (t - T0) * Math.sqrt(TL - t) : 0;
        gy += g * y[i]!;
        gg += g * g;
      });
      return [gg > 0 && gy > 0 ? gy / gg : 1e-4, T0, TL];
    }
  }
}

/** Scale on which each parameter moves: relative for positive scale parameters, 10 °C for temperatures. */
function scales(form: ThermalForm, start: readonly number[]): number[] {
  const temps = new Set(["optimum", "criticalMaximum", "lower", "upper", "inactivationTemperature", "width"]);
  return FIT_PARAMETERS[form].map((p, k) => (temps.has(p.key) ? 10 : Math.max(Math.abs(start[k]!), 1e-12)));
}

/** Central-difference Jacobian of the model at the data temperatures, n × p. */
export function modelJacobian(model: (p: readonly number[], T: number) => number, p: readonly number[], T: readonly number[], steps: readonly number[]): number[][] {
  return T.map((t) =>
    p.map((_, k) => {
      const h = steps[k]!;
      const up = [...p];
      const down = [...p];
      up[k]! += h;
      down[k]! -= h;
      return (model(up, t) - model(down, t)) / (2 * h);
    }),
  );
}

/**
 * Fits `form` to (temperature °C, value) pairs. Never throws for data that
 * do not fit: a fit that does not reach a stationary point, or whose JᵀJ is
 * singular, comes back with converged = false, the last estimate and the reason.
 */
export function fitThermalResponse(temperatures: readonly number[], values: readonly number[], options: FitOptions): FitResult {
  const { form } = options;
  const appliesTo = options.appliesTo ?? "rate";
  const n = temperatures.length;
  const params = FIT_PARAMETERS[form];
  const p = params.length;
  if (values.length !== n) throw new RangeError("Give one value per temperature.");
  if (n < p + MIN_EXTRA_POINTS) throw new RangeError(`The ${form} form has ${p} parameters to fit; give at least ${p + MIN_EXTRA_POINTS} measurements.`);
  const Tref = options.referenceTemperature ?? Math.round(temperatures.reduce((a, b) => a + b, 0) / n);
  const model = (q: readonly number[], T: number) => responseValue(build(form, q, appliesTo, Tref), T);

  const start = guess(form, temperatures, values, Tref);
  params.forEach((param, k) => {
    const s = options.start?.[param.key];
    if (s !== undefined && Number.isFinite(s)) start[k] = s;
  });
  const scale = scales(form, start);
  const yScale = Math.max(...values.map(Math.abs), 1e-300);
  // Work on θ = p / scale and y / yScale, so the damping treats every parameter alike.
  const minValues = params.map((param) => (["lower"].includes(param.key) ? 0 : ["optimum", "criticalMaximum", "upper", "inactivationTemperature"].includes(param.key) ? -60 : 1e-12));
  const maxValues = params.map((param) => (["optimum", "criticalMaximum", "upper", "inactivationTemperature", "lower"].includes(param.key) ? 80 : param.key.endsWith("Energy") ? 20 : Number.MAX_VALUE));
  const maxIterations = options.maxIterations ?? 500;
  const fit = levenbergMarquardt(
    { x: temperatures as number[], y: values.map((v) => v / yScale) },
    (theta: number[]) => (T: number) => model(theta.map((t, k) => t * scale[k]!), T) / yScale,
    {
      initialValues: start.map((s, k) => s / scale[k]!),
      minValues: minValues.map((m, k) => m / scale[k]!),
      maxValues: maxValues.map((m, k) => m / scale[k]!),
      damping: 1e-2,
      gradientDifference: 1e-6,
      centralDifference: true,
      maxIterations,
      errorTolerance: 0,
      improvementThreshold: 1e-3,
    },
  );
  const estimate = fit.parameterValues.map((t, k) => t * scale[k]!);
  const response = build(form, estimate, appliesTo, Tref);
  const fitted = temperatures.map((T) => model(estimate, T));
  const residuals = values.map((v, i) => v - fitted[i]!);
  const rss = residuals.reduce((s, r) => s + r * r, 0);
  const df = n - p;
  const sigma = df > 0 ? Math.sqrt(rss / df) : null;

  let problem: string | null = null;
  let ses: (number | null)[] = params.map(() => null);
  const finite = estimate.every(Number.isFinite) && Number.isFinite(rss);
  if (!finite) problem = "The fit diverged: the estimates are not finite numbers.";
  else {
    const steps = estimate.map((e, k) => 1e-6 * Math.max(Math.abs(e), scale[k]! * 1e-3));
    const J = modelJacobian(model, estimate, temperatures, steps);
    const Jm = new Matrix(J);
    const JtJ = Jm.transpose().mmul(Jm);
    // Stationarity (first-order) test as in MINPACK's gtol (Moré, Garbow & Hillstrom 1980): the cosine of
    // the angle between the residual vector and each Jacobian column is near 0 at a least-squares optimum.
    const rnorm = Math.sqrt(rss);
    let worstCos = 0;
    for (let k = 0; k < p; k++) {
      let dot = 0;
      let col = 0;
      for (let i = 0; i < n; i++) {
        dot += J[i]![k]! * residuals[i]!;
        col += J[i]![k]! ** 2;
      }
      if (col > 0 && rnorm > 0) worstCos = Math.max(worstCos, Math.abs(dot) / (Math.sqrt(col) * rnorm));
      if (!(col > 0)) problem = `The data do not determine ${params[k]!.label.toLowerCase()}: the fitted curve does not change with it at these temperatures.`;
    }
    const atBound = estimate.some((e, k) => Math.abs(e - minValues[k]!) < 1e-9 * scale[k]! || Math.abs(e - maxValues[k]!) < 1e-9 * scale[k]!);
    if (problem === null && worstCos > 1e-3) problem = `The fit stopped after ${fit.iterations} iterations before reaching a least-squares optimum (gradient test ${worstCos.toExponential(1)} > 1e-3). Try other start values or another form.`;
    if (problem === null && atBound) problem = "An estimate sits on the edge of its allowed range; the fit is not a free optimum.";
    if (problem === null && df > 0) {
      try {
        const cov = inverse(JtJ).mul(rss / df);
        ses = params.map((_, k) => {
          const v = cov.get(k, k);
          return v >= 0 && Number.isFinite(v) ? Math.sqrt(v) : null;
        });
        if (ses.some((s) => s === null)) problem = "JᵀJ is singular at the estimate: the parameters are not separately identifiable from these data.";
      } catch {
        problem = "JᵀJ is singular at the estimate: the parameters are not separately identifiable from these data.";
      }
    }
  }
  return {
    form,
    converged: problem === null,
    problem,
    response,
    estimates: params.map((param, k) => ({ ...param, estimate: estimate[k]!, se: problem === null ? ses[k]! : null })),
    n,
    p,
    rss,
    sigma,
    iterations: fit.iterations,
    fitted,
    residuals,
  };
}
