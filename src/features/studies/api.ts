import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Study, StudyCreateInput } from "@shared/schemas/studies";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** GET /api/studies: the studies the caller belongs to, with the caller's role in each. */
export function useStudies() {
  return useQuery({
    queryKey: queryKeys.studies.list(),
    queryFn: ({ signal }) => api.get<{ studies: Study[] }>("/studies", signal).then((r) => r.studies),
  });
}

/** POST /api/studies: the caller becomes the study's owner. */
export function useCreateStudy() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: StudyCreateInput) => api.post<Study>("/studies", input),
    onSuccess: (study) => {
      queryClient.setQueryData(queryKeys.studies.detail(study.id), study);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.list() });
    },
  });
}
