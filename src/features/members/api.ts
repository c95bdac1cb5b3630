import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { StudyRole } from "@shared/roles";
import type { InvitationCreateInput } from "@shared/schemas/studies";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";

/** POST /api/studies/:studyId/invitations: e-mails a one-time link. */
export function useInviteMember(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: InvitationCreateInput) => api.post<{ id: string }>(`${studyApiPath(studyId)}/invitations`, input),
    // The mail goes to the invited person's own outbox, never the lead's: only the list changes here.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.studies.members(studyId) }),
  });
}

/** PATCH /api/studies/:studyId/members/:userId (409 `last_owner` when no owner would remain). */
export function useChangeMemberRole(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, role }: { userId: string; role: StudyRole }) =>
      api.patch<void>(`${studyApiPath(studyId)}/members/${encodeURIComponent(userId)}`, { role }),
    // The caller's own role may have changed, so the study (and its role) is refreshed too.
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.studies.all }),
  });
}

/**
 * DELETE /api/studies/:studyId/members/:userId (409 `last_owner` when no owner would remain).
 * `leaving` is true when the caller removes themself: the study's pages are then not refetched,
 * since the caller may no longer read them.
 */
export function useRemoveMember(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ userId }: { userId: string; leaving: boolean }) => api.delete(`${studyApiPath(studyId)}/members/${encodeURIComponent(userId)}`),
    onSuccess: (_result, { leaving }) =>
      queryClient.invalidateQueries({ queryKey: queryKeys.studies.all, refetchType: leaving ? "none" : "active" }),
  });
}
