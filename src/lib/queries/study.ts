// The study itself, read by the study layout and by the printable reports that stand outside it.
import { queryOptions, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Study } from "@shared/schemas/studies";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

/** GET /api/studies/:studyId */
export const studyQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.detail(studyId),
    queryFn: ({ signal }) => api.get<Study>(studyApiPath(studyId), signal),
  });

/** The study; opened from the studies list, the list's copy shows at once (no second round trip) and is refreshed when stale. */
export function useStudy(studyId: string) {
  const queryClient = useQueryClient();
  return useQuery({
    ...studyQuery(studyId),
    initialData: () => queryClient.getQueryData<Study[]>(queryKeys.studies.list())?.find((s) => s.id === studyId),
    initialDataUpdatedAt: () => queryClient.getQueryState(queryKeys.studies.list())?.dataUpdatedAt,
  });
}

/** GET /api/studies: the studies the caller belongs to, with the caller's role in each. */
export const studiesQuery = () =>
  queryOptions({
    queryKey: queryKeys.studies.list(),
    queryFn: ({ signal }) => api.get<{ studies: Study[] }>("/studies", signal).then((r) => r.studies),
  });
