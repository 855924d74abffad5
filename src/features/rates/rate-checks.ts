/**
 * Checks of the Rates table as the person types: names, numbers, and the
 * probability warning. Pure functions of the document, so they are tested
 * without a browser.
 */
import { checkFormula, rateNameProblem, type LifeCycle, type Transition } from "../../../shared/lifecycle";
import type { Expr } from "../../../shared/lifecycle/formula";

export { parseNumberInput } from "../../lib/number-input";

/** Why `name` cannot be the name of rate `rateId`, or null when it can. */
export function rateNameError(doc: LifeCycle, rateId: string, name: string): string | null {
  const problem = rateNameProblem(name);
  if (problem !== null) return problem;
  const twin = doc.rates.find((r) => r.name === name && r.id !== rateId);
  return twin === undefined ? null : `Another vital rate is already named ${name}; formulas need unique names.`;
}

/** A name no rate has yet: "r1", "r2", … */
export function freshRateName(doc: LifeCycle, stem = "r"): string {
  const taken = new Set(doc.rates.map((r) => r.name));
  let n = 1;
  while (taken.has(`${stem}${n}`)) n += 1;
  return `${stem}${n}`;
}

/** The rates a formula multiplies by directly: `s` and `g` in `s * g * 0.5`, none in `s + g` or `1 - s`. */
export function bareFactors(expr: Expr): string[] {
  if (expr.k === "rate") return [expr.name];
  if (expr.k === "mul") return [...bareFactors(expr.a), ...bareFactors(expr.b)];
  return [];
}

/** For each rate name, the arrows whose formula uses it (document order). */
export function arrowsUsingRates(doc: LifeCycle): Map<string, Transition[]> {
  const names = doc.rates.map((r) => r.name);
  const usage = new Map<string, Transition[]>(names.map((n) => [n, []]));
  for (const t of doc.transitions) {
    if (typeof t.rate !== "string") continue;
    const check = checkFormula(t.rate, names);
    if (!check.ok) continue;
    for (const name of check.compiled.rateNames) usage.get(name)?.push(t);
  }
  return usage;
}

/**
 * Warnings by rate id: a rate that a survival, growth, stasis or shrinkage
 * arrow multiplies by directly is a probability, so a value outside [0, 1]
 * is most likely a mistake (a percentage, or a fecundity in the wrong row).
 */
export function probabilityWarnings(doc: LifeCycle): Map<string, string> {
  const asProbability = new Map<string, Transition>();
  const names = doc.rates.map((r) => r.name);
  for (const t of doc.transitions) {
    if (t.kind === "reproduction" || typeof t.rate !== "string") continue;
    const check = checkFormula(t.rate, names);
    if (!check.ok) continue;
    for (const name of bareFactors(check.compiled.expr)) if (!asProbability.has(name)) asProbability.set(name, t);
  }
  const stageName = new Map(doc.stages.map((s) => [s.id, s.name]));
  const warnings = new Map<string, string>();
  for (const r of doc.rates) {
    const t = asProbability.get(r.name);
    if (t === undefined || (r.value >= 0 && r.value <= 1)) continue;
    const arrow = `${stageName.get(t.from) ?? "?"} → ${stageName.get(t.to) ?? "?"}`;
    warnings.set(
      r.id,
      `The ${t.kind} arrow ${arrow} multiplies by ${r.name}, so it acts as a probability and should lie between 0 and 1. ` +
        (r.value > 1 && r.value <= 100 ? "Was it typed as a percentage?" : "Check the value."),
    );
  }
  return warnings;
}
