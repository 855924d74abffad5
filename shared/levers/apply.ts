/**
 * A scenario applied to a life cycle gives another life cycle: vital-rate
 * changes first (on the rates' values), then entry changes on the arrows of
 * each changed cell (after the rate changes). The result is a whole document,
 * so every analysis — λ, R0, generation time, a Risk run — treats a scenario
 * exactly like any life cycle.
 *
 * An entry change to a cell with several arrows (growth and reproduction from
 * j to i) multiplies each arrow by the factor; an amount added, or a new
 * value set, is shared among the arrows in proportion to their current values
 * (all of it to the first arrow when they are all zero).
 */
import { buildMatrices, rateScale, scaleBounds, type LifeCycle, type Scenario, type ScenarioChange, type Transition } from "../lifecycle";
import { applyOp, boundWords } from "../lifecycle/scenarios";
import { LeverError } from "./model";

export interface ApplyOptions {
  /** Use each change's achievable value instead of its planned one (changes without one keep their planned value). */
  readonly achievable?: boolean;
  /** Index of the scenario in the document, for error paths. */
  readonly index?: number;
}

const short = (x: number) => Number(x.toPrecision(6)).toString();

/** A number for a formula: shortest exact text. */
const literal = (x: number) => (Object.is(x, -0) ? "0" : String(x));

/**
 * The life cycle with a scenario's changes made. Throws LeverError naming the
 * rate or entry and the bound when a change takes a probability outside
 * [0, 1] or anything below 0, or refers to a rate, stage or arrow that does
 * not exist.
 */
export function applyScenario(doc: LifeCycle, scenario: Scenario, options: ApplyOptions = {}): LifeCycle {
  const si = options.index ?? 0;
  const path = (ci: number, field: string) => ["scenarios", si, "changes", ci, field];
  const valueOf = (c: ScenarioChange) => (options.achievable && c.achievable !== undefined ? c.achievable : c.value);
  const field = (c: ScenarioChange) => (options.achievable && c.achievable !== undefined ? "achievable" : "value");
  const rates = doc.rates.map((r) => ({ ...r }));
  const byId = new Map(rates.map((r) => [r.id, r]));

  scenario.changes.forEach((c, ci) => {
    if (c.target.kind !== "rate") return;
    const rate = byId.get(c.target.rateId);
    if (rate === undefined) throw new LeverError(`Scenario "${scenario.name}" changes a vital rate that does not exist (id "${c.target.rateId}").`, [...path(ci, "target"), "rateId"]);
    const scale = rateScale(doc.rates.find((r) => r.id === rate.id)!);
    const { lower, upper } = scaleBounds(scale);
    const next = applyOp(c.op, rate.value, valueOf(c));
    if (!Number.isFinite(next)) throw new LeverError(`Scenario "${scenario.name}" takes ${rate.name} to ${next}, which is not a number.`, path(ci, field(c)));
    if (next > upper) throw new LeverError(`Scenario "${scenario.name}" takes ${rate.name} to ${short(next)}, above its upper bound ${boundWords(scale, "upper")}.`, path(ci, field(c)));
    if (next < lower) throw new LeverError(`Scenario "${scenario.name}" takes ${rate.name} to ${short(next)}, below its lower bound ${boundWords(scale, "lower")}.`, path(ci, field(c)));
    rate.value = next;
  });

  const entryChanges = scenario.changes.map((c, ci) => ({ c, ci })).filter(({ c }) => c.target.kind === "entry");
  let transitions: Transition[] = doc.transitions;
  if (entryChanges.length > 0) {
    const afterRates: LifeCycle = { ...doc, rates };
    const m = buildMatrices(afterRates);
    const stageName = new Map(doc.stages.map((s) => [s.id, s.name]));
    transitions = doc.transitions.map((t) => ({ ...t }));
    const current = new Map(m.entries.map((e) => [e.transitionId, e.value]));
    for (const { c, ci } of entryChanges) {
      if (c.target.kind !== "entry") continue;
      const { from, to } = c.target;
      if (!stageName.has(from) || !stageName.has(to)) {
        throw new LeverError(`Scenario "${scenario.name}" changes an entry of a stage that does not exist.`, [...path(ci, "target"), stageName.has(from) ? "to" : "from"]);
      }
      const label = `${stageName.get(from)} → ${stageName.get(to)}`;
      const cell = transitions.filter((t) => t.from === from && t.to === to);
      if (cell.length === 0) {
        throw new LeverError(`Scenario "${scenario.name}" changes the entry ${label}, but no arrow goes from ${stageName.get(from)} to ${stageName.get(to)}; draw the arrow first.`, path(ci, "target"));
      }
      const values = cell.map((t) => current.get(t.id) ?? NaN);
      if (values.some((v) => !Number.isFinite(v))) {
        throw new LeverError(`Scenario "${scenario.name}": the entry ${label} cannot be computed after the rate changes.`, path(ci, "target"));
      }
      const total = values.reduce((s, v) => s + v, 0);
      const v = valueOf(c);
      const next = applyOp(c.op, total, v);
      const survival = cell.filter((t) => t.kind !== "reproduction");
      const survivalNow = cell.reduce((s, t, k) => s + (t.kind === "reproduction" ? 0 : values[k]!), 0);
      if (!(next >= 0)) throw new LeverError(`Scenario "${scenario.name}" takes the entry ${label} to ${short(next)}, below its lower bound 0 (a matrix entry cannot be negative).`, path(ci, field(c)));
      const shares = total > 0 ? values.map((x) => x / total) : values.map((_, k) => (k === 0 ? 1 : 0));
      const survivalNext = cell.reduce((s, t, k) => s + (t.kind === "reproduction" ? 0 : c.op === "multiply" ? values[k]! * v : next * shares[k]!), 0);
      if (survival.length > 0 && survivalNext > 1 + 1e-12 && survivalNext > survivalNow) {
        throw new LeverError(`Scenario "${scenario.name}" takes the survival part of the entry ${label} to ${short(survivalNext)}, above its upper bound 1 (it is a probability).`, path(ci, field(c)));
      }
      cell.forEach((t, k) => {
        const share = shares[k]!;
        if (c.op === "multiply") t.rate = typeof t.rate === "number" ? t.rate * v : `(${t.rate}) * ${literal(v)}`;
        else if (c.op === "set") t.rate = next * share;
        else {
          const add = v * share;
          t.rate = typeof t.rate === "number" ? Math.max(0, t.rate + add) : add === 0 ? t.rate : `(${t.rate}) + ${literal(add)}`;
        }
        current.set(t.id, values[k]! + (applyOp(c.op, total, v) - total) * share);
      });
    }
  }
  return { ...doc, rates, transitions };
}
