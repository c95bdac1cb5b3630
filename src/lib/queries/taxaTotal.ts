// Whether a study has taxa yet: the Overview's first steps and the Selectivity screen's empty state ask it.
import { useQuery } from "@tanstack/react-query";
import type { TaxaPage } from "@shared/schemas/taxa";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

const ONE_ROW = "page=1&pageSize=1";

/** GET /api/studies/:studyId/taxa?page=1&pageSize=1: only the total (the key is the Overview's, so the answer is shared). */
export function useStudyTaxaTotal(studyId: string) {
  return useQuery({
    queryKey: queryKeys.taxa.page(studyId, ONE_ROW),
    queryFn: ({ signal }) => api.get<TaxaPage>(studyApiPath(studyId, `/taxa?${ONE_ROW}`), signal),
    select: (page) => page.total,
  });
}
