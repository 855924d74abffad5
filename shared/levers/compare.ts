/**
 * Baseline and scenarios side by side: λ, R0 and generation time of each
 * scenario's life cycle (exact, from the full analysis), at the planned
 * change and, where the scenario states one, at the achievable change; and
 * the change in λ per unit of cost.
 */
import { analyzeMatrix } from "../demography";
import { buildMatrices, type LifeCycle } from "../lifecycle";
import type { Scenario } from "../lifecycle";
import { applyScenario } from "./apply";
import { LeverError } from "./model";

export interface ScenarioOutcome {
  /** λ per projection interval. */
  readonly lambda: number;
  readonly deltaLambda: number;
  /** Net reproductive rate R0 (null when it cannot be computed). */
  readonly netReproductiveRate: number | null;
  /** Mean age of parents T̄ (projection intervals), the generation time. */
  readonly generationTime: number | null;
  /** The model still passes the checks (survival ≤ 1 per stage, …). */
  readonly isSound: boolean;
  /** Plain-language problems the analysis found (warnings and errors only). */
  readonly warnings: string[];
}

export interface ScenarioComparisonRow {
  /** null for the baseline. */
  readonly scenarioId: string | null;
  readonly name: string;
  readonly action: string | null;
  readonly cost: number | null;
  readonly changeCount: number;
  /** The planned changes; null when the scenario cannot be applied (see `problem`). */
  readonly planned: ScenarioOutcome | null;
  /** At the achievable changes, when any change states one. */
  readonly achievable: ScenarioOutcome | null;
  /** Δλ per unit of cost (planned), when a cost above 0 is given. */
  readonly deltaLambdaPerCost: number | null;
  readonly problem: { readonly message: string; readonly path: (string | number)[] } | null;
}

export interface ScenarioComparison {
  readonly baselineLambda: number;
  readonly rows: ScenarioComparisonRow[];
}

function outcome(doc: LifeCycle, baselineLambda: number): ScenarioOutcome {
  const m = buildMatrices(doc);
  if (m.errors.length > 0) throw new LeverError(`The changed life cycle cannot be analysed: ${m.errors[0]!.message}`);
  const a = analyzeMatrix({ A: m.A, U: m.U, F: m.F, stageNames: m.stageNames });
  return {
    lambda: a.lambda,
    deltaLambda: a.lambda - baselineLambda,
    netReproductiveRate: a.lifeHistory?.netReproductiveRate ?? null,
    generationTime: a.lifeHistory?.meanAgeOfParents ?? null,
    isSound: a.isSound,
    warnings: a.diagnostics.filter((d) => d.severity !== "info").map((d) => d.message),
  };
}

/** Compares the baseline life cycle with each of its scenarios (or the ones given). */
export function compareScenarios(doc: LifeCycle, scenarios: readonly Scenario[]): ScenarioComparison {
  if (doc.stages.length === 0) throw new LeverError("The life cycle has no stages yet: add stages and arrows first.", ["stages"]);
  const base = outcome(doc, NaN);
  const baseline: ScenarioOutcome = { ...base, deltaLambda: 0 };
  const rows: ScenarioComparisonRow[] = [
    { scenarioId: null, name: "Baseline", action: null, cost: null, changeCount: 0, planned: baseline, achievable: null, deltaLambdaPerCost: null, problem: null },
  ];
  scenarios.forEach((scenario, index) => {
    const common = { scenarioId: scenario.id, name: scenario.name, action: scenario.action ?? null, cost: scenario.cost ?? null, changeCount: scenario.changes.length };
    try {
      const planned = outcome(applyScenario(doc, scenario, { index }), baseline.lambda);
      const hasAchievable = scenario.changes.some((c) => c.achievable !== undefined);
      const achievable = hasAchievable ? outcome(applyScenario(doc, scenario, { index, achievable: true }), baseline.lambda) : null;
      const cost = scenario.cost;
      rows.push({ ...common, planned, achievable, deltaLambdaPerCost: cost !== undefined && cost > 0 ? planned.deltaLambda / cost : null, problem: null });
    } catch (err) {
      if (!(err instanceof LeverError)) throw err;
      rows.push({ ...common, planned: null, achievable: null, deltaLambdaPerCost: null, problem: { message: err.message, path: err.path } });
    }
  });
  return { baselineLambda: baseline.lambda, rows };
}
