/**
 * Management scenarios in the life-cycle document (version 2): named sets of
 * changes to vital rates or matrix entries, each scenario with the management
 * action behind it and, optionally, its cost and, per change, the largest
 * change the team thinks achievable. Snapshots keep them with the document.
 *
 * ```json
 * "scenarios": [{
 *   "id": "sc_nests", "name": "Protect nests", "action": "Fence the three breeding ponds", "cost": 12,
 *   "changes": [{ "id": "ch_1", "target": { "kind": "rate", "rateId": "vr_se" }, "op": "multiply", "value": 1.2, "achievable": 1.35 }]
 * }]
 * ```
 *
 * A change to an entry (from stage j to stage i, a_ij) applies to the arrows
 * in that cell; rate changes are applied first, entry changes after them
 * (shared/levers/apply.ts).
 */
import { z } from "zod";
import { ID_PATTERN } from "./ids";

const IdSchema = z.string({ error: "An id is text." }).regex(ID_PATTERN, "An id is 1 to 64 letters, digits, _ or -.");

export const MAX_SCENARIOS = 100;
export const MAX_SCENARIO_CHANGES = 500;
export const SCENARIO_OPERATIONS = ["multiply", "add", "set"] as const;

export const ScenarioTargetSchema = z.discriminatedUnion(
  "kind",
  [
    z.strictObject({ kind: z.literal("rate"), rateId: IdSchema }),
    /** The matrix entry a_ij: from stage j (column) to stage i (row). */
    z.strictObject({ kind: z.literal("entry"), from: IdSchema, to: IdSchema }),
  ],
  { error: 'A change targets a vital rate (kind "rate") or a matrix entry (kind "entry").' },
);

export const ScenarioChangeSchema = z.strictObject({
  id: IdSchema,
  target: ScenarioTargetSchema,
  op: z.enum(SCENARIO_OPERATIONS, { error: 'The operation is "multiply", "add" or "set".' }),
  /** Factor (multiply), amount in the rate's units (add) or new value (set). */
  value: z.number({ error: "The amount of a change is a finite number." }),
  /** The largest amount of this change (same operation) the team thinks achievable. */
  achievable: z.number({ error: "The achievable amount is a finite number." }).optional(),
});

export const ScenarioSchema = z.strictObject({
  id: IdSchema,
  name: z.string({ error: "A scenario name is text." }).trim().min(1, "Give the scenario a name.").max(200, "A scenario name has at most 200 characters."),
  /** The management action behind the changes, in the team's words. */
  action: z.string().max(10_000, "The action note has at most 10000 characters.").optional(),
  /** Cost of the action in the team's own unit (e.g. thousand € a year), the same for every scenario. */
  cost: z.number({ error: "A cost is a finite number." }).min(0, "A cost cannot be negative.").optional(),
  changes: z.array(ScenarioChangeSchema).max(MAX_SCENARIO_CHANGES, `A scenario has at most ${MAX_SCENARIO_CHANGES} changes.`),
});

export type ScenarioTarget = z.infer<typeof ScenarioTargetSchema>;
export type ScenarioChange = z.infer<typeof ScenarioChangeSchema>;
export type ScenarioOp = ScenarioChange["op"];
export type Scenario = z.infer<typeof ScenarioSchema>;

/** The value an operation gives from the current one. */
export function applyOp(op: ScenarioOp, current: number, amount: number): number {
  return op === "multiply" ? current * amount : op === "add" ? current + amount : amount;
}

type Scale = "probability" | "non-negative" | "unbounded";

/** Words for a bound, for messages: "1 (it is a probability)". */
export function boundWords(scale: Scale, side: "lower" | "upper"): string {
  if (scale === "probability") return `${side === "upper" ? 1 : 0} (it is a probability)`;
  return "0 (it cannot be negative)";
}

type Issue = (path: (string | number)[], message: string) => void;

