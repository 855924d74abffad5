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
import { useDraftAnalysis, type LifeCycleAnalysis } from "../../api/analysis";
import { ApiError } from "../../api/client";
import { queryKeys } from "../../api/keys";
import type { AnalysisState } from "../../lib/editor-types";

/** Pause after the last change before the analysis request goes out. */
export const ANALYSIS_DEBOUNCE_MS = 150;

interface Revision {
  revision: number;
  document: LifeCycle;
}

interface Outcome {
  revision: number;
  data?: LifeCycleAnalysis;
  error?: ApiError;
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
    const timer = window.setTimeout(() => setRequested(present), ANALYSIS_DEBOUNCE_MS);
    return () => window.clearTimeout(timer);
  }, [present, requested.revision, lifeCycleId, queryClient]);

  const hasStages = requested.document.stages.length > 0;
  const query = useDraftAnalysis(lifeCycleId, requested.revision, requested.document, hasStages);

  // The newest settled outcome and the newest good result, each with the revision it describes.
  const [settled, setSettled] = useState<Outcome | null>(null);
  const [good, setGood] = useState<Outcome | null>(null);
  const fresh = !query.isPlaceholderData && !query.isFetching;
  useEffect(() => {
    if (!hasStages || !fresh) return;
    if (query.isSuccess) {
      const outcome = { revision: requested.revision, data: query.data };
      setSettled(outcome);
      setGood(outcome);
    } else if (query.isError) {
      const error = query.error instanceof ApiError ? query.error : new ApiError(0, "error", String(query.error));
      setSettled({ revision: requested.revision, error });
    }
  }, [hasStages, fresh, query.isSuccess, query.isError, query.data, query.error, requested.revision]);

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
