/** The session and everything that starts or ends it: sign-in, sign-up, sign-out, password reset. */
import { type QueryClient, queryOptions, useMutation, useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import type {
  PasswordResetConfirm,
  PasswordResetRequest,
  SessionInfo,
  SignIn,
  SignUp,
  SignUpConfirm,
  User,
} from "../../shared/schemas";
import { api } from "./client";
import { queryKeys } from "./keys";

/** The session as the client holds it; `endedBy` tells a deliberate sign-out from an expired session. */
export type SessionState = SessionInfo & { endedBy?: "sign-out" | "expired" };

export const fetchSession = (signal?: AbortSignal) => api.get<SessionInfo>("/auth/session", signal);

export const sessionQueryOptions = () =>
  queryOptions<SessionState>({
    queryKey: queryKeys.session,
    queryFn: ({ signal }) => fetchSession(signal),
    staleTime: 60_000,
  });

/** The current session. The root route's loader fetches it before anything renders. */
export function useSession(): SessionState {
  return useSuspenseQuery(sessionQueryOptions()).data;
}

export function useCurrentUser(): User | null {
  return useSession().user;
}

/** Forgets every cached answer but the session itself, so no resource added later can be missed. */
function dropPersonalData(queryClient: QueryClient) {
  queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== queryKeys.session[0] });
}

/** A new person is signed in: forget whatever the previous one could see. */
export function startSession(queryClient: QueryClient, user: User) {
  dropPersonalData(queryClient);
  queryClient.setQueryData<SessionState>(queryKeys.session, { user });
}

/** Called when a protected request answers 401: the layout then sends the person to sign-in. */
export function markSessionExpired(queryClient: QueryClient) {
  const current = queryClient.getQueryData<SessionState>(queryKeys.session);
  if (!current?.user) return;
  queryClient.setQueryData<SessionState>(queryKeys.session, { user: null, endedBy: "expired" });
}

export const signIn = (body: SignIn) => api.post<{ user: User }>("/auth/sign-in", body);

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: ({ user }) => startSession(queryClient, user),
  });
}

/** A finished sign-up: the new account is signed in (and joined the invited Study). */
export type SignUpDone = { user: User; joinedStudyId?: string };
/**
 * Sign-up answers `{ message }` (202) while the e-mailed link waits to be
 * opened — the same for every address, registered or not — and `SignUpDone`
 * (201) only when an invitation sent to that very address proved it.
 */
export type SignUpResult = SignUpDone | { message: string };
export const signUp = (body: SignUp) => api.post<SignUpResult>("/auth/sign-up", body);

export function useSignUp() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signUp,
    onSuccess: (result) => {
      if ("user" in result) startSession(queryClient, result.user);
    },
  });
}

export const confirmSignUp = (body: SignUpConfirm) => api.post<SignUpDone>("/auth/sign-up/confirm", body);

export function useConfirmSignUp() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: confirmSignUp,
    onSuccess: ({ user }) => startSession(queryClient, user),
  });
}

export const signOut = () => api.post<void>("/auth/sign-out");

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    onSuccess: () => {
      dropPersonalData(queryClient);
      queryClient.setQueryData<SessionState>(queryKeys.session, { user: null, endedBy: "sign-out" });
    },
  });
}

export const requestPasswordReset = (body: PasswordResetRequest) =>
  api.post<{ message: string }>("/auth/password-reset/request", body);

export function useRequestPasswordReset() {
  return useMutation({ mutationFn: requestPasswordReset });
}

export const confirmPasswordReset = (body: PasswordResetConfirm) =>
  api.post<void>("/auth/password-reset/confirm", body);

export function useConfirmPasswordReset() {
  return useMutation({ mutationFn: confirmPasswordReset });
}
