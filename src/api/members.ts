/** Members of a Study and their roles. */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Member, MemberUpdate } from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";
import { invalidateStudy } from "./studies";

const membersPath = (studyId: string) => `/studies/${segment(studyId)}/members`;

export const fetchMembers = (studyId: string, signal?: AbortSignal) => api.get<Member[]>(membersPath(studyId), signal);

export const membersQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.members(studyId),
    queryFn: ({ signal }) => fetchMembers(studyId, signal),
  });

export function useMembers(studyId: string) {
  return useQuery(membersQueryOptions(studyId));
}

export const updateMember = (studyId: string, userId: string, body: MemberUpdate) =>
  api.patch<Member>(`${membersPath(studyId)}/${segment(userId)}`, body);

export function useUpdateMember(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string } & MemberUpdate) => updateMember(studyId, userId, { role }),
    onSettled: () => invalidateStudy(queryClient, studyId),
  });
}

/** Owners remove anyone; any member may remove themselves (leave the Study). */
export const removeMember = (studyId: string, userId: string) =>
  api.delete(`${membersPath(studyId)}/${segment(userId)}`);

export function useRemoveMember(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (userId: string) => removeMember(studyId, userId),
    onSuccess: () => invalidateStudy(queryClient, studyId),
  });
}
