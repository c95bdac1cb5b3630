// The study itself, read by the study layout and by the printable reports that stand outside it.
import { queryOptions, useQuery } from "@tanstack/react-query";
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

export const useStudy = (studyId: string) => useQuery(studyQuery(studyId));

/** GET /api/studies: the studies the caller belongs to, with the caller's role in each. */
export const studiesQuery = () =>
  queryOptions({
    queryKey: queryKeys.studies.list(),
    queryFn: ({ signal }) => api.get<{ studies: Study[] }>("/studies", signal).then((r) => r.studies),
  });
