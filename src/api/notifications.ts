/** E-mail preferences of the signed-in person, and unsubscribing from a link (no sign-in needed). */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { NotificationMode, NotificationPreferences } from "../../shared/schemas/review";
import { api } from "./client";
import { queryKeys } from "./keys";

export type { NotificationMode };

export const notificationPreferencesQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.account.notifications(),
    queryFn: ({ signal }) => api.get<NotificationPreferences>("/account/notifications", signal),
  });

export function useNotificationPreferences() {
  return useQuery(notificationPreferencesQueryOptions());
}

export function useSetNotificationPreferences() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: NotificationPreferences) => api.put<NotificationPreferences>("/account/notifications", body),
    onSuccess: (data) => queryClient.setQueryData(queryKeys.account.notifications(), data),
  });
}

export function useUnsubscribe() {
  return useMutation({
    mutationFn: (token: string) => api.post<{ email: string; mode: NotificationMode }>("/notifications/unsubscribe", { token }),
  });
}
