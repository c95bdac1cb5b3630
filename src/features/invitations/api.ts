import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { StudyRole } from "@shared/roles";
import type { InvitationPreview } from "@shared/schemas/studies";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** GET /api/invitations/:token: public, so the page can show the study before signing in. */
export function useInvitationPreview(token: string) {
  return useQuery({
    queryKey: queryKeys.invitation(token),
    queryFn: ({ signal }) => api.get<InvitationPreview>(`/invitations/${encodeURIComponent(token)}`, signal),
  });
}

/** POST /api/invitations/:token/accept as the signed-in account. */
export function useAcceptInvitation(token: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<{ studyId: string; role: StudyRole }>(`/invitations/${encodeURIComponent(token)}/accept`),
    onSuccess: () => {
      // The token is spent: its preview must be asked again next time (it will answer 404),
      // but not now, while this page is still on screen.
      void queryClient.invalidateQueries({ queryKey: queryKeys.invitation(token), refetchType: "none" });
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.all });
    },
  });
}
