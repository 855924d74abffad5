/**
 * Lever ranking: for every vital rate and every non-zero matrix entry, the
 * exact change in λ from the same relative change (up and down), beside the
 * sensitivity and elasticity; and, where a scenario states the largest change
 * the team thinks achievable, the exact change in λ from that.
 */
import { exactChange, type ExactChange } from "../demography";
import type { Scenario, ScenarioChange } from "../lifecycle";
import { applyOp } from "../lifecycle/scenarios";
import { type Lever, type LeverModel } from "./model";

/** Default relative change of the ranking (+10 %). */
export const DEFAULT_RELATIVE_CHANGE = 0.1;

export interface LeverStep {
  /** The lever's value after the change (kept within its bounds). */
  readonly to: number;
  readonly limitedBy: "lower" | "upper" | null;
  /** λ after the change; null when the model is not defined there. */
  readonly lambda: number | null;
  /** Exact λ(changed) − λ(baseline); null when undefined. */
  readonly deltaLambda: number | null;
  /** Sensitivity × change: the first-order estimate of Δλ. */
  readonly firstOrder: number;
}

export interface AchievableStep extends LeverStep {
  readonly scenarioId: string;
  readonly scenarioName: string;
  readonly changeId: string;
  readonly op: ScenarioChange["op"];
  /** The achievable value of the change as entered (factor, amount or new value). */
  readonly achievable: number;
}

export interface LeverRow {
  readonly kind: "rate" | "entry";
  /** Rate id, or "fromStageId>toStageId". */
  readonly key: string;
  readonly label: string;
  readonly rateId?: string;
  readonly from?: string;
  readonly to?: string;
  /** Probability, non-negative or unbounded (rates); entries: "probability" for survival/growth cells. */
  readonly scale: string;
  readonly value: number;
  /** null = no bound on that side. */
  readonly lower: number | null;
  readonly upper: number | null;
  readonly upperReason: string | null;
  /** ∂λ/∂x at baseline (per unit of the lever). */
  readonly sensitivity: number;
  /** (x/λ) ∂λ/∂x at baseline. */
  readonly elasticity: number;
  readonly increase: LeverStep;
  readonly decrease: LeverStep;
  /** Largest achievable change named in a scenario for this lever alone (the best of them), if any. */
  readonly achievable: AchievableStep | null;
  /** Arrows whose formula uses the rate (rates only). */
  readonly arrows?: number;
  readonly note: string | null;
}

export interface LeverRanking {
  readonly lambda: number;
  readonly relativeChange: number;
  /** Rates first, then entries, each in document order; the client sorts. */
  readonly rows: LeverRow[];
}

const finiteOrNull = (x: number) => (Number.isFinite(x) ? x : null);

function step(change: ExactChange, sensitivity: number): LeverStep {
  const ok = Number.isFinite(change.lambda);
  return {
    to: change.to,
    limitedBy: change.limitedBy,
    lambda: ok ? change.lambda : null,
    deltaLambda: ok ? change.deltaLambda : null,
    firstOrder: sensitivity * (change.to - change.from),
  };
}

/** The achievable changes in scenarios that target one lever. */
function achievableChanges(scenarios: readonly Scenario[], lever: Lever): { scenario: Scenario; change: ScenarioChange }[] {
  const out: { scenario: Scenario; change: ScenarioChange }[] = [];
  for (const scenario of scenarios) {
    for (const change of scenario.changes) {
      if (change.achievable === undefined) continue;
      const t = change.target;
      if (lever.kind === "rate" ? t.kind === "rate" && t.rateId === lever.rateId : t.kind === "entry" && t.from === lever.from && t.to === lever.to) {
        out.push({ scenario, change });
      }
    }
  }
  return out;
}

/**
 * Ranks every lever of a prepared life cycle by the exact effect of the same
 * relative change (`relativeChange`, e.g. 0.1 for ±10 %). Exact Δλ comes from
 * recomputing λ on the changed matrix (warm-started from the baseline w).
 */
export function rankLevers(model: LeverModel, options: { relativeChange?: number; scenarios?: readonly Scenario[] } = {}): LeverRanking {
  const delta = options.relativeChange ?? DEFAULT_RELATIVE_CHANGE;
  if (!(delta > 0) || !Number.isFinite(delta)) throw new RangeError("The relative change is a number above 0, e.g. 0.1 for 10 %.");
  const scenarios = options.scenarios ?? [];
  const { n } = model;
  const work = new Float64Array(n * n);
  const baseline = { n, lambda: model.lambda, w: model.w };
  const S = model.analysis.sensitivity!;
  const rows: LeverRow[] = [];

  const levers: Lever[] = [...model.rates, ...model.entries];
  for (const lever of levers) {
    const matrixAt =
      lever.kind === "rate"
        ? (x: number, out: Float64Array) => model.rateMatrixAt(lever.slot, x, out)
        : (x: number, out: Float64Array) => model.entryMatrixAt(lever.row, lever.col, x, out);
    let sensitivity: number;
    let elasticity: number;
    if (lever.kind === "rate") {
      const vr = model.vitalRates[lever.slot]!;
      sensitivity = vr.sensitivity;
      elasticity = vr.elasticity;
    } else {
      sensitivity = S[lever.row]![lever.col]!;
      elasticity = (lever.value / model.lambda) * sensitivity;
    }
    const bounds = { lower: lever.lower, upper: lever.upper };
    // A relative change of a negative coefficient moves it away from zero in the "increase" direction too.
    const up = lever.value + Math.abs(lever.value) * delta;
    const down = lever.value - Math.abs(lever.value) * delta;
    const increase = step(exactChange(baseline, matrixAt, lever.value, up, bounds, work), sensitivity);
    const decrease = step(exactChange(baseline, matrixAt, lever.value, down, bounds, work), sensitivity);

    let achievable: AchievableStep | null = null;
    for (const { scenario, change } of achievableChanges(scenarios, lever)) {
      const requested = applyOp(change.op, lever.value, change.achievable!);
      const s = step(exactChange(baseline, matrixAt, lever.value, requested, bounds, work), sensitivity);
      if (achievable === null || (s.deltaLambda ?? -Infinity) > (achievable.deltaLambda ?? -Infinity)) {
        achievable = { ...s, scenarioId: scenario.id, scenarioName: scenario.name, changeId: change.id, op: change.op, achievable: change.achievable! };
      }
    }

    let note: string | null = null;
    if (lever.kind === "rate" && lever.arrows === 0) note = "No arrow uses this rate, so changing it does not change λ.";
    else if (lever.value === 0) note = "The value is 0, so a relative change leaves it at 0; its sensitivity still says how λ responds to an absolute change.";
    rows.push({
      kind: lever.kind,
      key: lever.key,
      label: lever.label,
      ...(lever.kind === "rate" ? { rateId: lever.rateId, arrows: lever.arrows } : { from: lever.from, to: lever.to }),
      scale: lever.kind === "rate" ? lever.scale : lever.reproduction ? "non-negative" : "probability",
      value: lever.value,
      lower: finiteOrNull(lever.lower),
      upper: finiteOrNull(lever.upper),
      upperReason: lever.kind === "entry" ? lever.upperReason : lever.scale === "probability" ? "a probability" : null,
      sensitivity,
      elasticity,
      increase,
      decrease,
      achievable,
      note,
    });
  }
  return { lambda: model.lambda, relativeChange: delta, rows };
}
