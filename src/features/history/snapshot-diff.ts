/**
 * What changed between two states of a life cycle (two snapshots, or a
 * snapshot and the current state). Stages, rates and arrows are matched by
 * their stable ids, so a renamed stage is a rename, not a removal and an
 * addition. Matrix cells are compared by the stage ids of their row and
 * column, after building A from each state's arrows and rates.
 */
import { buildMatrices, type LifeCycle, type Stage, type Transition, type VitalRate } from "../../../shared/lifecycle";

export interface Renamed {
  id: string;
  before: string;
  after: string;
}

export type RateField = "name" | "value" | "se" | "ci" | "unit" | "source" | "notes";

export interface RateChange {
  id: string;
  /** The name after the change (before, for a removed rate). */
  name: string;
  fields: RateField[];
  before: VitalRate;
  after: VitalRate;
}

export interface ArrowSummary {
  id: string;
  kind: Transition["kind"];
  fromName: string;
  toName: string;
  rate: number | string;
}

export interface ArrowChange {
  id: string;
  fromName: string;
  toName: string;
  before: { kind: Transition["kind"]; rate: number | string };
  after: { kind: Transition["kind"]; rate: number | string };
}

export interface CellChange {
  to: string;
  from: string;
  toName: string;
  fromName: string;
  /** null: the stage did not exist on that side, or the value could not be computed. */
  before: number | null;
  after: number | null;
}

export interface SettingChange {
  field: "name" | "census" | "timeStepUnit" | "notes";
  before: string;
  after: string;
}

export interface LifeCycleDiff {
  settings: SettingChange[];
  stages: { added: Stage[]; removed: Stage[]; renamed: Renamed[]; reordered: boolean };
  rates: { added: VitalRate[]; removed: VitalRate[]; changed: RateChange[] };
  arrows: { added: ArrowSummary[]; removed: ArrowSummary[]; changed: ArrowChange[] };
  cells: CellChange[];
  /** True when nothing that matters to the model changed (diagram positions and colours are ignored). */
  empty: boolean;
}

const RATE_FIELDS: RateField[] = ["name", "value", "se", "ci", "unit", "source", "notes"];

function sameValue(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

function byId<T extends { id: string }>(items: readonly T[]): Map<string, T> {
  return new Map(items.map((x) => [x.id, x]));
}

/** A cell's value, or null when it cannot be computed (a broken formula makes the cell NaN). */
function cellValue(A: number[][], row: number | undefined, col: number | undefined): number | null {
  if (row === undefined || col === undefined) return null;
  const v = A[row]?.[col];
  return v === undefined || Number.isNaN(v) ? null : v;
}

/** Everything that differs between `before` and `after`, for people to read. */
export function diffLifeCycles(before: LifeCycle, after: LifeCycle): LifeCycleDiff {
  const settings: SettingChange[] = [];
  for (const field of ["name", "census", "timeStepUnit", "notes"] as const) {
    const b = before[field] ?? "";
    const a = after[field] ?? "";
    if (b !== a) settings.push({ field, before: b, after: a });
  }

  const stagesBefore = byId(before.stages);
  const stagesAfter = byId(after.stages);
  const stageNameOf = (id: string) => stagesAfter.get(id)?.name ?? stagesBefore.get(id)?.name ?? id;
  const addedStages = after.stages.filter((s) => !stagesBefore.has(s.id));
  const removedStages = before.stages.filter((s) => !stagesAfter.has(s.id));
  const renamedStages: Renamed[] = [];
  for (const s of after.stages) {
    const old = stagesBefore.get(s.id);
    if (old !== undefined && old.name !== s.name) renamedStages.push({ id: s.id, before: old.name, after: s.name });
  }
  const keptBefore = before.stages.filter((s) => stagesAfter.has(s.id)).map((s) => s.id);
  const keptAfter = after.stages.filter((s) => stagesBefore.has(s.id)).map((s) => s.id);
  const reordered = !sameValue(keptBefore, keptAfter);

  const ratesBefore = byId(before.rates);
  const ratesAfter = byId(after.rates);
  const changedRates: RateChange[] = [];
  for (const r of after.rates) {
    const old = ratesBefore.get(r.id);
    if (old === undefined) continue;
    const fields = RATE_FIELDS.filter((f) => !sameValue(old[f], r[f]));
    if (fields.length > 0) changedRates.push({ id: r.id, name: r.name, fields, before: old, after: r });
  }

  const arrowsBefore = byId(before.transitions);
  const arrowsAfter = byId(after.transitions);
  const summary = (t: Transition): ArrowSummary => ({ id: t.id, kind: t.kind, fromName: stageNameOf(t.from), toName: stageNameOf(t.to), rate: t.rate });
  const changedArrows: ArrowChange[] = [];
  const movedArrows: Transition[] = [];
  for (const t of after.transitions) {
    const old = arrowsBefore.get(t.id);
    if (old === undefined) continue;
    if (old.from !== t.from || old.to !== t.to) {
      // The same id between other stages: report it as removed and added.
      movedArrows.push(t);
      continue;
    }
    if (old.kind !== t.kind || old.rate !== t.rate) {
      changedArrows.push({ id: t.id, fromName: stageNameOf(t.from), toName: stageNameOf(t.to), before: { kind: old.kind, rate: old.rate }, after: { kind: t.kind, rate: t.rate } });
    }
  }
  const movedIds = new Set(movedArrows.map((t) => t.id));
  const addedArrows = after.transitions.filter((t) => !arrowsBefore.has(t.id) || movedIds.has(t.id)).map(summary);
  const removedArrows = before.transitions.filter((t) => !arrowsAfter.has(t.id) || movedIds.has(t.id)).map(summary);

  // Matrix cells over the union of the stages, in the order of `after` then the removed ones.
  const mb = buildMatrices(before);
  const ma = buildMatrices(after);
  const indexBefore = new Map(mb.stageIds.map((id, i) => [id, i]));
  const indexAfter = new Map(ma.stageIds.map((id, i) => [id, i]));
  const allStages = [...after.stages.map((s) => s.id), ...removedStages.map((s) => s.id)];
  const cells: CellChange[] = [];
  for (const to of allStages) {
    for (const from of allStages) {
      const b = cellValue(mb.A, indexBefore.get(to), indexBefore.get(from));
      const a = cellValue(ma.A, indexAfter.get(to), indexAfter.get(from));
      if (b === a || ((b ?? 0) === 0 && (a ?? 0) === 0)) continue;
      cells.push({ to, from, toName: stageNameOf(to), fromName: stageNameOf(from), before: b, after: a });
    }
  }

  const empty =
    settings.length === 0 &&
    addedStages.length === 0 &&
    removedStages.length === 0 &&
    renamedStages.length === 0 &&
    !reordered &&
    changedRates.length === 0 &&
    !after.rates.some((r) => !ratesBefore.has(r.id)) &&
    !before.rates.some((r) => !ratesAfter.has(r.id)) &&
    addedArrows.length === 0 &&
    removedArrows.length === 0 &&
    changedArrows.length === 0 &&
    cells.length === 0;

  return {
    settings,
    stages: { added: addedStages, removed: removedStages, renamed: renamedStages, reordered },
    rates: { added: after.rates.filter((r) => !ratesBefore.has(r.id)), removed: before.rates.filter((r) => !ratesAfter.has(r.id)), changed: changedRates },
    arrows: { added: addedArrows, removed: removedArrows, changed: changedArrows },
    cells,
    empty,
  };
}
