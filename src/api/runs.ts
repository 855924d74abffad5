/**
 * Runs: background computations of a life cycle (Risk is the first kind).
 * Starting one, the life cycle's list, one Run polled while it computes, and
 * cancelling. A Run's status and progress change on the server; its result
 * never changes once it has finished.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect } from "react";
import type { RiskSettings, RiskSettingsInput } from "../../shared/schemas/risk";
import type { RiskRunResult, RunRecord, RunStatus, RunSummary } from "../../shared/schemas/runs";
import type { UncertaintyRunResult, UncertaintySettingsInput } from "../../shared/schemas/uncertainty";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { RiskRunResult, RunRecord, RunStatus, RunSummary };

export type RiskRun = RunRecord<RiskRunResult>;
export type UncertaintyRun = RunRecord<UncertaintyRunResult>;
export type { UncertaintyRunResult };

/** How often a queued or running Run is asked for its progress. */
export const RUN_POLL_MS = 500;
/** How often the list is refreshed while one of its Runs computes. */
const LIST_POLL_MS = 2_000;

export const isActive = (status: RunStatus) => status === "queued" || status === "running";

const runsPath = (lifeCycleId: string) => `/life-cycles/${segment(lifeCycleId)}/runs`;

// ------------------------------------------------------------------ the list

export const fetchRuns = (lifeCycleId: string, signal?: AbortSignal) => api.get<RunSummary[]>(runsPath(lifeCycleId), signal);

export const runsQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.runs(lifeCycleId),
    queryFn: ({ signal }) => fetchRuns(lifeCycleId, signal),
    refetchInterval: (query) => (query.state.data?.some((r) => isActive(r.status)) ? LIST_POLL_MS : false),
  });

/** The life cycle's Runs, newest first; refreshed while one of them computes. */
export function useRuns(lifeCycleId: string) {
  return useQuery(runsQueryOptions(lifeCycleId));
}

// ------------------------------------------------------------------- one Run

export const fetchRun = (runId: string, signal?: AbortSignal) => api.get<RiskRun>(`/runs/${segment(runId)}`, signal);

const finished = (query: { state: { data: RiskRun | undefined } }) => {
  const status = query.state.data?.status;
  return status !== undefined && !isActive(status);
};

export const runQueryOptions = (runId: string) =>
  queryOptions({
    queryKey: queryKeys.runs.detail(runId),
    queryFn: ({ signal }) => fetchRun(runId, signal),
    // Polled while queued or running; a finished Run never changes.
    refetchInterval: (query) => (finished(query) || query.state.error ? false : RUN_POLL_MS),
    staleTime: (query) => (finished(query) ? Infinity : 0),
  });

/**
 * One Run, polled about every RUN_POLL_MS while it is queued or running; idle
 * while `runId` is null. When it finishes, the life cycle's list is refreshed.
 */
export function useRun(lifeCycleId: string, runId: string | null) {
  const queryClient = useQueryClient();
  const query = useQuery({ ...runQueryOptions(runId ?? ""), enabled: runId !== null });
  const status = query.data?.status;
  useEffect(() => {
    if (status !== undefined && !isActive(status)) void queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.runs(lifeCycleId) });
  }, [status, lifeCycleId, queryClient]);
  return query;
}

// ---------------------------------------------------------------- start, cancel

/** Starts a Risk run on the saved life cycle; bad settings are a 400 with `settings.…` field paths. */
export const startRiskRun = (lifeCycleId: string, settings: RiskSettings | RiskSettingsInput) =>
  api.post<RiskRun>(runsPath(lifeCycleId), { kind: "risk", settings });

export function useStartRiskRun(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (settings: RiskSettings | RiskSettingsInput) => startRiskRun(lifeCycleId, settings),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
      return queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.runs(lifeCycleId) });
    },
  });
}

/** Starts a Monte Carlo uncertainty Run on the saved life cycle; the rates' uncertainty comes from the life cycle (400 with `lifeCycle.…` paths when unusable). */
export const startUncertaintyRun = (lifeCycleId: string, settings: UncertaintySettingsInput) =>
  api.post<UncertaintyRun>(runsPath(lifeCycleId), { kind: "uncertainty", settings });

export function useStartUncertaintyRun(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (settings: UncertaintySettingsInput) => startUncertaintyRun(lifeCycleId, settings),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
      return queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.runs(lifeCycleId) });
    },
  });
}

/** Cancels a queued or running Run; one that has already finished is a 409. */
export const cancelRun = (runId: string) => api.post<RiskRun>(`/runs/${segment(runId)}/cancel`);

export function useCancelRun(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => cancelRun(runId),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
    },
    // Cancelled or finished in the meantime (409): either way the list and the Run are out of date.
    onSettled: (_run, _error, runId) =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.runs.detail(runId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.runs(lifeCycleId) }),
      ]),
  });
}
