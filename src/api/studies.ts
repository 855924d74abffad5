/** Studies: the list, one Study, creating, renaming and archiving. */
import { queryOptions, useMutation, useQuery, useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import type { Study, StudyCreate, StudyUpdate } from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export const fetchStudies = (signal?: AbortSignal) => api.get<Study[]>("/studies", signal);

export const studiesQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.studies.list(),
    queryFn: ({ signal }) => fetchStudies(signal),
  });

export function useStudies() {
  return useQuery(studiesQueryOptions());
}

export const fetchStudy = (studyId: string, signal?: AbortSignal) =>
  api.get<Study>(`/studies/${segment(studyId)}`, signal);

export const studyQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.detail(studyId),
    queryFn: ({ signal }) => fetchStudy(studyId, signal),
  });

/** One Study; suspends while loading and lets a 404 reach the route's error boundary. */
export function useStudy(studyId: string): Study {
  return useSuspenseQuery(studyQueryOptions(studyId)).data;
}

export const createStudy = (body: StudyCreate) => api.post<Study>("/studies", body);

export function useCreateStudy() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createStudy,
    onSuccess: (study) => {
      queryClient.setQueryData(queryKeys.studies.detail(study.id), study);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() });
    },
  });
}

export const updateStudy = (studyId: string, body: StudyUpdate) =>
  api.patch<Study>(`/studies/${segment(studyId)}`, body);

export function useUpdateStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: StudyUpdate) => updateStudy(studyId, body),
    onSuccess: (study) => {
      queryClient.setQueryData(queryKeys.studies.detail(studyId), study);
      void queryClient.invalidateQueries({ queryKey: queryKeys.studies.activity(studyId) });
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() });
    },
  });
}

/** After any write inside a Study: refresh that Study (and everything under it) and the list. */
export function invalidateStudy(queryClient: ReturnType<typeof useQueryClient>, studyId: string) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId) }),
    queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() }),
  ]);
}
