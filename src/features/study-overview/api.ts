import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { Study, StudyUpdateInput } from "@shared/schemas/studies";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** PATCH /api/studies/:studyId (owners). */
export function useUpdateStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: StudyUpdateInput) => api.patch<Study>(`/studies/${encodeURIComponent(studyId)}`, input),
    onSuccess: (study) => {
      queryClient.setQueryData(queryKeys.studies.detail(studyId), study);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() });
    },
  });
}

/** DELETE /api/studies/:studyId (owners): the study and everything in it. */
export function useDeleteStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.delete(`/studies/${encodeURIComponent(studyId)}`),
    onSuccess: () =>
      Promise.all([
        // Not refetched now (it would answer "not a member" while the page is still open);
        // marked stale so a later visit asks the server again.
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId), refetchType: "none" }),
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() }),
      ]),
  });
}
