// TanStack Query hooks of the Runs screens (list, comparison): one per endpoint, keys from src/lib/queryKeys.ts.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Run, RunDiff, RunList, RunSummary } from "@shared/schemas/runs";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

export const RUNS_PAGE_SIZE = 20;
/** How often a list with a queued or running run is read again. */
const LIST_POLL_MS = 2000;

const runsPath = (studyId: string) => `/studies/${encodeURIComponent(studyId)}/runs`;
const runPath = (studyId: string, runId: string) => `${runsPath(studyId)}/${encodeURIComponent(runId)}`;

export const isActive = (run: Pick<RunSummary, "status">) => run.status === "queued" || run.status === "running";

/** Where the browser downloads a run's export (same origin, the session cookie goes along). */
export const exportUrl = (studyId: string, runId: string, format: "csv" | "json") => `/api${runPath(studyId, runId)}/export?format=${format}`;

/** GET /api/studies/:studyId/runs?page: newest first, read again while any run on the page computes. */
export function useRuns(studyId: string, page: number) {
  return useQuery({
    queryKey: queryKeys.runs.list(studyId, page),
    queryFn: ({ signal }) => api.get<RunList>(`${runsPath(studyId)}?page=${page}&pageSize=${RUNS_PAGE_SIZE}`, signal),
    placeholderData: keepPreviousData,
    staleTime: 0,
    refetchInterval: (query) => (query.state.data?.runs.some(isActive) ? LIST_POLL_MS : false),
  });
}

/** GET /api/studies/:studyId/runs/:runId/diff?against=: two finished runs side by side. */
export function useRunDiff(studyId: string, runId: string | null, against: string | null) {
  return useQuery({
    queryKey: queryKeys.runs.diff(studyId, runId ?? "none", against ?? "none"),
    queryFn: ({ signal }) => api.get<RunDiff>(`${runPath(studyId, runId ?? "")}/diff?against=${encodeURIComponent(against ?? "")}`, signal),
    enabled: runId !== null && against !== null,
    staleTime: Infinity,
    retry: false,
  });
}

function useRefreshList(studyId: string) {
  const queryClient = useQueryClient();
  return (run: Run) => {
    queryClient.setQueryData(queryKeys.runs.detail(studyId, run.id), run);
    return queryClient.invalidateQueries({ queryKey: queryKeys.runs.all(studyId) });
  };
}

/** POST /api/studies/:studyId/runs/:runId/rerun: the same parameters on today's data, as a new run. */
export function useRerun(studyId: string) {
  const refresh = useRefreshList(studyId);
  return useMutation({
    mutationFn: (runId: string) => api.post<Run>(`${runPath(studyId, runId)}/rerun`, {}),
    onSuccess: refresh,
  });
}

/** POST /api/studies/:studyId/runs/:runId/retry: a failed run queued again. */
export function useRetry(studyId: string) {
  const refresh = useRefreshList(studyId);
  return useMutation({
    mutationFn: (runId: string) => api.post<Run>(`${runPath(studyId, runId)}/retry`),
    onSuccess: refresh,
  });
}
