// The imports screen's API hooks: one per endpoint, keys from src/lib/queryKeys.ts.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { DecisionList } from "@shared/schemas/decisions";
import type { ImportSettings, NameMerges } from "@shared/schemas/importChecks";
import type {
  ImportCommitInput,
  ImportList,
  ImportMapping,
  ImportPreview,
  ImportRevertInput,
  ImportRevertResult,
  ImportSummary,
  ImportUpload,
} from "@shared/schemas/imports";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";
import { uploadWithProgress, type UploadProgress } from "../../lib/uploadWithProgress";

const importsPath = (studyId: string) => `${studyApiPath(studyId)}/imports`;
const importPath = (studyId: string, importId: string) => `${importsPath(studyId)}/${encodeURIComponent(importId)}`;

/** How often a running commit's progress is read. */
const COMMIT_POLL_MS = 500;

/** GET /api/studies/:studyId/imports?page: who imported what and when, newest first. */
export function useImports(studyId: string, page: number) {
  return useQuery({
    queryKey: queryKeys.imports.list(studyId, page),
    queryFn: ({ signal }) => api.get<ImportList>(`${importsPath(studyId)}?page=${page}&pageSize=20`, signal),
    placeholderData: keepPreviousData,
  });
}

/** GET /api/studies/:studyId/imports/:importId, read again and again while `poll` is on (a commit runs). */
export function useImportSummary(studyId: string, importId: string | null, poll: boolean) {
  return useQuery({
    queryKey: queryKeys.imports.detail(studyId, importId ?? "none"),
    queryFn: ({ signal }) => api.get<ImportSummary>(importPath(studyId, importId ?? ""), signal),
    enabled: importId !== null && poll,
    refetchInterval: poll ? COMMIT_POLL_MS : false,
  });
}

/** POST /api/studies/:studyId/imports (multipart, field `file`): stores and reads the file, suggests a mapping. */
export function useUploadImport(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ file, onProgress }: { file: File; onProgress: (p: UploadProgress) => void }) =>
      uploadWithProgress<ImportUpload>(importsPath(studyId), "file", file, onProgress),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.imports.all(studyId) }),
  });
}

/** GET /api/studies/:studyId/imports/:importId/upload: an upload not yet committed, read again to resume at the mapping step. */
export function useResumeImport(studyId: string) {
  return useMutation({
    mutationFn: (importId: string) => api.get<ImportUpload>(`${importPath(studyId, importId)}/upload`),
  });
}

/** POST /api/studies/:studyId/imports/:importId/preview: every problem by row and column, and what would change. */
export function usePreviewImport(studyId: string) {
  return useMutation({
    mutationFn: ({ importId, mapping, nameMerges = {}, higherTaxonMerges = {} }: { importId: string; mapping: ImportMapping; nameMerges?: NameMerges; higherTaxonMerges?: NameMerges }) =>
      api.post<ImportPreview>(`${importPath(studyId, importId)}/preview`, { mapping, nameMerges, higherTaxonMerges }),
  });
}

/** POST /api/studies/:studyId/imports/:importId/commit: all valid rows in one transaction, or nothing. */
export function useCommitImport(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ importId, input }: { importId: string; input: ImportCommitInput }) => api.post<ImportSummary>(`${importPath(studyId, importId)}/commit`, input),
    onSettled: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.imports.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
      ]),
  });
}

/** POST /api/studies/:studyId/imports/:importId/revert; 409 (RevertConflict) when values changed since. */
export function useRevertImport(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ importId, input }: { importId: string; input: ImportRevertInput }) => api.post<ImportRevertResult>(`${importPath(studyId, importId)}/revert`, input),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.imports.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
      ]),
  });
}

/** DELETE /api/studies/:studyId/imports/:importId: drops an upload that was never committed. */
export function useDiscardImport(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (importId: string) => api.delete(importPath(studyId, importId)),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.imports.all(studyId) }),
  });
}

/** GET /api/studies/:studyId/decisions?importId&page: the coding decisions one import wrote. */
export function useImportDecisions(studyId: string, importId: string, page: number) {
  const query = `importId=${encodeURIComponent(importId)}&page=${page}&pageSize=25`;
  return useQuery({
    queryKey: queryKeys.decisions.list(studyId, query),
    queryFn: ({ signal }) => api.get<DecisionList>(`${studyApiPath(studyId)}/decisions?${query}`, signal),
    placeholderData: keepPreviousData,
  });
}

/** GET /api/studies/:studyId/exports/template.csv: an empty file with the codebook's columns. */

/** GET /api/studies/:studyId/import-settings: the study's declared missing-value tokens. */
export function useImportSettings(studyId: string) {
  return useQuery({
    queryKey: queryKeys.imports.settings(studyId),
    queryFn: ({ signal }) => api.get<ImportSettings>(`${studyApiPath(studyId)}/import-settings`, signal),
  });
}

/** PUT /api/studies/:studyId/import-settings: replaces the tokens (owner and coder). */
export function useSaveImportSettings(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: ImportSettings) => api.put<ImportSettings>(`${studyApiPath(studyId)}/import-settings`, input),
    onSuccess: (saved) => queryClient.setQueryData(queryKeys.imports.settings(studyId), saved),
  });
}
