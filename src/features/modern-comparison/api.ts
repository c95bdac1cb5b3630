// The modern comparison screens' API hooks: one per endpoint, keys from src/lib/queryKeys.ts.
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Comparison, ComparisonExportTable, ComparisonList, ComparisonParamsInput } from "@shared/schemas/comparisons";
import type { CrosswalkInput, CrosswalkSaved, ModernList, ModernListCommitInput, ModernListList, ModernListMapping, ModernListPreview, ModernListUpload } from "@shared/schemas/modernLists";
import { api } from "../../lib/api";
import { studyApiPath } from "../../lib/queries/paths";
import { queryKeys } from "../../lib/queryKeys";
import { uploadWithProgress, type UploadProgress } from "../../lib/uploadWithProgress";

const listsPath = (studyId: string) => studyApiPath(studyId, "/modern-lists");
const listPath = (studyId: string, listId: string) => `${listsPath(studyId)}/${encodeURIComponent(listId)}`;
const uploadsPath = (studyId: string) => studyApiPath(studyId, "/modern-list-uploads");
const uploadPath = (studyId: string, uploadId: string) => `${uploadsPath(studyId)}/${encodeURIComponent(uploadId)}`;
const comparisonsPath = (studyId: string) => studyApiPath(studyId, "/comparisons");
const comparisonPath = (studyId: string, comparisonId: string) => `${comparisonsPath(studyId)}/${encodeURIComponent(comparisonId)}`;

/** GET /api/studies/:studyId/modern-lists */
export function useModernLists(studyId: string) {
  return useQuery({
    queryKey: queryKeys.modernComparison.lists(studyId),
    queryFn: ({ signal }) => api.get<ModernListList>(listsPath(studyId), signal),
  });
}

/** GET /api/studies/:studyId/modern-lists/:listId: columns, values, crosswalk (saved or suggested) and its coverage. */
export function useModernList(studyId: string, listId: string) {
  return useQuery({
    queryKey: queryKeys.modernComparison.list(studyId, listId),
    queryFn: ({ signal }) => api.get<ModernList>(listPath(studyId, listId), signal),
  });
}

/** POST /api/studies/:studyId/modern-list-uploads (multipart, field `file`). */
export function useUploadModernList(studyId: string) {
  return useMutation({
    mutationFn: ({ file, onProgress }: { file: File; onProgress: (p: UploadProgress) => void }) => uploadWithProgress<ModernListUpload>(uploadsPath(studyId), "file", file, onProgress),
  });
}

/** POST /api/studies/:studyId/modern-list-uploads/:uploadId/preview */
export function usePreviewModernList(studyId: string) {
  return useMutation({
    mutationFn: ({ uploadId, mapping }: { uploadId: string; mapping: ModernListMapping }) => api.post<ModernListPreview>(`${uploadPath(studyId, uploadId)}/preview`, { mapping }),
  });
}

/** POST /api/studies/:studyId/modern-list-uploads/:uploadId/commit: the list and its valid species, or nothing. */
export function useCommitModernList(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ uploadId, input }: { uploadId: string; input: ModernListCommitInput }) => api.post<ModernList>(`${uploadPath(studyId, uploadId)}/commit`, input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.lists(studyId) }),
  });
}

/** DELETE /api/studies/:studyId/modern-list-uploads/:uploadId: drops an upload that was never saved. */
export function useDiscardModernUpload(studyId: string) {
  return useMutation({ mutationFn: (uploadId: string) => api.delete(uploadPath(studyId, uploadId)) });
}

/** PUT /api/studies/:studyId/modern-lists/:listId/crosswalk */
export function useSaveCrosswalk(studyId: string, listId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (crosswalk: CrosswalkInput) => api.put<CrosswalkSaved>(`${listPath(studyId, listId)}/crosswalk`, crosswalk),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.lists(studyId) }),
  });
}

/** DELETE /api/studies/:studyId/modern-lists/:listId (its comparisons go too). */
export function useDeleteModernList(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (listId: string) => api.delete(listPath(studyId, listId)),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.lists(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.comparisons(studyId) }),
      ]),
  });
}

/** GET /api/studies/:studyId/comparisons */
export function useComparisons(studyId: string) {
  return useQuery({
    queryKey: queryKeys.modernComparison.comparisons(studyId),
    queryFn: ({ signal }) => api.get<ComparisonList>(comparisonsPath(studyId), signal),
  });
}

/** GET /api/studies/:studyId/comparisons/:comparisonId: stored results, never recomputed. */
export function useComparison(studyId: string, comparisonId: string) {
  return useQuery({
    queryKey: queryKeys.modernComparison.comparison(studyId, comparisonId),
    queryFn: ({ signal }) => api.get<Comparison>(comparisonPath(studyId, comparisonId), signal),
  });
}

/** POST /api/studies/:studyId/comparisons: scores the list and saves the comparison. */
export function useCreateComparison(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (params: ComparisonParamsInput) => api.post<Comparison>(comparisonsPath(studyId), params),
    onSuccess: (created) => {
      queryClient.setQueryData(queryKeys.modernComparison.comparison(studyId, created.id), created);
      return Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.comparisons(studyId), exact: true }),
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.lists(studyId), exact: true }),
      ]);
    },
  });
}

/** DELETE /api/studies/:studyId/comparisons/:comparisonId */
export function useDeleteComparison(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (comparisonId: string) => api.delete(comparisonPath(studyId, comparisonId)),
    onSuccess: (_data, comparisonId) => {
      queryClient.removeQueries({ queryKey: queryKeys.modernComparison.comparison(studyId, comparisonId) });
      return Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.comparisons(studyId), exact: true }),
        queryClient.invalidateQueries({ queryKey: queryKeys.modernComparison.lists(studyId), exact: true }),
      ]);
    },
  });
}

/** GET /api/studies/:studyId/comparisons/:comparisonId/export?format=csv[&table=] */
export const comparisonCsvUrl = (studyId: string, comparisonId: string, table?: ComparisonExportTable) =>
  `/api${comparisonPath(studyId, comparisonId)}/export?format=csv${table ? `&table=${table}` : ""}`;
