/**
 * Climate: λ(T) of the editor's current document, fits of thermal responses
 * to uploaded measurements, deterministic warming projections (all stateless
 * POSTs that store nothing), and the warming Run of stochastic replicates.
 * λ(T) and projections are keyed by a fingerprint of the document.
 */
import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { LifeCycle } from "../../shared/lifecycle";
import type { TemperatureRange, WarmingTrajectory } from "../../shared/lifecycle/thermal";
import type {
  ClimateFitRequest,
  ClimateFitResponse,
  ClimateLambdaResponse,
  ClimateTrajectoryResponse,
  WarmingRunResult,
  WarmingSettingsInput,
} from "../../shared/schemas/climate";
import type { RunRecord } from "../../shared/schemas/runs";
import { api, segment } from "./client";
import { queryKeys } from "./keys";
import { documentFingerprint } from "./projection";

export type { ClimateFitResponse, ClimateLambdaResponse, ClimateTrajectoryResponse, WarmingRunResult };
export type WarmingRun = RunRecord<WarmingRunResult>;

export const fetchClimateLambda = (document: LifeCycle, range: TemperatureRange, at: number | undefined, signal?: AbortSignal) =>
  api.post<ClimateLambdaResponse>("/climate/lambda", { document, range, points: 200, ...(at === undefined ? {} : { at }) }, signal);

export const climateLambdaQueryOptions = (document: LifeCycle, fingerprint: string, range: TemperatureRange, at: number | undefined) =>
  queryOptions({
    queryKey: queryKeys.climate.lambda(fingerprint, range.min, range.max, at ?? null),
    queryFn: ({ signal }) => fetchClimateLambda(document, range, at, signal),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
    placeholderData: keepPreviousData,
    retry: false,
  });

/** λ(T) of `document` over `range`; idle while `range` is null (not valid yet). */
export function useClimateLambda(document: LifeCycle, range: TemperatureRange | null, at: number | undefined) {
  const fingerprint = range === null ? "" : documentFingerprint(document);
  return useQuery({ ...climateLambdaQueryOptions(document, fingerprint, range ?? { min: 0, max: 1 }, at), enabled: range !== null });
}

export const fetchClimateTrajectory = (document: LifeCycle, trajectory: WarmingTrajectory, initialTotal: number, signal?: AbortSignal) =>
  api.post<ClimateTrajectoryResponse>("/climate/trajectory", { document, trajectory, initialTotal }, signal);

/** The deterministic projection through the trajectory's mean temperatures; idle while `trajectory` is null. */
export function useClimateTrajectory(document: LifeCycle, trajectory: WarmingTrajectory | null, initialTotal: number) {
  const fingerprint = trajectory === null ? "" : `${documentFingerprint(document)}:${JSON.stringify(trajectory)}`;
  return useQuery({
    queryKey: queryKeys.climate.trajectory(fingerprint, initialTotal),
    queryFn: ({ signal }) => fetchClimateTrajectory(document, trajectory!, initialTotal, signal),
    enabled: trajectory !== null,
    staleTime: Infinity,
    placeholderData: keepPreviousData,
    retry: false,
  });
}

export const fitThermalResponse = (request: ClimateFitRequest) => api.post<ClimateFitResponse>("/climate/fit", request);

/** Fits a response to measurements; nothing is stored. */
export function useFitThermalResponse() {
  return useMutation({ mutationFn: fitThermalResponse });
}

/** Starts a warming Run (stochastic replicates) on the saved life cycle. */
export const startWarmingRun = (lifeCycleId: string, settings: WarmingSettingsInput) =>
  api.post<WarmingRun>(`/life-cycles/${segment(lifeCycleId)}/runs`, { kind: "warming", settings });

/** Starts a warming Run; the life cycle's list of Runs is refreshed. */
export function useStartWarmingRun(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (settings: WarmingSettingsInput) => startWarmingRun(lifeCycleId, settings),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
      return queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.runs(lifeCycleId) });
    },
  });
}
