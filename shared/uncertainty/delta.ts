/**
 * Delta method (first-order propagation of the vital rates' sampling
 * uncertainty; Caswell 2001 §9.7, Var(λ) ≈ Σ_ij Cov(x_i, x_j) ∂λ/∂x_i ∂λ/∂x_j):
 * Var(y) ≈ gᵀ Σ g with g the gradient of a result y with respect to the
 * uncertain rates and Σ_ij = r_ij sd_i sd_j. For λ the gradient is the
 * vital-rate sensitivity through the formulas (exact derivatives); for R0 and
 * the generation times it is a central finite difference with a step of
 * 1/1000 of the rate's SD (one-sided at a bound). Intervals are
 * estimate ± z·SE; P(λ < 1) = Φ((1 − λ)/SE(λ)). Both assume a roughly normal
 * λ: a Monte Carlo Run checks that when the SEs are large.
 */
import { buildMatrices, compileLifeCycle, type CompiledLifeCycle, type LifeCycle } from "../lifecycle/index";
import { drawEvaluator, ratesUsedByFormulas, type DrawEvaluator, type DrawResult } from "./evaluate";
import { normalCdf, normalQuantile } from "../stats/normal";
import { uncertaintyModel, type UncertaintyIssue, type UncertaintyModel, type UncertaintySource } from "./laws";

export const DELTA_LEVEL = 0.95;

/** An estimate with its delta-method SE and interval. */
export interface DeltaEstimate {
  estimate: number;
  se: number;
  lower: number;
  upper: number;
}

export interface DeltaContribution {
  rateId: string;
  name: string;
  source: UncertaintySource;
  /** The rate's value and the SD of its uncertainty (rate units). */
  value: number;
  sd: number;
  /** ∂λ/∂x at the rate's value. */
  sensitivity: number;
  /** Share of Var(λ) due to this rate, g_i (Σg)_i / Var(λ); the shares sum to 1. */
  varianceShare: number;
}

export interface DeltaMethodResult {
  /** Level of every interval (0.95). */
  level: number;
  /** null with `reason` when no interval can be given. */
  lambda: (DeltaEstimate & { probabilityBelowOne: number }) | null;
  netReproductiveRate: DeltaEstimate | null;
  generationTimeR0: DeltaEstimate | null;
  meanAgeOfParents: DeltaEstimate | null;
  /** One per rate with uncertainty, largest share first. */
  contributions: DeltaContribution[];
  /** Rates some formula uses that carry no uncertainty (treated as exact). */
  ratesWithoutUncertainty: string[];
  issues: UncertaintyIssue[];
  reason: string | null;
}

export interface DeltaInput {
  compiled: CompiledLifeCycle;
  evaluator: DrawEvaluator;
  model: UncertaintyModel;
  /** ∂λ/∂x for every rate (document order), at the document's values. */
  lambdaSensitivity: readonly number[];
  /** Names of rates some formula uses. */
  usedRateNames: readonly string[];
}

