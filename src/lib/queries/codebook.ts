// The study's codebook (its traits), read by the codebook, trait table, imports, overview,
// selectivity and modern comparison screens.
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { TraitList } from "@shared/schemas/traits";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

/** GET /api/studies/:studyId/traits: the codebook in order, retired traits included. */
export const traitsQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.traits.list(studyId),
    queryFn: ({ signal }) => api.get<TraitList>(studyApiPath(studyId, "/traits"), signal),
  });

export const useTraits = (studyId: string) => useQuery(traitsQuery(studyId));
