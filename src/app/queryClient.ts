import { MutationCache, QueryCache, QueryClient } from "@tanstack/react-query";
import { ApiError, NETWORK_ERROR_CODE } from "../lib/api";

const MAX_RETRIES = 2;

/** Retrying helps with a dropped connection or a restarting server, never with a refusal (4xx). */
function shouldRetry(failureCount: number, error: unknown): boolean {
  if (failureCount >= MAX_RETRIES) return false;
  if (!(error instanceof ApiError)) return false;
  return error.code === NETWORK_ERROR_CODE || error.status >= 500;
}

/** `onUnauthorized` runs whenever any query or mutation is answered 401 (the session ended). */
export function createQueryClient(onUnauthorized: () => void): QueryClient {
  const handleError = (error: unknown) => {
    if (error instanceof ApiError && error.isUnauthorized) onUnauthorized();
  };
  return new QueryClient({
    queryCache: new QueryCache({ onError: handleError }),
    mutationCache: new MutationCache({ onError: handleError }),
    defaultOptions: {
      queries: { retry: shouldRetry, staleTime: 30 * 1000 },
      mutations: { retry: false },
    },
  });
}
