import { useMutation, useQueryClient } from "@tanstack/react-query";
import { studiesQuery } from "../../lib/queries/study";
import { primeSession } from "../../lib/session";
import type { LoginInput, SignupAnswer, SignupInput, User } from "@shared/schemas/auth";
import { api } from "../../lib/api";

/**
 * After signing in, up or out, nothing cached for the previous account may be shown again:
 * the cache is emptied and every screen loads afresh.
 */
function useForgetCachedData() {
  const queryClient = useQueryClient();
  return () => queryClient.removeQueries();
}

/** POST /api/auth/login (401 for a wrong e-mail or password, 429 with Retry-After when limited). */
export function useSignIn() {
  const forget = useForgetCachedData();
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: LoginInput) => api.post<User>("/auth/login", input),
    // Waited for before the form moves on (the button stays busy): the list of studies decides where
    // the person lands, and one study opens at once instead of through the list (src/lib/onlyStudy.ts).
    onSuccess: async (user) => {
      forget();
      primeSession(queryClient, user);
      await queryClient.prefetchQuery(studiesQuery());
    },
  });
}

/**
 * POST /api/auth/signup: a new address gets its account and a session (a User); an address that
 * already has an account gets `{ status: "check_mail" }` and no session, its owner a notice by mail.
 */
export function useSignUp() {
  const forget = useForgetCachedData();
  return useMutation({
    mutationFn: (input: SignupInput) => api.post<SignupAnswer>("/auth/signup", input),
    onSuccess: (answer) => {
      if (!("status" in answer)) forget();
    },
  });
}

/** POST /api/auth/logout */
export function useSignOut() {
  return useMutation({ mutationFn: () => api.post<void>("/auth/logout") });
}

/** POST /api/auth/password-reset/request: answers the same whether or not the account exists. */
export function useRequestPasswordReset() {
  return useMutation({ mutationFn: (input: { email: string }) => api.post<{ ok: true }>("/auth/password-reset/request", input) });
}

/** POST /api/auth/password-reset/confirm with the e-mailed token. */
export function useConfirmPasswordReset() {
  return useMutation({ mutationFn: (input: { token: string; password: string }) => api.post<void>("/auth/password-reset/confirm", input) });
}
