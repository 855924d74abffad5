/**
 * Management scenarios in the life-cycle document (version 2): named sets of
 * changes to vital rates or matrix entries, each scenario with the management
 * action behind it and, optionally, its cost.
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
  value: z.number({ error: "The amount of a change is a finite number." }),
});

export const ScenarioSchema = z.strictObject({
  id: IdSchema,
  name: z.string({ error: "A scenario name is text." }).trim().min(1, "Give the scenario a name.").max(200, "A scenario name has at most 200 characters."),
  /** The management action behind the changes, in the team's words. */
  action: z.string().max(10_000, "The action note has at most 10000 characters.").optional(),
  /** Cost of the action in the team's own unit (e.g. thousand € a year). */
  cost: z.number({ error: "A cost is a finite number." }).min(0, "A cost cannot be negative.").optional(),
  changes: z.array(ScenarioChangeSchema).max(MAX_SCENARIO_CHANGES, `A scenario has at most ${MAX_SCENARIO_CHANGES} changes.`),
});

export type ScenarioTarget = z.infer<typeof ScenarioTargetSchema>;
export type ScenarioChange = z.infer<typeof ScenarioChangeSchema>;
export type Scenario = z.infer<typeof ScenarioSchema>;

type Issue = (path: (string | number)[], message: string) => void;

interface ScenarioFields {
  stages: readonly { id: string; name: string }[];
  rates: readonly { id: string; name: string }[];
  scenarios?: readonly Scenario[] | undefined;
}

/** Cross-field rules: targets name existing rates and stages; scenario names differ. */
export function checkScenarioRules(doc: ScenarioFields, issue: Issue): void {
  const rateIds = new Set(doc.rates.map((r) => r.id));
  const stageIds = new Set(doc.stages.map((s) => s.id));
  const names = new Map<string, number>();
  doc.scenarios?.forEach((s, i) => {
    const other = names.get(s.name);
    if (other !== undefined) issue(["scenarios", i, "name"], `Two scenarios are named "${s.name}" (scenarios.${other} and scenarios.${i}).`);
    else names.set(s.name, i);
    s.changes.forEach((c, j) => {
      const at = (...field: string[]) => ["scenarios", i, "changes", j, "target", ...field];
      if (c.target.kind === "rate") {
        if (!rateIds.has(c.target.rateId)) issue(at("rateId"), `Scenario "${s.name}" changes a vital rate that does not exist (id "${c.target.rateId}").`);
      } else {
        if (!stageIds.has(c.target.from)) issue(at("from"), `Scenario "${s.name}" names a stage that does not exist (id "${c.target.from}").`);
        if (!stageIds.has(c.target.to)) issue(at("to"), `Scenario "${s.name}" names a stage that does not exist (id "${c.target.to}").`);
      }
    });
  });
}
