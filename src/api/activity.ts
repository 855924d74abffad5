/** A Study's audit trail. */
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { AuditEvent } from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export const fetchActivity = (studyId: string, signal?: AbortSignal) =>
  api.get<AuditEvent[]>(`/studies/${segment(studyId)}/activity`, signal);

export const activityQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.activity(studyId),
    queryFn: ({ signal }) => fetchActivity(studyId, signal),
  });

export function useActivity(studyId: string) {
  return useQuery(activityQueryOptions(studyId));
}