/** First-order intervals for λ, R0 and the generation times from the rates' uncertainty. */
export function deltaMethod(input: DeltaInput): DeltaMethodResult {
  const { compiled, evaluator, model } = input;
  const used = new Set(input.usedRateNames);
  const uncertain = new Set(model.rates.map((r) => r.name));
  const errored = new Set(model.issues.filter((i) => i.severity === "error" && i.rateId !== null).map((i) => i.rateId));
  const ratesWithoutUncertainty = compiled.rateNames.filter((name, i) => used.has(name) && !uncertain.has(name) && !errored.has(compiled.rateIds[i]!));
  const empty = (reason: string): DeltaMethodResult => ({
    level: DELTA_LEVEL,
    lambda: null,
    netReproductiveRate: null,
    generationTimeR0: null,
    meanAgeOfParents: null,
    contributions: [],
    ratesWithoutUncertainty,
    issues: model.issues,
    reason,
  });
  const rates = model.rates.filter((r) => used.has(r.name));
  if (rates.length === 0) return empty(model.rates.length > 0 ? "No rate with uncertainty is used by an arrow's formula." : "No vital rate used by the arrows has an SE, CI, counts or distribution.");
  if (model.issues.some((i) => i.severity === "error" && i.path[0] === "correlations")) return empty("The correlations between rates are inconsistent (see the message above); no interval until they are fixed.");

  const m = model.rates.length;
  const z = normalQuantile(0.5 + DELTA_LEVEL / 2);
  const cov = (i: number, j: number) => model.correlation[i * m + j]! * model.rates[i]!.sd * model.rates[j]!.sd;
  const quadratic = (g: Float64Array) => {
    let s = 0;
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) s += g[i]! * cov(i, j) * g[j]!;
    return Math.max(0, s);
  };

  const base = compiled.baseValues;
  const g = Float64Array.from(model.rates, (r) => input.lambdaSensitivity[r.index] ?? NaN);
  if (g.some((x) => !Number.isFinite(x))) return empty("λ has no derivative with respect to some uncertain rate here (see the vital-rate sensitivities).");
  const at = evaluator.evaluate(base);
  const varLambda = quadratic(g);
  const seLambda = Math.sqrt(varLambda);
  const lambda = at.lambda;
  const sigmaG = new Float64Array(m);
  for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) sigmaG[i] = sigmaG[i]! + cov(i, j) * g[j]!;
  const contributions: DeltaContribution[] = model.rates
    .map((r, i) => ({ r, i }))
    .filter(({ r }) => used.has(r.name))
    .map(({ r, i }) => ({
      rateId: r.rateId,
      name: r.name,
      source: r.source,
      value: base[r.index]!,
      sd: r.sd,
      sensitivity: g[i]!,
      varianceShare: varLambda > 0 ? (g[i]! * sigmaG[i]!) / varLambda : 0,
    }))
    .sort((p, q) => Math.abs(q.varianceShare) - Math.abs(p.varianceShare));

  // Numerical gradients of the life-history results.
  const gR0 = new Float64Array(m);
  const gT = new Float64Array(m);
  const gTbar = new Float64Array(m);
  const x = Float64Array.from(base);
  const scratch = { hi: null as DrawResult | null, lo: null as DrawResult | null };
  let failed = false;
  model.rates.forEach((r, i) => {
    if (failed) return;
    const x0 = base[r.index]!;
    const h = Math.max(r.sd * 1e-3, 1e-9 * Math.max(1, Math.abs(x0)));
    const up = Math.min(x0 + h, r.upper);
    const down = Math.max(x0 - h, r.lower);
    if (!(up > down)) return;
    try {
      x[r.index] = up;
      const hi = evaluator.evaluate(x, scratch.hi ?? undefined);
      scratch.hi = hi;
      const hiVals = [hi.r0, hi.generationTimeR0, hi.meanAgeOfParents];
      x[r.index] = down;
      const lo = evaluator.evaluate(x, scratch.lo ?? undefined);
      scratch.lo = lo;
      const step = up - down;
      gR0[i] = (hiVals[0]! - lo.r0) / step;
      gT[i] = (hiVals[1]! - lo.generationTimeR0) / step;
      gTbar[i] = (hiVals[2]! - lo.meanAgeOfParents) / step;
    } catch {
      failed = true;
    } finally {
      x[r.index] = x0;
    }
  });
  const estimate = (value: number, grad: Float64Array): DeltaEstimate | null => {
    if (failed || !Number.isFinite(value) || grad.some((v) => !Number.isFinite(v))) return null;
    const se = Math.sqrt(quadratic(grad));
    return { estimate: value, se, lower: value - z * se, upper: value + z * se };
  };

  return {
    level: DELTA_LEVEL,
    lambda: {
      estimate: lambda,
      se: seLambda,
      lower: lambda - z * seLambda,
      upper: lambda + z * seLambda,
      probabilityBelowOne: seLambda > 0 ? normalCdf((1 - lambda) / seLambda) : lambda < 1 ? 1 : 0,
    },
    netReproductiveRate: estimate(at.r0, gR0),
    generationTimeR0: estimate(at.generationTimeR0, gT),
    meanAgeOfParents: estimate(at.meanAgeOfParents, gTbar),
    contributions,
    ratesWithoutUncertainty,
    issues: model.issues,
    reason: null,
  };
}

/**
 * The delta method for a whole document, or null when no rate gives any
 * uncertainty (nothing to show). `lambdaSensitivity` (∂λ/∂x per rate, in
 * document order) saves recomputing it when the analysis has it. Throws
 * LifeCycleFormulaError when the formulas cannot be computed.
 */
export function lifeCycleDeltaMethod(doc: LifeCycle, lambdaSensitivity?: readonly number[]): DeltaMethodResult | null {
  const model = uncertaintyModel(doc);
  if (model.rates.length === 0 && model.issues.length === 0) return null;
  const compiled = compileLifeCycle(doc);
  const used = ratesUsedByFormulas(doc);
  const evaluator = drawEvaluator(compiled, buildMatrices(doc).entries, doc.transitions.map((t) => t.rate), []);
  let sensitivity = lambdaSensitivity;
  if (sensitivity === undefined) {
    const at = evaluator.evaluate(compiled.baseValues);
    const n = evaluator.n;
    let vw = 0;
    for (let i = 0; i < n; i++) vw += at.v[i]! * at.w[i]!;
    const S = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (at.v[i]! * at.w[j]!) / vw));
    sensitivity = compiled.vitalRateSensitivities(S, at.lambda).map((r) => r.sensitivity);
  }
  const usedRateNames = used.map((i) => compiled.rateNames[i]!);
  return deltaMethod({ compiled, evaluator, model, lambdaSensitivity: sensitivity, usedRateNames });
}
