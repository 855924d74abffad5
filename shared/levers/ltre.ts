/**
 * Fixed-design LTRE between two life cycles with the same stages (two sites,
 * two periods, treated and control): contributions of each matrix entry, and
 * — when both life cycles build their arrows from the same formulas — of each
 * vital rate, c_k = (x_k(m) − x_k(r)) ∂λ/∂x_k at the midpoint of the rates
 * (Caswell 2001 §10.1.2). Stages are matched by name, in the reference's order.
 */
import { ltreContributions, LtreError, midpointSensitivities, type LtreResult } from "../demography";
import { buildMatrices, compileLifeCycle, type LifeCycle } from "../lifecycle";
import { LeverError } from "./model";

export interface RateContribution {
  readonly name: string;
  readonly reference: number;
  readonly comparison: number;
  /** ∂λ/∂x at the midpoint rates. */
  readonly sensitivity: number;
  /** (x(m) − x(r)) ∂λ/∂x, units of λ. */
  readonly contribution: number;
}

export interface LifeCycleLtre extends LtreResult {
  readonly stageNames: string[];
  readonly referenceName: string;
  readonly comparisonName: string;
  /** Per vital rate, when both life cycles share their formulas; else null with `rateNote`. */
  readonly rates: RateContribution[] | null;
  /** Σ of the rate contributions. */
  readonly ratesTotal: number | null;
  readonly rateNote: string | null;
}

const stageKey = (name: string) => name.trim().toLowerCase();

function matricesOf(doc: LifeCycle, which: string): number[][] {
  const m = buildMatrices(doc);
  if (m.errors.length > 0) throw new LeverError(`The ${which} life cycle "${doc.name}" cannot be analysed: ${m.errors[0]!.message}`);
  return m.A;
}

/** Fixed-design LTRE of `comparison` against `reference`. Throws LeverError listing the stages that do not match. */
export function lifeCycleLtre(reference: LifeCycle, comparison: LifeCycle): LifeCycleLtre {
  if (reference.stages.length === 0) throw new LeverError(`"${reference.name}" has no stages yet.`);
  const refKeys = reference.stages.map((s) => stageKey(s.name));
  const cmpIndex = new Map(comparison.stages.map((s, i) => [stageKey(s.name), i]));
  const refSet = new Set(refKeys);
  const onlyRef = reference.stages.filter((s) => !cmpIndex.has(stageKey(s.name))).map((s) => s.name);
  const onlyCmp = comparison.stages.filter((s) => !refSet.has(stageKey(s.name))).map((s) => s.name);
  if (onlyRef.length > 0 || onlyCmp.length > 0) {
    const parts: string[] = [];
    if (onlyRef.length > 0) parts.push(`only in "${reference.name}": ${onlyRef.join(", ")}`);
    if (onlyCmp.length > 0) parts.push(`only in "${comparison.name}": ${onlyCmp.join(", ")}`);
    throw new LeverError(`An LTRE compares life cycles with the same stages, and these differ — ${parts.join("; ")}. Rename or add stages so both have the same set.`, ["comparison", "stages"]);
  }
  const perm = refKeys.map((k) => cmpIndex.get(k)!);
  const Ar = matricesOf(reference, "reference");
  const AmRaw = matricesOf(comparison, "comparison");
  const Am = perm.map((pi) => perm.map((pj) => AmRaw[pi]![pj]!));
  let result: LtreResult;
  try {
    result = ltreContributions(Ar, Am);
  } catch (err) {
    if (err instanceof LtreError) throw new LeverError(err.message);
    throw err;
  }

  // Vital-rate level: same rate names and the same arrows with the same formulas.
  let rates: RateContribution[] | null = null;
  let ratesTotal: number | null = null;
  let rateNote: string | null = null;
  const arrowKey = (doc: LifeCycle) => {
    const name = new Map(doc.stages.map((s) => [s.id, stageKey(s.name)]));
    return doc.transitions.map((t) => `${name.get(t.from)}|${name.get(t.to)}|${t.kind}|${String(t.rate).replace(/\s+/g, "")}`).sort().join("\n");
  };
  const refRates = reference.rates.map((r) => r.name).sort().join(",");
  const cmpRates = comparison.rates.map((r) => r.name).sort().join(",");
  if (reference.rates.length === 0) rateNote = "The life cycles have no named vital rates, so only the matrix entries are compared.";
  else if (refRates !== cmpRates || arrowKey(reference) !== arrowKey(comparison)) {
    rateNote = "The two life cycles do not build their arrows from the same vital rates and formulas, so only the matrix entries are compared.";
  } else {
    const compiled = compileLifeCycle(reference);
    const cmpValue = new Map(comparison.rates.map((r) => [r.name, r.value]));
    const xr = compiled.baseValues;
    const xm = Float64Array.from(compiled.rateNames, (name) => cmpValue.get(name)!);
    const mid = Float64Array.from(xr, (x, k) => (x + xm[k]!) / 2);
    const A = compiled.evaluate(mid).A;
    const n = A.length;
    const dense = new Float64Array(n * n);
    A.forEach((row, i) => row.forEach((v, j) => (dense[i * n + j] = v)));
    const at = midpointSensitivities(dense, n);
    if (at === null) rateNote = "λ at the midpoint rates has no derivatives, so the vital rates cannot be compared.";
    else {
      const sens = compiled.vitalRateSensitivities(at.sensitivity, at.lambda, mid);
      rates = sens.map((s, k) => ({
        name: s.name,
        reference: xr[k]!,
        comparison: xm[k]!,
        sensitivity: s.sensitivity,
        contribution: (xm[k]! - xr[k]!) * s.sensitivity,
      }));
      ratesTotal = rates.reduce((t, r) => t + r.contribution, 0);
    }
  }
  return {
    ...result,
    stageNames: reference.stages.map((s) => s.name),
    referenceName: reference.name,
    comparisonName: comparison.name,
    rates,
    ratesTotal,
    rateNote,
  };
}
