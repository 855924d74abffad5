/**
 * The editor's undo history: a pure reducer over whole documents. Each entry
 * is one immutable document with the label of the change that made it and a
 * revision number that is never reused, so the analysis of a revision can be
 * cached and found again after an undo.
 */
import type { LifeCycle } from "../../../shared/lifecycle";

export interface HistoryEntry {
  document: LifeCycle;
  /** What made this document ("Add stage", "Set rate of Juvenile → Adult"); "" for the loaded one. */
  label: string;
  revision: number;
  /** When the change was made (ms since epoch), for coalescing. */
  at: number;
}

export interface DocumentHistory {
  past: HistoryEntry[];
  present: HistoryEntry;
  future: HistoryEntry[];
}

/** Consecutive changes with the same label within this time make one undo step (typing, dragging). */
export const COALESCE_MS = 1000;
/** The oldest steps are forgotten beyond this many. */
export const MAX_UNDO_STEPS = 200;

let lastRevision = 0;
/** A revision number unique within this page's lifetime. */
export function nextRevision(): number {
  lastRevision += 1;
  return lastRevision;
}

export function startHistory(document: LifeCycle, now = Date.now()): DocumentHistory {
  return { past: [], present: { document, label: "", revision: nextRevision(), at: now }, future: [] };
}

export type HistoryAction =
  | { type: "change"; document: LifeCycle; label: string; now: number }
  | { type: "undo" }
  | { type: "redo" }
  | { type: "reset"; document: LifeCycle; now: number };

/** Adding or removing a stage, arrow or rate is always its own step, whatever its label. */
function sameShape(a: LifeCycle, b: LifeCycle): boolean {
  return a.stages.length === b.stages.length && a.transitions.length === b.transitions.length && a.rates.length === b.rates.length;
}

export function historyReducer(state: DocumentHistory, action: HistoryAction): DocumentHistory {
  switch (action.type) {
    case "change": {
      if (action.document === state.present.document) return state;
      const { present } = state;
      const coalesce =
        state.past.length > 0 &&
        state.future.length === 0 &&
        present.label === action.label &&
        action.now - present.at < COALESCE_MS &&
        sameShape(present.document, action.document);
      const entry: HistoryEntry = { document: action.document, label: action.label, revision: nextRevision(), at: action.now };
      if (coalesce) return { past: state.past, present: entry, future: [] };
      const past = [...state.past, present];
      return { past: past.length > MAX_UNDO_STEPS ? past.slice(past.length - MAX_UNDO_STEPS) : past, present: entry, future: [] };
    }
    case "undo": {
      const previous = state.past.at(-1);
      if (!previous) return state;
      return { past: state.past.slice(0, -1), present: previous, future: [state.present, ...state.future] };
    }
    case "redo": {
      const [next, ...rest] = state.future;
      if (!next) return state;
      return { past: [...state.past, state.present], present: next, future: rest };
    }
    case "reset":
      return startHistory(action.document, action.now);
  }
}
