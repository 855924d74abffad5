/** The development mail outbox: messages caught by the local SMTP fake. GET /dev/mail is 404 in production. */
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { MailMessage } from "../../shared/schemas";
import { api } from "./client";
import { queryKeys } from "./keys";

export const fetchMail = (signal?: AbortSignal) => api.get<MailMessage[]>("/dev/mail", signal);

export const mailQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.devMail,
    queryFn: ({ signal }) => fetchMail(signal),
    // A 404 means "production": asking again will not change that.
    retry: false,
  });

/** The caught messages; refreshed every few seconds while the outbox is open. */
export function useMail() {
  return useQuery({ ...mailQueryOptions(), refetchInterval: 5_000 });
}

/** True only when the server answers GET /dev/mail with 200 (development). */
export function useMailOutboxAvailable(): boolean {
  return useQuery({ ...mailQueryOptions(), staleTime: Infinity, refetchOnWindowFocus: false }).isSuccess;
}
