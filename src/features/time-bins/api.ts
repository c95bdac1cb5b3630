// The time-bins screen's API hooks: save the set, read a CSV file of bins (nothing saved).
import { useMutation, useQueryClient } from "@tanstack/react-query";
import type { TimeBinCsv, TimeBinList, TimeBinSetInput } from "@shared/schemas/timeBins";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";
import { uploadWithProgress, type UploadProgress } from "../../lib/uploadWithProgress";

const binsPath = (studyId: string) => studyApiPath(studyId, "/time-bins");

/** PUT /api/studies/:studyId/time-bins: the whole set; the trait table and imports read names anew. */
export function useSaveTimeBins(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: TimeBinSetInput) => api.put<TimeBinList>(binsPath(studyId), input),
    onSuccess: (list) => queryClient.setQueryData(queryKeys.timeBins(studyId), list),
  });
}

/** POST /api/studies/:studyId/time-bins/csv: the file's rows and problems, for the editor to show. */
export function useReadTimeBinsCsv(studyId: string) {
  return useMutation({
    mutationFn: ({ file, onProgress }: { file: File; onProgress: (p: UploadProgress) => void }) => uploadWithProgress<TimeBinCsv>(`${binsPath(studyId)}/csv`, "file", file, onProgress),
  });
}
