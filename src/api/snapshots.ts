/**
 * Snapshots of a life cycle: the numbered list, one snapshot with its
 * document, taking a snapshot of the saved state, and restoring one (which
 * the server records as a new snapshot; history only grows).
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { LifeCycleRecord, Snapshot, SnapshotSummary } from "../../shared/schemas/life-cycles";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { Snapshot, SnapshotSummary };

const snapshotsPath = (lifeCycleId: string) => `/life-cycles/${segment(lifeCycleId)}/snapshots`;

export const fetchSnapshots = (lifeCycleId: string, signal?: AbortSignal) => api.get<SnapshotSummary[]>(snapshotsPath(lifeCycleId), signal);

export const snapshotsQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.snapshots(lifeCycleId),
    queryFn: ({ signal }) => fetchSnapshots(lifeCycleId, signal),
  });

/** Newest first. */
export function useSnapshots(lifeCycleId: string) {
  return useQuery(snapshotsQueryOptions(lifeCycleId));
}

export const fetchSnapshot = (snapshotId: string, signal?: AbortSignal) => api.get<Snapshot>(`/snapshots/${segment(snapshotId)}`, signal);

export const snapshotQueryOptions = (snapshotId: string) =>
  queryOptions({
    queryKey: queryKeys.snapshots.detail(snapshotId),
    queryFn: ({ signal }) => fetchSnapshot(snapshotId, signal),
    // Snapshots never change.
    staleTime: Infinity,
  });

/** One snapshot with its document; idle while `snapshotId` is null. */
export function useSnapshot(snapshotId: string | null) {
  return useQuery({ ...snapshotQueryOptions(snapshotId ?? ""), enabled: snapshotId !== null });
}

export const createSnapshot = (lifeCycleId: string, message: string) => api.post<Snapshot>(snapshotsPath(lifeCycleId), { message });

export function useCreateSnapshot(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (message: string) => createSnapshot(lifeCycleId, message),
    onSuccess: (snapshot) => {
      queryClient.setQueryData(queryKeys.snapshots.detail(snapshot.id), snapshot);
      return queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.snapshots(lifeCycleId) });
    },
  });
}

export interface RestoreResult {
  lifeCycle: LifeCycleRecord;
  snapshot: Snapshot;
}

/** Makes the snapshot the current state if nobody saved since `version` (else 409). */
export const restoreSnapshot = (lifeCycleId: string, snapshotId: string, version: number) =>
  api.post<RestoreResult>(`${snapshotsPath(lifeCycleId)}/${segment(snapshotId)}/restore`, { version });

export function useRestoreSnapshot(lifeCycleId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ snapshotId, version }: { snapshotId: string; version: number }) => restoreSnapshot(lifeCycleId, snapshotId, version),
    onSuccess: (result) => {
      queryClient.setQueryData(queryKeys.snapshots.detail(result.snapshot.id), result.snapshot);
      return queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.snapshots(lifeCycleId) });
    },
  });
}
