/** Invitations: the owner's pending list, sending and revoking, and the public invitation link. */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Invitation, InvitationCreate, InvitationPreview } from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";
import { invalidateStudy } from "./studies";

const invitationsPath = (studyId: string) => `/studies/${segment(studyId)}/invitations`;

export const fetchInvitations = (studyId: string, signal?: AbortSignal) =>
  api.get<Invitation[]>(invitationsPath(studyId), signal);

export const invitationsQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.invitations(studyId),
    queryFn: ({ signal }) => fetchInvitations(studyId, signal),
  });

/** Pending invitations; owners only (the server answers 403 to anyone else). */
export function useInvitations(studyId: string) {
  return useQuery(invitationsQueryOptions(studyId));
}

export const createInvitation = (studyId: string, body: InvitationCreate) =>
  api.post<Invitation>(invitationsPath(studyId), body);

export function useCreateInvitation(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationCreate) => createInvitation(studyId, body),
    onSuccess: () => invalidateStudy(queryClient, studyId),
  });
}

export const revokeInvitation = (studyId: string, invitationId: string) =>
  api.delete(`${invitationsPath(studyId)}/${segment(invitationId)}`);

export function useRevokeInvitation(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: string) => revokeInvitation(studyId, invitationId),
    onSuccess: () => invalidateStudy(queryClient, studyId),
  });
}

export const fetchInvitationPreview = (token: string, signal?: AbortSignal) =>
  api.get<InvitationPreview>(`/invitations/${segment(token)}`, signal);

export const invitationPreviewQueryOptions = (token: string) =>
  queryOptions({
    queryKey: queryKeys.invitations.preview(token),
    queryFn: ({ signal }) => fetchInvitationPreview(token, signal),
    staleTime: 5 * 60_000,
  });

/** What an invitation link offers; readable without signing in. */
export function useInvitationPreview(token: string | null) {
  return useQuery({ ...invitationPreviewQueryOptions(token ?? ""), enabled: Boolean(token) });
}

export const acceptInvitation = (token: string) =>
  api.post<{ studyId: string }>(`/invitations/${segment(token)}/accept`);

export function useAcceptInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    onSuccess: ({ studyId }, token) => {
      queryClient.removeQueries({ queryKey: queryKeys.invitations.preview(token) });
      return invalidateStudy(queryClient, studyId);
    },
  });
}
