/**
 * The state of one open life cycle: the document with its undo history, and
 * autosave with optimistic concurrency. A save names the version it started
 * from; when someone else saved in between, the server answers 409 with their
 * state and the editor stops saving and shows a conflict (nothing is
 * overwritten silently, either way).
 */
import { useQueryClient } from "@tanstack/react-query";
import { useCallback, useEffect, useReducer, useRef, useState } from "react";
import { LifeCycleSchema, type LifeCycle } from "../../../shared/lifecycle";
import { isApiError } from "../../api/client";
import { queryKeys } from "../../api/keys";
import { conflictRecord, saveLifeCycle, useLifeCycle, type LifeCycleRecord } from "../../api/life-cycles";
import { historyReducer, startHistory, type HistoryEntry } from "./document-history";

/** Quiet time after the last change before it is saved. */
export const AUTOSAVE_DELAY_MS = 800;
/** After a failed save that may work on a second try (network, 5xx). */
const RETRY_DELAY_MS = 5000;

export type SaveState =
  | { status: "saved" }
  | { status: "unsaved" }
  | { status: "saving" }
  /** The document breaks a rule of the format (or the server refused it); it is saved after the next change. */
  | { status: "invalid"; message: string }
  /** The request failed (network, server error); it is tried again shortly. */
  | { status: "failed"; message: string }
  | { status: "conflict"; current: LifeCycleRecord };

export interface LifeCycleEditor {
  lifeCycleId: string;
  studyId: string;
  present: HistoryEntry;
  document: LifeCycle;
  /** The server version this editor's saves build on. */
  version: number;
  /** Who saved that version. */
  updatedBy: string | null;
  save: SaveState;
  canUndo: boolean;
  canRedo: boolean;
  /** The label of the step undo would take back, and of the one redo would bring again. */
  undoLabel: string | null;
  redoLabel: string | null;
  change: (next: LifeCycle, label: string) => void;
  undo: () => void;
  redo: () => void;
  /** Start over from a server record (their version after a conflict, a restored snapshot). */
  reset: (record: LifeCycleRecord) => void;
  /** Save now instead of waiting (after a failure). */
  saveNow: () => void;
}

interface Base {
  version: number;
  /** The document the server holds at `version`, as this editor sent or loaded it (compared by reference). */
  document: LifeCycle;
  updatedBy: string | null;
}

function firstProblem(document: LifeCycle): string | null {
  const parsed = LifeCycleSchema.safeParse(document);
  if (parsed.success) return null;
  const issue = parsed.error.issues[0];
  if (!issue) return "The life cycle breaks a rule of the format.";
  return issue.message;
}

function isTypingTarget(target: EventTarget | null): boolean {
  if (!(target instanceof HTMLElement)) return false;
  return target.isContentEditable || target.tagName === "INPUT" || target.tagName === "TEXTAREA" || target.tagName === "SELECT";
}

