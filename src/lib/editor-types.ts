// The contract between the life-cycle editor's route (which owns the document,
// undo/redo, autosave and the analysis query) and the feature panels it
// composes (Diagram, Rates, Matrix, Results, History, Export). Features never
// import each other; they all take these props.
import type { LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleAnalysis } from "../../shared/schemas/life-cycles";
import type { ApiError } from "../api/client";

/** What the person has selected; comments and diagnostics point at the same anchors. */
export type Selection =
  | { kind: "stage"; id: string }
  | { kind: "transition"; id: string }
  | { kind: "rate"; id: string }
  /** A matrix cell: row = stage at t+1 (`to`), column = stage at t (`from`). */
  | { kind: "cell"; to: string; from: string };

/** A stable text key for a selection (stage:id, transition:id, rate:id, cell:to:from). */
export function selectionKey(selection: Selection): string {
  return selection.kind === "cell" ? `cell:${selection.to}:${selection.from}` : `${selection.kind}:${selection.id}`;
}

export interface AnalysisState {
  /** The latest result that could be computed (possibly for an older document: see `stale`). */
  data: LifeCycleAnalysis | undefined;
  /** true when `data` does not describe the current document (recomputing, or the current one cannot be analysed). */
  stale: boolean;
  /** A request is in flight. */
  pending: boolean;
  /** Why the current document cannot be analysed (fields point at `document.transitions.N.rate`, …). */
  error: ApiError | null;
}

export interface EditorPanelProps {
  document: LifeCycle;
  /** Replace the document; `label` names the change in the undo history ("Rename rate s_j"). */
  onChange: (next: LifeCycle, label: string) => void;
  readOnly: boolean;
  analysis: AnalysisState;
  selection: Selection | null;
  onSelect: (selection: Selection | null) => void;
  /** Open review threads per anchor (keys from `selectionKey`), shown as markers. */
  commentCounts: ReadonlyMap<string, number>;
}
