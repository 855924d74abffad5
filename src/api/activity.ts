/** A Study's audit trail: the recent events, and the filtered, paged log. */
import { infiniteQueryOptions, queryOptions, useInfiniteQuery, useQuery } from "@tanstack/react-query";
import type { AuditEvent } from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { AuditEvent };

/** Filters of the activity log, as the API takes them (empty strings are left out). */
export interface ActivityFilters {
  kind?: string;
  actorId?: string;
  lifeCycleId?: string;
  from?: string;
  to?: string;
}

export const ACTIVITY_PAGE_SIZE = 50;

export const fetchActivity = (studyId: string, signal?: AbortSignal, query: Record<string, string> = {}) => {
  const search = new URLSearchParams(Object.entries(query).filter(([, v]) => v !== "")).toString();
  return api.get<AuditEvent[]>(`/studies/${segment(studyId)}/activity${search ? `?${search}` : ""}`, signal);
};

export const activityQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.activity(studyId),
    queryFn: ({ signal }) => fetchActivity(studyId, signal, { limit: "20" }),
  });

/** The newest events (the Study page's short list). */
export function useActivity(studyId: string) {
  return useQuery(activityQueryOptions(studyId));
}

const clean = (filters: ActivityFilters): Record<string, string> =>
  Object.fromEntries(Object.entries(filters).filter((e): e is [string, string] => typeof e[1] === "string" && e[1] !== ""));

export const activityLogQueryOptions = (studyId: string, filters: ActivityFilters) =>
  infiniteQueryOptions({
    queryKey: queryKeys.studies.activityLog(studyId, clean(filters)),
    queryFn: ({ signal, pageParam }) =>
      fetchActivity(studyId, signal, { ...clean(filters), limit: String(ACTIVITY_PAGE_SIZE), ...(pageParam ? { before: pageParam } : {}) }),
    initialPageParam: "",
    getNextPageParam: (last) => (last.length < ACTIVITY_PAGE_SIZE ? undefined : last[last.length - 1]!.id),
  });

/** The filtered log, newest first, a page at a time. */
export function useActivityLog(studyId: string, filters: ActivityFilters) {
  return useInfiniteQuery(activityLogQueryOptions(studyId, filters));
}
