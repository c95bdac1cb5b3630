// Saved runs, read by the Selectivity screen and its report, the Runs screens and the modern
// comparison (which scores with a run's model); and the run actions several screens offer.
import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { RunDiff } from "@shared/schemas/runDiff";
import type { Run, RunList, RunParams, RunRerunInput, RunSummary } from "@shared/schemas/runs";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { runApiPath, studyApiPath } from "./paths";

/** How often a queued or running run is read again. */
const RUN_POLL_MS = 1000;
/** How often a list with a queued or running run is read again. */
const LIST_POLL_MS = 2000;

export const isRunActive = (run: Pick<RunSummary, "status">) => run.status === "queued" || run.status === "running";

/** Where the browser downloads a run's export (same origin, the session cookie goes along). */
export function runExportUrl(studyId: string, runId: string, format: "csv" | "json", table?: string): string {
  const search = new URLSearchParams({ format });
  if (table) search.set("table", table);
  return `/api${runApiPath(studyId, runId, "/export")}?${search.toString()}`;
}

/** GET /api/studies/:studyId/runs?page&pageSize: newest first, read again while any run on the page computes. */
export const runListQuery = (studyId: string, page: number, pageSize: number) =>
  queryOptions({
    queryKey: queryKeys.runs.list(studyId, page, pageSize),
    queryFn: ({ signal }) => api.get<RunList>(studyApiPath(studyId, `/runs?page=${page}&pageSize=${pageSize}`), signal),
    placeholderData: keepPreviousData,
    staleTime: 0,
    refetchInterval: (query) => (query.state.data?.runs.some(isRunActive) ? LIST_POLL_MS : false),
  });

export const useRunList = (studyId: string, page: number, pageSize: number) => useQuery(runListQuery(studyId, page, pageSize));

/** GET /api/studies/:studyId/runs/:runId, read again every second while the run is queued or running. */
export const runQuery = (studyId: string, runId: string | null) =>
  queryOptions({
    queryKey: queryKeys.runs.detail(studyId, runId ?? "none"),
    queryFn: ({ signal }) => api.get<Run>(runApiPath(studyId, runId ?? ""), signal),
    enabled: runId !== null,
    refetchInterval: (query) => (query.state.data && isRunActive(query.state.data) ? RUN_POLL_MS : false),
    // A finished run never changes; a running one is polled above.
    staleTime: (query) => (query.state.data && !isRunActive(query.state.data) ? Infinity : 0),
  });

export const useRun = (studyId: string, runId: string | null) => useQuery(runQuery(studyId, runId));

/** GET /api/studies/:studyId/runs/:runId/diff?against=: two runs side by side (e.g. a re-run and the run it repeats). */
export const runDiffQuery = (studyId: string, runId: string | null, against: string | null) =>
  queryOptions({
    queryKey: queryKeys.runs.diff(studyId, runId ?? "none", against ?? "none"),
    queryFn: ({ signal }) => api.get<RunDiff>(runApiPath(studyId, runId ?? "", `/diff?against=${encodeURIComponent(against ?? "")}`), signal),
    enabled: runId !== null && against !== null,
    staleTime: Infinity,
    retry: false,
  });

export const useRunDiff = (studyId: string, runId: string | null, against: string | null) => useQuery(runDiffQuery(studyId, runId, against));

/** After a run is started, retried or re-run: remember it, and read every list of runs again. */
function useRunChanged(studyId: string) {
  const queryClient = useQueryClient();
  return (run: Run) => {
    queryClient.setQueryData(queryKeys.runs.detail(studyId, run.id), run);
    // The newest run's crisis boundary becomes the study's main boundary (part of the study's own record).
    void queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId), exact: true });
    return queryClient.invalidateQueries({ queryKey: queryKeys.runs.lists(studyId) });
  };
}

/** POST /api/studies/:studyId/runs/:runId/retry: a failed run queued again. */
export function useRetryRun(studyId: string) {
  const changed = useRunChanged(studyId);
  return useMutation({
    mutationFn: (runId: string) => api.post<Run>(runApiPath(studyId, runId, "/retry")),
    onSuccess: changed,
  });
}

/** POST /api/studies/:studyId/runs/:runId/rerun: the same parameters on today's data, as a new run. */
export function useRerunRun(studyId: string) {
  const changed = useRunChanged(studyId);
  return useMutation({
    mutationFn: ({ runId, input = {} }: { runId: string; input?: RunRerunInput }) => api.post<Run>(runApiPath(studyId, runId, "/rerun"), input),
    onSuccess: changed,
  });
}

/** POST /api/studies/:studyId/runs: stored at once as queued, computed as a job. */
export function useStartRun(studyId: string) {
  const changed = useRunChanged(studyId);
  return useMutation({
    mutationFn: (params: RunParams) => api.post<Run>(studyApiPath(studyId, "/runs"), params),
    onSuccess: changed,
  });
}
