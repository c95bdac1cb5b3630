// TanStack Query hooks of the Selectivity screen and the run report. The run itself, its actions
// and the codebook come from the shared layer (src/lib/queries); only the design preview is this
// screen's own.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { RunParams, RunPreview } from "@shared/schemas/runs";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { runApiPath, studyApiPath } from "../../lib/queries/paths";

// The run panel reads these under the names it has always used.
export { isRunActive as isActive, runExportUrl, useRerunRun as useRerun, useRetryRun, useRun } from "../../lib/queries/runs";

const runPath = (studyId: string, runId: string) => runApiPath(studyId, runId);

/** The zip for re-checking a finished run outside the app: its rows, numbers and an R script. */
export const runReplicationUrl = (studyId: string, runId: string) => `/api${runPath(studyId, runId)}/replication.zip`;

/**
 * POST /api/studies/:studyId/runs/preview: what a run with these parameters would analyse. A read,
 * so it is a query keyed by the parameters; `params` null means they are not valid yet.
 */
export function useRunPreview(studyId: string, params: RunParams | null) {
  const key = params ? JSON.stringify(params) : "none";
  return useQuery({
    queryKey: queryKeys.runs.preview(studyId, key),
    queryFn: () => api.post<RunPreview>(studyApiPath(studyId, "/runs/preview"), params),
    enabled: params !== null,
    placeholderData: keepPreviousData,
    // The trait table may change between two looks at the design.
    staleTime: 0,
    retry: false,
  });
}
