// TanStack Query hooks of the Selectivity screen and the run report: one per endpoint, keys from
// src/lib/queryKeys.ts.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Run, RunDiff, RunParams, RunPreview, RunRerunInput } from "@shared/schemas/runs";
import type { Study } from "@shared/schemas/studies";
import type { Timescale } from "@shared/schemas/timescale";
import type { TraitList } from "@shared/schemas/traits";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";

/** How often a queued or running run is read again. */
const RUN_POLL_MS = 1000;

const studyPath = (studyId: string) => `/studies/${encodeURIComponent(studyId)}`;
const runsPath = (studyId: string) => `${studyPath(studyId)}/runs`;
const runPath = (studyId: string, runId: string) => `${runsPath(studyId)}/${encodeURIComponent(runId)}`;

/** Where the browser downloads a run's export (same origin, the session cookie goes along). */
export function runExportUrl(studyId: string, runId: string, format: "csv" | "json", table?: string): string {
  const search = new URLSearchParams({ format });
  if (table) search.set("table", table);
  return `/api${runPath(studyId, runId)}/export?${search.toString()}`;
}

export const isActive = (run: Pick<Run, "status">) => run.status === "queued" || run.status === "running";

/** GET /api/studies/:studyId: the report page opens outside the study layout, so it loads the study itself. */
export function useStudyForReport(studyId: string) {
  return useQuery({
    queryKey: queryKeys.studies.detail(studyId),
    queryFn: ({ signal }) => api.get<Study>(studyPath(studyId), signal),
  });
}

/** GET /api/timescale: the chart's units, for placing boundaries. */
export function useTimescale() {
  return useQuery({
    queryKey: queryKeys.timescale,
    queryFn: ({ signal }) => api.get<Timescale>("/timescale", signal),
    staleTime: Infinity,
  });
}

/** GET /api/studies/:studyId/traits: the codebook, the traits a run can test. */
export function useTraits(studyId: string) {
  return useQuery({
    queryKey: queryKeys.traits.list(studyId),
    queryFn: ({ signal }) => api.get<TraitList>(`${studyPath(studyId)}/traits`, signal),
  });
}

/**
 * POST /api/studies/:studyId/runs/preview: what a run with these parameters would analyse. A read,
 * so it is a query keyed by the parameters; `params` null means they are not valid yet.
 */
export function useRunPreview(studyId: string, params: RunParams | null) {
  const key = params ? JSON.stringify(params) : "none";
  return useQuery({
    queryKey: queryKeys.runs.preview(studyId, key),
    queryFn: () => api.post<RunPreview>(`${runsPath(studyId)}/preview`, params),
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

function useRememberRun(studyId: string) {
  const queryClient = useQueryClient();
  return (run: Run) => {
    queryClient.setQueryData(queryKeys.runs.detail(studyId, run.id), run);
    return queryClient.invalidateQueries({ queryKey: queryKeys.runs.all(studyId), refetchType: "none" });
  };
}

/** POST /api/studies/:studyId/runs: stored at once as queued, computed as a job. */
export function useStartRun(studyId: string) {
  const remember = useRememberRun(studyId);
  return useMutation({
    mutationFn: (params: RunParams) => api.post<Run>(runsPath(studyId), params),
    onSuccess: remember,
  });
}

/** POST /api/studies/:studyId/runs/:runId/retry: a failed run queued again. */
export function useRetryRun(studyId: string) {
  const remember = useRememberRun(studyId);
  return useMutation({
    mutationFn: (runId: string) => api.post<Run>(`${runPath(studyId, runId)}/retry`),
    onSuccess: remember,
  });
}

/** POST /api/studies/:studyId/runs/:runId/rerun: the same parameters on today's data, as a new run. */
export function useRerun(studyId: string) {
  const remember = useRememberRun(studyId);
  return useMutation({
    mutationFn: ({ runId, input }: { runId: string; input: RunRerunInput }) => api.post<Run>(`${runPath(studyId, runId)}/rerun`, input),
    onSuccess: remember,
  });
}
