/** Life cycles of a Study: the list and creating a blank one. The editor comes in a later release. */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

// Local types until the shared LifeCycle schema (shared/schemas) replaces them.
export type LifeCycleSummary = {
  id: string;
  name: string;
  version: number;
  updatedAt: string;
  updatedBy: string | null;
};

export type LifeCycle = {
  id: string;
  studyId: string;
  name: string;
  version: number;
  document: unknown;
  updatedAt: string;
};

export type LifeCycleCreate = { name: string };

const lifeCyclesPath = (studyId: string) => `/studies/${segment(studyId)}/life-cycles`;

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

export const createLifeCycle = (studyId: string, body: LifeCycleCreate) =>
  api.post<LifeCycle>(lifeCyclesPath(studyId), body);

export function useCreateLifeCycle(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: LifeCycleCreate) => createLifeCycle(studyId, body),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.lifeCycles(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.activity(studyId) }),
      ]),
  });
}
