/**
 * Levers of the editor's current (possibly unsaved) document: scenario
 * comparison, lever ranking and break-even values (POST /levers), and the
 * LTRE between it and another life cycle of the Study (POST /ltre). Keyed by
 * the editor's revision, as the live analysis is: a revision never changes.
 */
import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { LifeCycle } from "../../shared/lifecycle";
import type { LeversRequestInput, LeversResponse, LtreResponse } from "../../shared/schemas/levers";
import { api } from "./client";
import { queryKeys } from "./keys";

export type { LeversResponse, LtreResponse };

export interface LeverSettings {
  /** Relative change of the ranking, e.g. 0.1 for ±10 %. */
  relativeChange: number;
  /** Target λ of the break-even search. */
  target: number;
  /** Include the break-even search. */
  breakEven: boolean;
}

export const fetchLevers = (document: LifeCycle, settings: LeverSettings, signal?: AbortSignal) =>
  api.post<LeversResponse>("/levers", { document, ...settings } satisfies LeversRequestInput, signal);

export const leversQueryOptions = (lifeCycleId: string, revision: number, document: LifeCycle, settings: LeverSettings) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.levers(lifeCycleId, revision, settings.relativeChange, settings.target, settings.breakEven),
    queryFn: ({ signal }) => fetchLevers(document, settings, signal),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
    placeholderData: keepPreviousData,
    retry: false,
  });

export function useLevers(lifeCycleId: string, revision: number, document: LifeCycle, settings: LeverSettings) {
  return useQuery(leversQueryOptions(lifeCycleId, revision, document, settings));
}

export const fetchLtre = (reference: LifeCycle, comparison: LifeCycle, signal?: AbortSignal) => api.post<LtreResponse>("/ltre", { reference, comparison }, signal);

/** The LTRE of another life cycle (its saved state) against this one at one revision; idle until one is chosen. */
export function useLtre(lifeCycleId: string, revision: number, reference: LifeCycle, comparisonId: string | null, comparison: LifeCycle | undefined) {
  return useQuery({
    queryKey: queryKeys.lifeCycles.ltre(lifeCycleId, revision, comparisonId ?? ""),
    queryFn: ({ signal }) => fetchLtre(reference, comparison!, signal),
    enabled: comparisonId !== null && comparison !== undefined,
    staleTime: Infinity,
    retry: false,
  });
}