interface ScenarioFields {
  stages: readonly { id: string; name: string }[];
  rates: readonly { id: string; name: string; value: number; scale?: Scale | undefined }[];
  scenarios?: readonly Scenario[] | undefined;
}

/** The same rule as rateScale() in schema.ts (which imports this file, so it cannot be imported here). */
function scaleOf(rate: { value: number; scale?: Scale | undefined }): Scale {
  if (rate.scale !== undefined) return rate.scale;
  if (rate.value >= 0 && rate.value <= 1) return "probability";
  return rate.value > 1 ? "non-negative" : "unbounded";
}

const short = (x: number) => Number(x.toPrecision(6)).toString();

/**
 * Cross-field rules: targets name existing rates and stages; scenario names
 * differ; a factor is not negative; a rate change keeps the rate within its
 * scale at the document's value (a probability in [0, 1], a non-negative rate
 * ≥ 0) — the message names the rate and the bound.
 */
export function checkScenarioRules(doc: ScenarioFields, issue: Issue): void {
  const rates = new Map(doc.rates.map((r) => [r.id, r]));
  const stageIds = new Set(doc.stages.map((s) => s.id));
  const names = new Map<string, number>();
  doc.scenarios?.forEach((s, i) => {
    const other = names.get(s.name);
    if (other !== undefined) issue(["scenarios", i, "name"], `Two scenarios are named "${s.name}" (scenarios.${other} and scenarios.${i}).`);
    else names.set(s.name, i);
    // Changes apply in order, so two changes to one rate build on each other (as in applyScenario).
    const planned = new Map<string, number>();
    const achievable = new Map<string, number>();
    s.changes.forEach((c, j) => {
      const at = (...field: string[]) => ["scenarios", i, "changes", j, "target", ...field];
      const field = (name: "value" | "achievable") => ["scenarios", i, "changes", j, name];
      for (const name of ["value", "achievable"] as const) {
        const amount = c[name];
        if (c.op === "multiply" && amount !== undefined && amount < 0) issue(field(name), `Scenario "${s.name}": a factor cannot be negative; got ${amount}.`);
        if (c.target.kind === "entry" && c.op === "set" && amount !== undefined && amount < 0) {
          issue(field(name), `Scenario "${s.name}": a matrix entry cannot be set below 0; got ${amount}.`);
        }
      }
      if (c.target.kind === "entry") {
        if (!stageIds.has(c.target.from)) issue(at("from"), `Scenario "${s.name}" names a stage that does not exist (id "${c.target.from}").`);
        if (!stageIds.has(c.target.to)) issue(at("to"), `Scenario "${s.name}" names a stage that does not exist (id "${c.target.to}").`);
        return;
      }
      const rate = rates.get(c.target.rateId);
      if (rate === undefined) {
        issue(at("rateId"), `Scenario "${s.name}" changes a vital rate that does not exist (id "${c.target.rateId}").`);
        return;
      }
      const scale = scaleOf(rate);
      const upper = scale === "probability" ? 1 : Infinity;
      const lower = scale === "unbounded" ? -Infinity : 0;
      for (const name of ["value", "achievable"] as const) {
        const running = name === "value" ? planned : achievable;
        const amount = name === "value" ? c.value : (c.achievable ?? c.value);
        const next = applyOp(c.op, running.get(rate.id) ?? rate.value, amount);
        running.set(rate.id, next);
        if (name === "achievable" && c.achievable === undefined) continue;
        const verb = name === "value" ? "takes" : "at its achievable change would take";
        if (next > upper) issue(field(name), `Scenario "${s.name}" ${verb} ${rate.name} to ${short(next)}, above its upper bound ${boundWords(scale, "upper")}.`);
        else if (next < lower) issue(field(name), `Scenario "${s.name}" ${verb} ${rate.name} to ${short(next)}, below its lower bound ${boundWords(scale, "lower")}.`);
      }
    });
  });
}
