/**
 * Life cycles: a Study's list, creating (blank or from a whole document),
 * one life cycle, saving with optimistic concurrency, duplicating, deleting
 * and restoring deleted ones.
 */
import { type QueryClient, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { LifeCycle } from "../../shared/lifecycle";
import type { DeletedLifeCycle, LifeCycleRecord, LifeCycleSummary } from "../../shared/schemas/life-cycles";
import { ApiError, api, segment } from "./client";
import { queryKeys } from "./keys";

export type { DeletedLifeCycle, LifeCycleRecord, LifeCycleSummary };

/** A blank life cycle by name, or a whole Stagewright document (template, CSV import, file). */
export type LifeCycleCreate = { name: string } | { document: LifeCycle };

const lifeCyclesPath = (studyId: string) => `/studies/${segment(studyId)}/life-cycles`;
const lifeCyclePath = (lifeCycleId: string) => `/life-cycles/${segment(lifeCycleId)}`;

// ------------------------------------------------------------------ the list

export const fetchLifeCycles = (studyId: string, signal?: AbortSignal) =>
  api.get<LifeCycleSummary[]>(lifeCyclesPath(studyId), signal);

export const lifeCyclesQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.lifeCycles(studyId),
    queryFn: ({ signal }) => fetchLifeCycles(studyId, signal),
  });

export function useLifeCycles(studyId: string) {
  return useQuery(lifeCyclesQueryOptions(studyId));
}

/** After a life cycle of the Study appears, changes or goes: the list, the bin and the activity. */
function invalidateStudyLifeCycles(queryClient: QueryClient, studyId: string) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: queryKeys.studies.lifeCycles(studyId) }),
    queryClient.invalidateQueries({ queryKey: queryKeys.studies.deletedLifeCycles(studyId) }),
    queryClient.invalidateQueries({ queryKey: queryKeys.studies.activity(studyId) }),
  ]);
}

export const createLifeCycle = (studyId: string, body: LifeCycleCreate) => api.post<LifeCycleRecord>(lifeCyclesPath(studyId), body);

export function useCreateLifeCycle(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: LifeCycleCreate) => createLifeCycle(studyId, body),
    onSuccess: (record) => {
      queryClient.setQueryData(queryKeys.lifeCycles.detail(record.id), record);
      return invalidateStudyLifeCycles(queryClient, studyId);
    },
  });
}

// ------------------------------------------------------------ one life cycle

export const fetchLifeCycle = (lifeCycleId: string, signal?: AbortSignal) => api.get<LifeCycleRecord>(lifeCyclePath(lifeCycleId), signal);

export const lifeCycleQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.detail(lifeCycleId),
    queryFn: ({ signal }) => fetchLifeCycle(lifeCycleId, signal),
  });

export function useLifeCycle(lifeCycleId: string) {
  return useQuery(lifeCycleQueryOptions(lifeCycleId));
}

/** Saves the whole document if nobody saved since `version`; a stale version is refused with 409 (see `conflictRecord`). */
export const saveLifeCycle = (lifeCycleId: string, version: number, document: LifeCycle) =>
  api.put<LifeCycleRecord>(lifeCyclePath(lifeCycleId), { version, document });

/** The current state a 409 answer carries: who saved, at which version, and their document. */
export function conflictRecord(error: unknown): LifeCycleRecord | null {
  if (!(error instanceof ApiError) || error.status !== 409) return null;
  const body = error.body;
  if (typeof body !== "object" || body === null || !("current" in body)) return null;
  const current = (body as { current: unknown }).current;
  if (typeof current !== "object" || current === null || !("document" in current) || !("version" in current)) return null;
  return current as LifeCycleRecord;
}

export const duplicateLifeCycle = (lifeCycleId: string, name?: string) =>
  api.post<LifeCycleRecord>(`${lifeCyclePath(lifeCycleId)}/duplicate`, name === undefined ? {} : { name });

export function useDuplicateLifeCycle(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ lifeCycleId, name }: { lifeCycleId: string; name?: string }) => duplicateLifeCycle(lifeCycleId, name),
    onSuccess: (record) => {
      queryClient.setQueryData(queryKeys.lifeCycles.detail(record.id), record);
      return invalidateStudyLifeCycles(queryClient, studyId);
    },
  });
}

export const deleteLifeCycle = (lifeCycleId: string) => api.delete(lifeCyclePath(lifeCycleId));

export function useDeleteLifeCycle(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (lifeCycleId: string) => deleteLifeCycle(lifeCycleId),
    onSuccess: (_nothing, lifeCycleId) => {
      queryClient.removeQueries({ queryKey: queryKeys.lifeCycles.detail(lifeCycleId) });
      return invalidateStudyLifeCycles(queryClient, studyId);
    },
  });
}

// ----------------------------------------------------------- recently deleted

export const fetchDeletedLifeCycles = (studyId: string, signal?: AbortSignal) =>
  api.get<DeletedLifeCycle[]>(`/studies/${segment(studyId)}/deleted-life-cycles`, signal);

export const deletedLifeCyclesQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.deletedLifeCycles(studyId),
    queryFn: ({ signal }) => fetchDeletedLifeCycles(studyId, signal),
  });

/** Editors only (the server refuses others); `enabled` keeps viewers from asking. */
export function useDeletedLifeCycles(studyId: string, enabled: boolean) {
  return useQuery({ ...deletedLifeCyclesQueryOptions(studyId), enabled });
}

export const undeleteLifeCycle = (lifeCycleId: string) => api.post<LifeCycleRecord>(`${lifeCyclePath(lifeCycleId)}/undelete`);

export function useUndeleteLifeCycle(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (lifeCycleId: string) => undeleteLifeCycle(lifeCycleId),
    onSuccess: (record) => {
      queryClient.setQueryData(queryKeys.lifeCycles.detail(record.id), record);
      return invalidateStudyLifeCycles(queryClient, studyId);
    },
  });
}