export function useLifeCycleEditor(initial: LifeCycleRecord, options: { readOnly: boolean }): LifeCycleEditor {
  const { readOnly } = options;
  const lifeCycleId = initial.id;
  const queryClient = useQueryClient();
  const [history, dispatch] = useReducer(historyReducer, initial.document, (document) => startHistory(document));
  const [base, setBase] = useState<Base>({ version: initial.version, document: initial.document, updatedBy: initial.updatedBy });
  const [inFlight, setInFlight] = useState(false);
  const [problem, setProblem] = useState<{ document: LifeCycle; kind: "invalid" | "failed"; message: string } | null>(null);
  const [conflict, setConflict] = useState<LifeCycleRecord | null>(null);
  const [retryTick, setRetryTick] = useState(0);

  const document = history.present.document;
  const dirty = document !== base.document;

  const change = useCallback(
    (next: LifeCycle, label: string) => {
      if (readOnly) return;
      dispatch({ type: "change", document: next, label, now: Date.now() });
    },
    [readOnly],
  );
  const undo = useCallback(() => {
    if (!readOnly) dispatch({ type: "undo" });
  }, [readOnly]);
  const redo = useCallback(() => {
    if (!readOnly) dispatch({ type: "redo" });
  }, [readOnly]);

  const reset = useCallback(
    (record: LifeCycleRecord) => {
      queryClient.setQueryData(queryKeys.lifeCycles.detail(record.id), record);
      setBase({ version: record.version, document: record.document, updatedBy: record.updatedBy });
      setConflict(null);
      setProblem(null);
      dispatch({ type: "reset", document: record.document, now: Date.now() });
    },
    [queryClient],
  );

  // Latest values for callbacks that outlive a render (the save's answer, unmount).
  const latest = useRef({ document, base, dirty, conflict, inFlight, readOnly });
  latest.current = { document, base, dirty, conflict, inFlight, readOnly };

  const runSave = useCallback(async () => {
    const { document: sending, base: from, conflict: blocked, inFlight: busy, readOnly: ro } = latest.current;
    if (ro || blocked || busy || sending === from.document) return;
    const invalid = firstProblem(sending);
    if (invalid !== null) {
      setProblem({ document: sending, kind: "invalid", message: invalid });
      return;
    }
    setInFlight(true);
    setProblem(null);
    try {
      const record = await saveLifeCycle(lifeCycleId, from.version, sending);
      // Keep the document we sent (not the server's parsed copy) as the base, so
      // "no change since the save" stays a cheap reference comparison.
      setBase({ version: record.version, document: sending, updatedBy: record.updatedBy });
      queryClient.setQueryData(queryKeys.lifeCycles.detail(lifeCycleId), record);
      void queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.analysis(lifeCycleId), exact: true });
      void queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.snapshots(lifeCycleId) });
      void queryClient.invalidateQueries({ queryKey: queryKeys.studies.lifeCycles(record.studyId) });
    } catch (error) {
      const current = conflictRecord(error);
      if (current) {
        setConflict(current);
        queryClient.setQueryData(queryKeys.lifeCycles.detail(lifeCycleId), current);
      } else {
        const message = isApiError(error) || error instanceof Error ? error.message : "The save failed.";
        // Network trouble and server errors may pass on a second try; a refusal waits for the next change.
        const mayPassLater = !isApiError(error) || error.status === 0 || error.status === 429 || error.status >= 500;
        setProblem({ document: sending, kind: mayPassLater ? "failed" : "invalid", message });
      }
    } finally {
      setInFlight(false);
    }
  }, [lifeCycleId, queryClient]);

  // Autosave: a quiet moment after the last change, one request at a time.
  useEffect(() => {
    if (readOnly || conflict || inFlight || !dirty) return;
    // A document the format refuses waits for the next change; a failed request is retried later.
    if (problem?.document === document && problem.kind === "invalid") return;
    const delay = problem?.document === document && problem.kind === "failed" ? RETRY_DELAY_MS : AUTOSAVE_DELAY_MS;
    const timer = window.setTimeout(() => void runSave(), delay);
    return () => window.clearTimeout(timer);
  }, [readOnly, conflict, inFlight, dirty, document, problem, runSave, retryTick]);

  const saveNow = useCallback(() => {
    setProblem(null);
    setRetryTick((n) => n + 1);
    void runSave();
  }, [runSave]);

  // A newer version on the server (someone else saved; the query refetched on
  // focus): take it when there is nothing of ours to lose.
  const server = useLifeCycle(lifeCycleId).data;
  useEffect(() => {
    if (!server || server.version <= base.version || dirty || inFlight || conflict) return;
    setBase({ version: server.version, document: server.document, updatedBy: server.updatedBy });
    dispatch({ type: "reset", document: server.document, now: Date.now() });
  }, [server, base.version, dirty, inFlight, conflict]);

  // Ctrl/Cmd+Z undoes, Ctrl/Cmd+Shift+Z (or Ctrl+Y) redoes; text fields keep their own undo.
  useEffect(() => {
    if (readOnly) return;
    const onKeyDown = (event: KeyboardEvent) => {
      if (!(event.ctrlKey || event.metaKey) || event.altKey || isTypingTarget(event.target)) return;
      const key = event.key.toLowerCase();
      if (key === "z") {
        event.preventDefault();
        dispatch({ type: event.shiftKey ? "redo" : "undo" });
      } else if (key === "y" && !event.shiftKey) {
        event.preventDefault();
        dispatch({ type: "redo" });
      }
    };
    window.addEventListener("keydown", onKeyDown);
    return () => window.removeEventListener("keydown", onKeyDown);
  }, [readOnly]);

  // Leaving with changes not yet on the server: the browser asks first.
  useEffect(() => {
    if (readOnly || (!dirty && !inFlight)) return;
    const onBeforeUnload = (event: BeforeUnloadEvent) => event.preventDefault();
    window.addEventListener("beforeunload", onBeforeUnload);
    return () => window.removeEventListener("beforeunload", onBeforeUnload);
  }, [readOnly, dirty, inFlight]);

  // Leaving for another page of the app: send what is pending rather than drop it.
  useEffect(
    () => () => {
      const { document: pending, base: from, dirty: unsaved, conflict: blocked, inFlight: busy, readOnly: ro } = latest.current;
      if (ro || blocked || busy || !unsaved || firstProblem(pending) !== null) return;
      saveLifeCycle(lifeCycleId, from.version, pending).then(
        (record) => queryClient.setQueryData(queryKeys.lifeCycles.detail(lifeCycleId), record),
        // A conflict or failure here is found again when the life cycle is next opened.
        () => queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.detail(lifeCycleId) }),
      );
    },
    [lifeCycleId, queryClient],
  );

  let save: SaveState;
  if (conflict) save = { status: "conflict", current: conflict };
  else if (inFlight) save = { status: "saving" };
  else if (problem && problem.document === document) save = { status: problem.kind, message: problem.message };
  else if (dirty) save = { status: "unsaved" };
  else save = { status: "saved" };

  return {
    lifeCycleId,
    studyId: initial.studyId,
    present: history.present,
    document,
    version: base.version,
    updatedBy: base.updatedBy,
    save,
    canUndo: !readOnly && history.past.length > 0,
    canRedo: !readOnly && history.future.length > 0,
    undoLabel: history.past.length > 0 ? history.present.label : null,
    redoLabel: history.future[0]?.label ?? null,
    change,
    undo,
    redo,
    reset,
    saveNow,
  };
}
