// The trait table's API hooks: one per endpoint, keys from src/lib/queryKeys.ts.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { DecisionRevertInput, RevertResult } from "@shared/schemas/decisions";
import type { TaxaBulkEditInput, TaxaBulkResult, TaxaIds, TaxaPage, TaxonHistory, TaxonRow, TaxonSaved, TaxonUpdateInput } from "@shared/schemas/taxa";
import type { EXPORT_FORMS } from "@shared/schemas/exports";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";


/**
 * GET /api/studies/:studyId/taxa?page&pageSize&sort&dir&filter&missing&hasOpenThread: one page of
 * the grid. The previous page stays on screen while the next one loads.
 */
export function useTaxaPage(studyId: string, query: string) {
  return useQuery({
    queryKey: queryKeys.taxa.page(studyId, query),
    queryFn: ({ signal }) => api.get<TaxaPage>(`${studyApiPath(studyId)}/taxa?${query}`, signal),
    placeholderData: keepPreviousData,
  });
}

/** GET /api/studies/:studyId/taxa/ids?sort&dir&filter&missing&hasOpenThread: every matching taxon, to select them all. */
export function useMatchingTaxonIds(studyId: string) {
  return useMutation({
    mutationFn: (matchingQuery: string) => api.get<TaxaIds>(`${studyApiPath(studyId)}/taxa/ids?${matchingQuery}`),
  });
}

/**
 * Puts a row as the server holds it into every cached page that shows it, without reloading (and
 * reordering) the grid: after a save, or when "take the current value" settles a conflict.
 */
export function useReplaceRow(studyId: string) {
  const queryClient = useQueryClient();
  return (row: TaxonRow) => {
    queryClient.setQueriesData<TaxaPage>({ queryKey: [...queryKeys.taxa.all(studyId), "page"] }, (page) =>
      // A saved row carries no counts of finds: the page's are kept.
      page && page.rows.some((r) => r.id === row.id) ? { ...page, rows: page.rows.map((r) => (r.id === row.id ? { ...r, ...row } : r)) } : page,
    );
  };
}

/**
 * PATCH /api/studies/:studyId/taxa/:taxonId with the row version the edit is based on; 409
 * (TaxonConflict) when someone changed the row since.
 */
export function useUpdateTaxon(studyId: string) {
  const queryClient = useQueryClient();
  const replaceRow = useReplaceRow(studyId);
  return useMutation({
    mutationFn: ({ taxonId, input }: { taxonId: string; input: TaxonUpdateInput }) =>
      api.patch<TaxonSaved>(`${studyApiPath(studyId)}/taxa/${encodeURIComponent(taxonId)}`, input),
    onSuccess: (saved) => {
      replaceRow(saved.taxon);
      return Promise.all([
        queryClient.invalidateQueries({ queryKey: [...queryKeys.taxa.all(studyId), "history", saved.taxon.id] }),
        // Other pages may now sort or filter differently: refresh them when next shown.
        queryClient.invalidateQueries({ queryKey: [...queryKeys.taxa.all(studyId), "page"], refetchType: "none" }),
        queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
      ]);
    },
  });
}

/** POST /api/studies/:studyId/taxa/bulk: one value for a selection, with one shared reason. */
export function useBulkEditTaxa(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: TaxaBulkEditInput) => api.post<TaxaBulkResult>(`${studyApiPath(studyId)}/taxa/bulk`, input),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
      ]),
  });
}

/** Which cell a history is about: a trait's value, or a taxon column. */
export type HistoryCell = { traitId: string } | { field: "name" | "higherTaxon" | "notes" | "fad" | "lad" };

const cellParam = (cell: HistoryCell) => ("traitId" in cell ? `traitId=${encodeURIComponent(cell.traitId)}` : `field=${cell.field}`);

/** GET /api/studies/:studyId/taxa/:taxonId/history?traitId|field: who changed the cell, when, from what, to what and why. */
export function useTaxonHistory(studyId: string, taxonId: string, cell: HistoryCell) {
  const param = cellParam(cell);
  return useQuery({
    queryKey: queryKeys.taxa.history(studyId, taxonId, param),
    queryFn: ({ signal }) => api.get<TaxonHistory>(`${studyApiPath(studyId)}/taxa/${encodeURIComponent(taxonId)}/history?${param}`, signal),
  });
}

/** POST /api/studies/:studyId/decisions/:decisionId/revert; 409 (RevertConflict) when the value changed since. */
export function useRevertDecision(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ decisionId, input }: { decisionId: string; input: DecisionRevertInput }) =>
      api.post<RevertResult>(`${studyApiPath(studyId)}/decisions/${encodeURIComponent(decisionId)}/revert`, input),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
      ]),
  });
}

/** GET /api/studies/:studyId/exports/taxa.csv?form&includeRetired: the table as a file (a plain download link). */
export const taxaCsvUrl = (studyId: string, form: (typeof EXPORT_FORMS)[number], includeRetired: boolean) =>
  `/api${studyApiPath(studyId)}/exports/taxa.csv?form=${form}&includeRetired=${includeRetired}`;

/** GET /api/studies/:studyId/exports/codebook.csv: the companion file of an export. */
