/**
 * Results that follow the editor's current document, saved or not: each
 * revision is analysed by POST /analyze after a short pause (typing and
 * dragging do not send a request per keystroke), superseded requests are
 * cancelled, and the last good result stays on screen marked stale while the
 * next one is computed or while the current document cannot be analysed.
 */
import { useQueryClient } from "@tanstack/react-query";
import { useEffect, useMemo, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import { draftAnalysisQueryOptions, useDraftAnalysis, type LifeCycleAnalysis } from "../../api/analysis";
import { ApiError } from "../../api/client";
import { queryKeys } from "../../api/keys";
import type { AnalysisState } from "../../lib/editor-types";

/** Pause after the last change before the analysis request goes out. */
export const ANALYSIS_DEBOUNCE_MS = 150;

interface Revision {
  revision: number;
  document: LifeCycle;
  /** When the change that made it happened (ms since epoch), if known. */
  at?: number;
}

interface Outcome {
  revision: number;
  data?: LifeCycleAnalysis;
  error?: ApiError;
  /** The query's data or error object this outcome was made from (to notice a new one). */
  from: unknown;
}

export function useLiveAnalysis(lifeCycleId: string, present: Revision): AnalysisState {
  const queryClient = useQueryClient();
  const [requested, setRequested] = useState<Revision>(present);

  useEffect(() => {
    if (requested.revision === present.revision) return;
    // A revision analysed before (undo, redo) needs no pause.
    const cached = queryClient.getQueryData(queryKeys.lifeCycles.draftAnalysis(lifeCycleId, present.revision));
    if (cached !== undefined) {
      setRequested(present);
      return;
    }
    // The pause counts from the change itself, not from the end of the render that showed it.
    const wait = present.at === undefined ? ANALYSIS_DEBOUNCE_MS : Math.min(ANALYSIS_DEBOUNCE_MS, Math.max(0, present.at + ANALYSIS_DEBOUNCE_MS - Date.now()));
    const timer = window.setTimeout(() => {
      // The request leaves now; the render that observes it runs while the server computes.
      if (present.document.stages.length > 0) void queryClient.prefetchQuery(draftAnalysisQueryOptions(lifeCycleId, present.revision, present.document));
      setRequested(present);
    }, wait);
    return () => window.clearTimeout(timer);
  }, [present, requested.revision, lifeCycleId, queryClient]);

  const hasStages = requested.document.stages.length > 0;
  const query = useDraftAnalysis(lifeCycleId, requested.revision, requested.document, hasStages);

  // The newest settled outcome and the newest good result, each with the revision it describes.
  // They are taken in during the render that sees the answer (React re-runs this component
  // at once, before its children), not in an effect, which would cost a second render of
  // the whole editor and a frame before λ shows as current.
  const [settled, setSettled] = useState<Outcome | null>(null);
  const [good, setGood] = useState<Outcome | null>(null);
  const fresh = hasStages && !query.isPlaceholderData && !query.isFetching;
  if (fresh && query.isSuccess && (settled?.revision !== requested.revision || settled.from !== query.data)) {
    const outcome = { revision: requested.revision, data: query.data, from: query.data };
    setSettled(outcome);
    setGood(outcome);
  } else if (fresh && query.isError && (settled?.revision !== requested.revision || settled.from !== query.error)) {
    const error = query.error instanceof ApiError ? query.error : new ApiError(0, "error", String(query.error));
    setSettled({ revision: requested.revision, error, from: query.error });
  }

  return useMemo<AnalysisState>(() => {
    if (present.document.stages.length === 0) return { data: undefined, stale: false, pending: false, error: null };
    const data = good?.data;
    const waiting = requested.revision !== present.revision || query.isFetching;
    return {
      data,
      stale: data !== undefined && good?.revision !== present.revision,
      pending: waiting,
      // An error stays until a later revision settles, so it does not flicker while the next is computed.
      error: settled?.error ?? null,
    };
  }, [present, requested.revision, query.isFetching, good, settled]);
}
