// The signed-in account. Many screens need it (the top bar, the account form, the invitation
// page), so its one query hook lives here rather than in a feature.
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { QueryClient } from "@tanstack/react-query";
import type { Me, Session, User } from "@shared/schemas/auth";
import { api, ApiError } from "./api";
import { queryKeys } from "./queryKeys";

/** The server's environment as the last session answer gave it: the same for the page's whole life. */
let environmentSeen: Me["environment"] | undefined;

/**
 * Asks GET /auth/session, which answers 200 even when nobody is signed in (a 401 would show as an
 * error in the browser's console on every signed-out load); "nobody" becomes the same 401 ApiError
 * a lapsed session gives, so the sign-in redirect and useOptionalMe treat both alike.
 */
async function fetchMe(signal: AbortSignal): Promise<Me> {
  const session = await api.get<Session>("/auth/session", signal);
  environmentSeen = session.environment;
  if (!session.user) throw new ApiError(401, "unauthorized", "Sign in to continue.");
  return { user: session.user, environment: session.environment };
}

/** GET /api/auth/session as a query; started early (at load, right after signing in) so screens find it answered. */
export const meQuery = () =>
  queryOptions({
    queryKey: queryKeys.me,
    queryFn: ({ signal }) => fetchMe(signal),
    staleTime: 5 * 60 * 1000,
  });

/**
 * After signing in: the session is the sign-in's answer (the person) and the environment already
 * seen, so the next screen does not ask for it again; asked only when the environment is not known.
 */
export function primeSession(queryClient: QueryClient, user: User): void {
  if (environmentSeen) queryClient.setQueryData(meQuery().queryKey, { user, environment: environmentSeen });
  else void queryClient.prefetchQuery(meQuery());
}

export function useMe() {
  return useQuery(meQuery());
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
