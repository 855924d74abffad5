/**
 * Scenario edits on the life-cycle document (pure functions: document in,
 * document out), and the check of a change before it is added: the same
 * rules the server applies (LifeCycleSchema's scenario rules for rates,
 * applyScenario for entries), so a refusal names the rate or entry and the
 * bound right under the form.
 */
import { LifeCycleSchema, newId, type LifeCycle, type Scenario, type ScenarioChange, type ScenarioTarget } from "../../../shared/lifecycle";
import { applyScenario, LeverError } from "../../../shared/levers";

export interface TargetOption {
  key: string;
  label: string;
  target: ScenarioTarget;
}

const stageName = (doc: LifeCycle, id: string) => doc.stages.find((s) => s.id === id)?.name ?? id;

/** The vital rates, then every matrix entry that has an arrow ("Adult → Eft"). */
export function targetOptions(doc: LifeCycle): TargetOption[] {
  const rates = doc.rates.map((r): TargetOption => ({ key: `rate:${r.id}`, label: `${r.name} (vital rate)`, target: { kind: "rate", rateId: r.id } }));
  const cells = new Map<string, TargetOption>();
  for (const t of doc.transitions) {
    const key = `entry:${t.from}>${t.to}`;
    if (!cells.has(key)) cells.set(key, { key, label: `${stageName(doc, t.from)} → ${stageName(doc, t.to)} (matrix entry)`, target: { kind: "entry", from: t.from, to: t.to } });
  }
  return [...rates, ...cells.values()];
}

/** Plain words for a change's target. */
export function targetLabel(doc: LifeCycle, target: ScenarioTarget): string {
  if (target.kind === "rate") return doc.rates.find((r) => r.id === target.rateId)?.name ?? `missing rate ${target.rateId}`;
  return `${stageName(doc, target.from)} → ${stageName(doc, target.to)}`;
}

/** "× 1.2", "+ 0.05", "= 0.8". */
export function opText(op: ScenarioChange["op"], amount: number): string {
  return `${op === "multiply" ? "×" : op === "add" ? (amount < 0 ? "−" : "+") : "="} ${op === "add" ? Math.abs(amount) : amount}`;
}

const withScenarios = (doc: LifeCycle, scenarios: Scenario[]): LifeCycle => {
  const next: LifeCycle = { ...doc, scenarios };
  if (scenarios.length === 0) delete next.scenarios;
  return next;
};

export function addScenario(doc: LifeCycle, name: string): { document: LifeCycle; id: string } {
  const id = newId("sc");
  return { document: withScenarios(doc, [...(doc.scenarios ?? []), { id, name, changes: [] }]), id };
}

/** A name no scenario uses yet: "Scenario 1", "Scenario 2", … */
export function freshScenarioName(doc: LifeCycle): string {
  const used = new Set((doc.scenarios ?? []).map((s) => s.name));
  let k = (doc.scenarios?.length ?? 0) + 1;
  while (used.has(`Scenario ${k}`)) k += 1;
  return `Scenario ${k}`;
}

export function updateScenario(doc: LifeCycle, id: string, patch: (s: Scenario) => Scenario): LifeCycle {
  return withScenarios(
    doc,
    (doc.scenarios ?? []).map((s) => (s.id === id ? patch(s) : s)),
  );
}

export function removeScenario(doc: LifeCycle, id: string): LifeCycle {
  return withScenarios(
    doc,
    (doc.scenarios ?? []).filter((s) => s.id !== id),
  );
}

/**
 * Why a scenario, as it would be after an edit, cannot be kept: the first
 * problem the document's rules or applying it finds, in words; null when it
 * is fine.
 */
export function scenarioProblem(doc: LifeCycle, scenario: Scenario): string | null {
  const index = (doc.scenarios ?? []).findIndex((s) => s.id === scenario.id);
  const scenarios = [...(doc.scenarios ?? [])];
  if (index < 0) scenarios.push(scenario);
  else scenarios[index] = scenario;
  const parsed = LifeCycleSchema.safeParse({ ...doc, scenarios });
  if (!parsed.success) {
    const at = index < 0 ? scenarios.length - 1 : index;
    const issue = parsed.error.issues.find((i) => i.path[0] === "scenarios" && i.path[1] === at) ?? parsed.error.issues[0];
    return issue?.message ?? "The scenario breaks a rule of the life cycle.";
  }
  for (const achievable of [false, true]) {
    try {
      applyScenario(parsed.data, scenario, { achievable });
    } catch (err) {
      if (err instanceof LeverError) return err.message;
      throw err;
    }
  }
  return null;
}

export function newChange(target: ScenarioTarget, op: ScenarioChange["op"], value: number, achievable: number | undefined): ScenarioChange {
  return { id: newId("ch"), target, op, value, ...(achievable === undefined ? {} : { achievable }) };
}
