/** The signed-in person's own account: profile, password and personal API tokens. */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type {
  ApiToken,
  ApiTokenCreate,
  NewApiToken,
  PasswordChange,
  ProfileUpdate,
  User,
} from "../../shared/schemas";
import { api, segment } from "./client";
import { queryKeys } from "./keys";
import type { SessionState } from "./session";

export const updateProfile = (body: ProfileUpdate) => api.patch<{ user: User }>("/account/profile", body);

export function useUpdateProfile() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updateProfile,
    onSuccess: ({ user }) => {
      queryClient.setQueryData<SessionState>(queryKeys.session, { user });
      // The name also shows in member lists and activity.
      void queryClient.invalidateQueries({ queryKey: queryKeys.studies.all });
    },
  });
}

export const changePassword = (body: PasswordChange) => api.post<void>("/account/password", body);

export function useChangePassword() {
  return useMutation({ mutationFn: changePassword });
}

export const fetchApiTokens = (signal?: AbortSignal) => api.get<ApiToken[]>("/account/tokens", signal);

export const apiTokensQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.account.tokens(),
    queryFn: ({ signal }) => fetchApiTokens(signal),
  });

export function useApiTokens() {
  return useQuery(apiTokensQueryOptions());
}

export const createApiToken = (body: ApiTokenCreate) => api.post<NewApiToken>("/account/tokens", body);

export function useCreateApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createApiToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.account.tokens() }),
  });
}

export const revokeApiToken = (tokenId: string) => api.delete(`/account/tokens/${segment(tokenId)}`);

export function useRevokeApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: revokeApiToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.account.tokens() }),
  });
}
