// API hooks of the occurrence uploads and the ranges derived from them (one per endpoint). Keys sit below the
// study's detail key, so leaving or refreshing a study covers them.
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { RevertResult } from "@shared/schemas/decisions";
import type { ImportSummary } from "@shared/schemas/imports";
import type {
  OccurrenceCommitInput,
  OccurrenceMapping,
  OccurrencePreview,
  OccurrenceRevertResult,
  OccurrenceUpload,
  OccurrenceUploadList,
  RangeDerivationInput,
  RangesApplyInput,
  RangesApplyResult,
  RangesPreview,
} from "@shared/schemas/occurrences";
import { api } from "../../../lib/api";
import { queryKeys } from "../../../lib/queryKeys";
import { studyApiPath } from "../../../lib/queries/paths";
import { uploadWithProgress, type UploadProgress } from "../../../lib/uploadWithProgress";
import type { NameMerges } from "@shared/schemas/importChecks";

const uploadsPath = (studyId: string) => studyApiPath(studyId, "/occurrence-uploads");
const uploadPath = (studyId: string, uploadId: string) => `${uploadsPath(studyId)}/${encodeURIComponent(uploadId)}`;
const occurrenceKeys = {
  all: (studyId: string) => [...queryKeys.studies.detail(studyId), "occurrences"] as const,
  uploads: (studyId: string) => [...queryKeys.studies.detail(studyId), "occurrences", "uploads"] as const,
  upload: (studyId: string, uploadId: string) => [...queryKeys.studies.detail(studyId), "occurrences", "upload", uploadId] as const,
};
const COMMIT_POLL_MS = 500;

/** Everything that reads occurrences or taxa is stale after a commit, revert or apply. */
function useRefresh(studyId: string) {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: occurrenceKeys.all(studyId) }),
      queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
      queryClient.invalidateQueries({ queryKey: queryKeys.decisions.all(studyId) }),
    ]);
}

/** GET /api/studies/:studyId/occurrence-uploads: newest first. */
export function useOccurrenceUploads(studyId: string) {
  return useQuery({ queryKey: occurrenceKeys.uploads(studyId), queryFn: ({ signal }) => api.get<OccurrenceUploadList>(uploadsPath(studyId), signal) });
}

/** GET /api/studies/:studyId/occurrence-uploads/:uploadId, polled while a commit runs. */
export function useOccurrenceUploadProgress(studyId: string, uploadId: string | null, poll: boolean) {
  return useQuery({
    queryKey: occurrenceKeys.upload(studyId, uploadId ?? "none"),
    queryFn: ({ signal }) => api.get<ImportSummary>(uploadPath(studyId, uploadId ?? ""), signal),
    enabled: uploadId !== null && poll,
    refetchInterval: poll ? COMMIT_POLL_MS : false,
  });
}

/** POST /api/studies/:studyId/occurrence-uploads (multipart, field `file`). */
export function useUploadOccurrences(studyId: string) {
  return useMutation({
    mutationFn: ({ file, onProgress }: { file: File; onProgress: (p: UploadProgress) => void }) =>
      uploadWithProgress<OccurrenceUpload>(uploadsPath(studyId), "file", file, onProgress),
  });
}

/** POST .../occurrence-uploads/:uploadId/preview */
export function usePreviewOccurrences(studyId: string) {
  return useMutation({
    mutationFn: ({
      uploadId,
      mapping,
      duplicates,
      nameMerges = {},
      higherTaxonMerges = {},
    }: {
      uploadId: string;
      mapping: OccurrenceMapping;
      duplicates: "keep" | "drop";
      nameMerges?: NameMerges;
      higherTaxonMerges?: NameMerges;
    }) => api.post<OccurrencePreview>(`${uploadPath(studyId, uploadId)}/preview`, { mapping, duplicates, nameMerges, higherTaxonMerges }),
  });
}

/** POST .../occurrence-uploads/:uploadId/commit: all valid rows in one transaction, or nothing. */
export function useCommitOccurrences(studyId: string) {
  const refresh = useRefresh(studyId);
  return useMutation({
    mutationFn: ({ uploadId, input }: { uploadId: string; input: OccurrenceCommitInput }) => api.post<ImportSummary>(`${uploadPath(studyId, uploadId)}/commit`, input),
    onSettled: refresh,
  });
}

/** POST .../occurrence-uploads/:uploadId/revert: removes the upload's occurrences. */
export function useRevertOccurrences(studyId: string) {
  const refresh = useRefresh(studyId);
  return useMutation({
    mutationFn: (uploadId: string) => api.post<OccurrenceRevertResult>(`${uploadPath(studyId, uploadId)}/revert`, {}),
    onSuccess: refresh,
  });
}

/** DELETE .../occurrence-uploads/:uploadId: drops an upload that was never committed. */
export function useDiscardOccurrences(studyId: string) {
  return useMutation({ mutationFn: (uploadId: string) => api.delete(uploadPath(studyId, uploadId)) });
}

/** POST /api/studies/:studyId/occurrences/ranges/preview */
export function usePreviewRanges(studyId: string) {
  return useMutation({ mutationFn: (input: RangeDerivationInput) => api.post<RangesPreview>(studyApiPath(studyId, "/occurrences/ranges/preview"), input) });
}

/** POST /api/studies/:studyId/occurrences/ranges/apply */
export function useApplyRanges(studyId: string) {
  const refresh = useRefresh(studyId);
  return useMutation({
    mutationFn: (input: RangesApplyInput) => api.post<RangesApplyResult>(studyApiPath(studyId, "/occurrences/ranges/apply"), input),
    onSuccess: refresh,
  });
}

/** POST /api/studies/:studyId/decisions/batches/:batchId/revert: undoes one apply. */
export function useRevertRanges(studyId: string) {
  const refresh = useRefresh(studyId);
  return useMutation({
    mutationFn: ({ batchId, reason }: { batchId: string; reason: string }) =>
      api.post<RevertResult>(studyApiPath(studyId, `/decisions/batches/${encodeURIComponent(batchId)}/revert`), { reason }),
    onSuccess: refresh,
  });
}
