import { useMutation, useQueryClient } from "@tanstack/react-query";
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
