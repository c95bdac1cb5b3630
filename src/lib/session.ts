// The signed-in account. Many screens need it (the top bar, the account form, the invitation
// page), so its one query hook lives here rather than in a feature.
import { useQuery } from "@tanstack/react-query";
import type { Me } from "@shared/schemas/auth";
import { api, ApiError } from "./api";
import { queryKeys } from "./queryKeys";

export function useMe() {
  return useQuery({
    queryKey: queryKeys.me,
    queryFn: ({ signal }) => api.get<Me>("/auth/me", signal),
    staleTime: 5 * 60 * 1000,
  });
}

/**
 * For public pages: the account when signed in, `null` when signed out (a 401 is an answer
 * here, not an error), `undefined` while loading.
 */
export function useOptionalMe(): { me: Me | null | undefined; error: unknown; refetch: () => void } {
  const query = useMe();
  const signedOut = query.error instanceof ApiError && query.error.isUnauthorized;
  return {
    me: signedOut ? null : query.data,
    error: signedOut ? null : query.error,
    refetch: () => void query.refetch(),
  };
}
