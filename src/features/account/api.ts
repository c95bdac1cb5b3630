import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { ApiTokenCreated, ApiTokenCreateInput, ApiTokenList } from "@shared/schemas/apiTokens";
import type { Me, User } from "@shared/schemas/auth";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** PATCH /api/auth/me */
export function useUpdateName() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: { name: string }) => api.patch<User>("/auth/me", input),
    onSuccess: (user) => {
      queryClient.setQueryData<Me>(queryKeys.me, (me) => (me ? { ...me, user } : me));
      // Member lists show the name.
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.all });
    },
  });
}

/** POST /api/auth/password: ends every other session of the account. */
export function useChangePassword() {
  return useMutation({
    mutationFn: (input: { currentPassword: string; newPassword: string }) => api.post<void>("/auth/password", input),
  });
}

/** GET /api/tokens: the person's API tokens (never the tokens themselves). */
export function useApiTokens() {
  return useQuery({
    queryKey: queryKeys.apiTokens,
    queryFn: ({ signal }) => api.get<ApiTokenList>("/tokens", signal).then((r) => r.tokens),
  });
}

/** POST /api/tokens: the answer holds the token once. */
export function useCreateApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ApiTokenCreateInput) => api.post<ApiTokenCreated>("/tokens", input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.apiTokens }),
  });
}

/** DELETE /api/tokens/:tokenId: the token stops working with its next request. */
export function useRevokeApiToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (tokenId: string) => api.delete<void>(`/tokens/${encodeURIComponent(tokenId)}`),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.apiTokens }),
  });
}
