/** The one QueryClient, with the app-wide rules for retries and for a session that has ended. */
import { MutationCache, QueryCache, QueryClient } from "@tanstack/react-query";
import { isApiError } from "./client";
import { queryKeys } from "./keys";
import { markSessionExpired } from "./session";

/** Retry only what may succeed on a second try: network trouble and 5xx, not 4xx answers. */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (isApiError(error) && error.status >= 400 && error.status < 500) return false;
  return failureCount < 2;
}

export const queryClient: QueryClient = new QueryClient({
  queryCache: new QueryCache({
    onError: (error, query) => {
      // A protected query answering 401 means the session is gone; the
      // protected layout sees that and sends the person to sign-in with ?next=.
      if (isApiError(error) && error.status === 401 && query.queryKey[0] !== queryKeys.session[0]) {
        markSessionExpired(queryClient);
      }
    },
  }),
  mutationCache: new MutationCache({
    onError: (error) => {
      // A write answering 401 may be a wrong password as well as an ended
      // session: ask the server which.
      if (isApiError(error) && error.status === 401) {
        void queryClient.invalidateQueries({ queryKey: queryKeys.session });
      }
    },
  }),
  defaultOptions: {
    queries: { staleTime: 30_000, retry: shouldRetry },
    mutations: { retry: false },
  },
});
