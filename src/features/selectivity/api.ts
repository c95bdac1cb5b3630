// TanStack Query hooks of the Selectivity screen and the run report. The run itself, its actions
// and the codebook come from the shared layer (src/lib/queries); only the design preview is this
// screen's own.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { RunParams, RunPreview } from "@shared/schemas/runs";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { runApiPath, studyApiPath } from "../../lib/queries/paths";

export { isRunActive as isActive, runExportUrl, useRerunRun as useRerun, useRetryRun } from "../../lib/queries/runs";

const runPath = (studyId: string, runId: string) => runApiPath(studyId, runId);

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

/** GET /api/studies/:studyId/runs/:runId, read again every second while the run is queued or running. */
export function useRun(studyId: string, runId: string | null) {
  return useQuery({
    queryKey: queryKeys.runs.detail(studyId, runId ?? "none"),
    queryFn: ({ signal }) => api.get<Run>(runPath(studyId, runId ?? ""), signal),
    enabled: runId !== null,
    refetchInterval: (query) => (query.state.data && isActive(query.state.data) ? RUN_POLL_MS : false),
    // A finished run never changes; a running one is polled above.
    staleTime: (query) => (query.state.data && !isActive(query.state.data) ? Infinity : 0),
  });
}

/** GET /api/studies/:studyId/runs/:runId/diff?against=: a re-run set against the run it repeats. */
export function useRunDiff(studyId: string, runId: string, against: string | null) {
  return useQuery({
    queryKey: queryKeys.runs.diff(studyId, runId, against ?? "none"),
    queryFn: ({ signal }) => api.get<RunDiff>(`${runPath(studyId, runId)}/diff?against=${encodeURIComponent(against ?? "")}`, signal),
    enabled: against !== null,
    staleTime: Infinity,
    retry: false,
  });
}
