// TanStack Query hooks of the Boundary screen: one per endpoint.
import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { z } from "zod";
import type {
  BoundaryOutcomeName,
  OutcomeOverride,
  OutcomeOverrideCreateInput,
  outcomeOverrideListSchema,
  OutcomesResult,
  RatesResult,
} from "@shared/schemas/outcomes";
import type { ThreeTimer } from "@shared/schemas/occurrences";
import type { TurnoverResult } from "@shared/schemas/turnover";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";

export type OverrideList = z.infer<typeof outcomeOverrideListSchema>;
export type OverrideStatus = "active" | "revoked" | "all";

/** What the screen asks the outcomes endpoint: a chart unit or a custom age, and an optional window. */
export interface OutcomesRequest {
  boundaryUnit?: string;
  boundary?: number;
  window?: number;
  group?: BoundaryOutcomeName;
  page?: number;
  pageSize: number;
}


function toSearch(params: Record<string, string | number | undefined>): string {
  const search = new URLSearchParams();
  for (const [key, value] of Object.entries(params)) if (value !== undefined) search.set(key, String(value));
  return search.toString();
}

/**
 * Ranges are edited on other screens, so a visit to this one asks again for what it shows; an answer
 * a few seconds old (asked for as the navigation to the screen began) counts as this visit's.
 */
export const FRESH_FOR_A_VISIT_MS = 5_000;

/** GET /api/studies/:studyId/outcomes: counts, proportional extinction, warnings and one page of each group (or of `group` only). */
export const outcomesQuery = (studyId: string, request: Partial<OutcomesRequest>) =>
  queryOptions({
    queryKey: queryKeys.boundary.outcomes(studyId, { ...request }),
    queryFn: ({ signal }) => api.get<OutcomesResult>(`${studyApiPath(studyId)}/outcomes?${toSearch({ ...request })}`, signal),
    staleTime: FRESH_FOR_A_VISIT_MS,
  });

/** The outcomes of a boundary; `request` null means no boundary is chosen yet (nothing is fetched). */
export function useOutcomes(studyId: string, request: OutcomesRequest | null) {
  return useQuery({ ...outcomesQuery(studyId, { ...request }), enabled: request !== null, placeholderData: keepPreviousData });
}

/** GET /api/studies/:studyId/outcome-overrides: outcomes set by hand, newest first. */
export function useOverrides(studyId: string, status: OverrideStatus, page: number, pageSize: number) {
  const params = { status, page, pageSize };
  return useQuery({
    queryKey: queryKeys.boundary.overrides(studyId, params),
    queryFn: ({ signal }) => api.get<OverrideList>(`${studyApiPath(studyId)}/outcome-overrides?${toSearch(params)}`, signal),
    staleTime: 0,
    placeholderData: keepPreviousData,
  });
}

/** GET /api/studies/:studyId/rates: extinction per stage over the stages the study's taxa span. */
export const ratesQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.boundary.rates(studyId),
    queryFn: ({ signal }) => api.get<RatesResult>(`${studyApiPath(studyId)}/rates`, signal),
    staleTime: FRESH_FOR_A_VISIT_MS,
  });

export const useRates = (studyId: string) => useQuery(ratesQuery(studyId));

/**
 * GET /api/studies/:studyId/occurrences/three-timer?boundaryMa: three-timer counts, sampling completeness and rates
 * per stage, and the stages on both sides of the boundary when one is given. Below the study's "occurrences" key,
 * so an occurrence upload or revert refreshes it.
 */
export const threeTimerQuery = (studyId: string, boundaryMa: number | null) =>
  queryOptions({
    queryKey: [...queryKeys.studies.detail(studyId), "occurrences", "three-timer", boundaryMa] as const,
    queryFn: ({ signal }) =>
      api.get<ThreeTimer>(`${studyApiPath(studyId)}/occurrences/three-timer${boundaryMa === null ? "" : `?boundaryMa=${encodeURIComponent(String(boundaryMa))}`}`, signal),
  });

export const useThreeTimer = (studyId: string, boundaryMa: number | null) => useQuery(threeTimerQuery(studyId, boundaryMa));

/** What the screen asks the turnover endpoint: the boundary and window of the outcomes, and how to split the diversity curve. */
export interface TurnoverRequest {
  boundaryUnit?: string;
  boundary?: number;
  window?: number;
  splitBy?: string;
}

/**
 * GET /api/studies/:studyId/turnover: origination and extinction per stage, standing diversity, the crisis
 * stage against its background and the boundary scorecard. `request` null: no boundary chosen (nothing fetched).
 */
export const turnoverQuery = (studyId: string, request: TurnoverRequest) =>
  queryOptions({
    queryKey: queryKeys.boundary.turnover(studyId, { ...request }),
    queryFn: ({ signal }) => api.get<TurnoverResult>(`${studyApiPath(studyId)}/turnover?${toSearch({ ...request })}`, signal),
    staleTime: FRESH_FOR_A_VISIT_MS,
  });

export function useTurnover(studyId: string, request: TurnoverRequest | null) {
  return useQuery({ ...turnoverQuery(studyId, { ...request }), enabled: request !== null, placeholderData: keepPreviousData });
}

/** GET /api/studies/:studyId/exports/turnover.csv or scorecard.csv for the same request (a plain download link). */
export function turnoverCsvUrl(studyId: string, file: "turnover" | "scorecard", request: TurnoverRequest): string {
  return `/api${studyApiPath(studyId)}/exports/${file}.csv?${toSearch({ ...request })}`;
}

function useRefreshOutcomes(studyId: string) {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: queryKeys.boundary.outcomesAll(studyId) }),
      queryClient.invalidateQueries({ queryKey: queryKeys.boundary.overridesAll(studyId) }),
    ]);
}

/** POST /api/studies/:studyId/outcome-overrides: set a taxon's outcome by hand (replaces its active override for the same boundary). */
export function useCreateOverride(studyId: string) {
  const refresh = useRefreshOutcomes(studyId);
  return useMutation({
    mutationFn: (input: OutcomeOverrideCreateInput) =>
      api.post<{ override: OutcomeOverride; replacedOverrideId: string | null }>(`${studyApiPath(studyId)}/outcome-overrides`, input),
    onSuccess: refresh,
  });
}

/** POST /api/studies/:studyId/outcome-overrides/:overrideId/revoke: the computed outcome applies again. */
export function useRevokeOverride(studyId: string) {
  const refresh = useRefreshOutcomes(studyId);
  return useMutation({
    mutationFn: ({ overrideId, reason }: { overrideId: string; reason: string }) =>
      api.post<OutcomeOverride>(`${studyApiPath(studyId)}/outcome-overrides/${encodeURIComponent(overrideId)}/revoke`, { reason }),
    onSuccess: refresh,
  });
}
