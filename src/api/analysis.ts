/**
 * Analyses of a life cycle: of its saved document (GET /life-cycles/:id/analysis)
 * and of the editor's current, possibly unsaved document (POST /analyze), so
 * results follow each edit without waiting for the save.
 */
import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleAnalysis } from "../../shared/schemas/life-cycles";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { LifeCycleAnalysis };

export const fetchSavedAnalysis = (lifeCycleId: string, signal?: AbortSignal) =>
  api.get<LifeCycleAnalysis>(`/life-cycles/${segment(lifeCycleId)}/analysis`, signal);

export const savedAnalysisQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.analysis(lifeCycleId),
    queryFn: ({ signal }) => fetchSavedAnalysis(lifeCycleId, signal),
  });

export function useSavedAnalysis(lifeCycleId: string) {
  return useQuery(savedAnalysisQueryOptions(lifeCycleId));
}

export interface AnalyzeOptions {
  /** Initial population (individuals per stage) for the projection. */
  initial?: number[];
  projectionSteps?: number;
}

/** Analyses a whole document; a document whose formulas cannot be computed is a 400 with `document.transitions.N.rate` fields. */
export const analyzeDocument = (document: LifeCycle, options: AnalyzeOptions = {}, signal?: AbortSignal) =>
  api.post<LifeCycleAnalysis>("/analyze", { document, ...options }, signal);

/**
 * The analysis of one revision of the editor's document. The revision number
 * (not the document) is the key: revisions never change once made, and undo
 * returns to an earlier revision whose result is still cached. Superseded
 * requests are cancelled through the signal once nothing observes them.
 */
export const draftAnalysisQueryOptions = (lifeCycleId: string, revision: number, document: LifeCycle) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.draftAnalysis(lifeCycleId, revision),
    queryFn: ({ signal }) => analyzeDocument(document, {}, signal),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
    placeholderData: keepPreviousData,
  });

export function useDraftAnalysis(lifeCycleId: string, revision: number, document: LifeCycle, enabled: boolean) {
  return useQuery({ ...draftAnalysisQueryOptions(lifeCycleId, revision, document), enabled });
}
