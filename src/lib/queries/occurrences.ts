// One taxon's finds, read by the trait table (from a taxon's row) and by the ranges preview on the Imports screen.
import { useQuery } from "@tanstack/react-query";
import type { OccurrenceList } from "@shared/schemas/occurrences";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

/** Below the study's key, so an occurrence upload or revert (which refreshes `[...detail, "occurrences"]`) refreshes it. */
export const taxonOccurrencesKey = (studyId: string, taxon: string) => [...queryKeys.studies.detail(studyId), "occurrences", "taxon", taxon] as const;

/** GET /api/studies/:studyId/occurrences?taxon: one taxon's finds, oldest first. */
export function useTaxonOccurrences(studyId: string, taxon: string | null) {
  return useQuery({
    queryKey: taxonOccurrencesKey(studyId, taxon ?? ""),
    queryFn: ({ signal }) => api.get<OccurrenceList>(`${studyApiPath(studyId, "/occurrences")}?taxon=${encodeURIComponent(taxon ?? "")}`, signal),
    enabled: taxon !== null,
  });
}
