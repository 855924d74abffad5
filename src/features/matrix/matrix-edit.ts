/**
 * Editing the projection matrix edits the arrows behind it. A cell a_ij
 * (row i = stage at t+1, the arrow's `to`; column j = stage at t, its `from`)
 * is the sum of the arrows from j to i, so every change here is a change of
 * arrows: a cell becoming non-zero creates one, a cell becoming zero removes
 * it. Pure functions of the document.
 */
import { newId, type LifeCycle, type Transition, type TransitionKind } from "../../../shared/lifecycle";

/** The kind a new arrow gets by default: stasis on the diagonal, growth to a later stage, shrinkage to an earlier one (stage order). */
export function defaultKind(doc: LifeCycle, to: string, from: string): TransitionKind {
  if (to === from) return "stasis";
  const order = new Map(doc.stages.map((s, i) => [s.id, i]));
  return (order.get(to) ?? 0) > (order.get(from) ?? 0) ? "growth" : "shrinkage";
}

/** The arrows that make up the cell (to, from), survival kinds first. */
export function cellArrows(doc: LifeCycle, to: string, from: string): Transition[] {
  return doc.transitions.filter((t) => t.to === to && t.from === from).sort((a, b) => Number(a.kind === "reproduction") - Number(b.kind === "reproduction"));
}

/**
 * The kinds another arrow in this cell may have: no kind twice, stasis only
 * on the diagonal, growth or shrinkage (not both, and only the one the stage
 * order suggests) off it, reproduction anywhere.
 */
export function availableKinds(doc: LifeCycle, to: string, from: string): TransitionKind[] {
  const present = new Set(cellArrows(doc, to, from).map((t) => t.kind));
  const survival: TransitionKind = defaultKind(doc, to, from);
  const hasSurvival = present.has("stasis") || present.has("growth") || present.has("shrinkage");
  const kinds: TransitionKind[] = [];
  if (!hasSurvival) kinds.push(survival);
  if (!present.has("reproduction")) kinds.push("reproduction");
  return kinds;
}

const stageName = (doc: LifeCycle, id: string) => doc.stages.find((s) => s.id === id)?.name ?? id;

/** "Adult → Juvenile" for labels and undo history. */
export function arrowLabel(doc: LifeCycle, t: Pick<Transition, "from" | "to">): string {
  return `${stageName(doc, t.from)} → ${stageName(doc, t.to)}`;
}

export interface MatrixEdit {
  document: LifeCycle;
  /** Names the change in the undo history. */
  label: string;
}

/** Adds an arrow of `kind` with a numeric rate to the cell (to, from). */
export function addArrow(doc: LifeCycle, to: string, from: string, kind: TransitionKind, value: number, id: string = newId("tr")): MatrixEdit {
  const arrow: Transition = { id, from, to, kind, rate: value };
  return { document: { ...doc, transitions: [...doc.transitions, arrow] }, label: `Add ${kind} arrow ${arrowLabel(doc, arrow)}` };
}

/** Sets an arrow's rate to a number; 0 removes the arrow. */
export function setArrowValue(doc: LifeCycle, transitionId: string, value: number): MatrixEdit {
  const arrow = doc.transitions.find((t) => t.id === transitionId);
  if (arrow === undefined) return { document: doc, label: "" };
  if (value === 0) {
    return { document: { ...doc, transitions: doc.transitions.filter((t) => t.id !== transitionId) }, label: `Remove ${arrow.kind} arrow ${arrowLabel(doc, arrow)}` };
  }
  return {
    document: { ...doc, transitions: doc.transitions.map((t) => (t.id === transitionId ? { ...t, rate: value } : t)) },
    label: `Set ${arrowLabel(doc, arrow)} to ${value}`,
  };
}

/** Replaces a formula by a number (its current value, usually): the explicit way to overwrite a formula cell. */
export function replaceFormulaWithNumber(doc: LifeCycle, transitionId: string, value: number): MatrixEdit {
  const arrow = doc.transitions.find((t) => t.id === transitionId);
  if (arrow === undefined || typeof arrow.rate === "number") return { document: doc, label: "" };
  return {
    document: { ...doc, transitions: doc.transitions.map((t) => (t.id === transitionId ? { ...t, rate: value } : t)) },
    label: `Replace the formula of ${arrowLabel(doc, arrow)} with ${value}`,
  };
}

/** Changes an arrow's kind (e.g. growth ↔ reproduction); the caller offers only kinds from `availableKinds` plus the arrow's own. */
export function setArrowKind(doc: LifeCycle, transitionId: string, kind: TransitionKind): MatrixEdit {
  const arrow = doc.transitions.find((t) => t.id === transitionId);
  if (arrow === undefined || arrow.kind === kind) return { document: doc, label: "" };
  return {
    document: { ...doc, transitions: doc.transitions.map((t) => (t.id === transitionId ? { ...t, kind } : t)) },
    label: `Make ${arrowLabel(doc, arrow)} a ${kind} arrow`,
  };
}

export type CellEditResult = MatrixEdit | { error: string };

/**
 * Typing a number into a cell that holds at most one arrow with a numeric
 * rate: 0 removes the arrow, a new non-zero value updates it or creates one
 * (of `kind`, or the default kind for the cell). Cells with a formula or
 * several arrows are edited arrow by arrow instead.
 */
export function setCellValue(doc: LifeCycle, to: string, from: string, value: number, kind?: TransitionKind): CellEditResult {
  if (!Number.isFinite(value) || value < 0) return { error: "A matrix entry is a number ≥ 0." };
  const arrows = cellArrows(doc, to, from);
  if (arrows.length > 1) return { error: "This cell adds up several arrows: change them one by one below the matrix." };
  const [arrow] = arrows;
  if (arrow === undefined) {
    if (value === 0) return { document: doc, label: "" };
    const k = kind ?? defaultKind(doc, to, from);
    if (!availableKinds(doc, to, from).includes(k)) return { error: `A ${k} arrow cannot go from ${stageName(doc, from)} to ${stageName(doc, to)}.` };
    return addArrow(doc, to, from, k, value);
  }
  if (typeof arrow.rate === "string") return { error: `This cell is the formula ${arrow.rate}: replace the formula with a number first.` };
  if (arrow.rate === value) return { document: doc, label: "" };
  return setArrowValue(doc, arrow.id, value);
}
