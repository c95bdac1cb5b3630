// The study's own time bins, read by the time-bins screen and wherever interval names are typed
// (the trait table's range cells and bulk edit), so a name resolves the same way on both sides.
import { useMemo } from "react";
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { TimeBinList } from "@shared/schemas/timeBins";
import { intervalLookup, type IntervalLookup } from "@shared/timebins/intervalLookup";
import { api } from "../api";
import { queryKeys } from "../queryKeys";
import { studyApiPath } from "./paths";

/** GET /api/studies/:studyId/time-bins: the bins, oldest first, and how interval names resolve. */
export const timeBinsQuery = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.timeBins(studyId),
    queryFn: ({ signal }) => api.get<TimeBinList>(studyApiPath(studyId, "/time-bins"), signal),
    staleTime: 60_000,
  });

export const useTimeBins = (studyId: string) => useQuery(timeBinsQuery(studyId));

/** The study's interval lookup (its bins first, then the ICS chart), or the chart alone until the bins have loaded. */
export function useIntervalLookup(studyId: string): IntervalLookup {
  const bins = useTimeBins(studyId).data?.bins;
  return useMemo(() => intervalLookup(bins ?? []), [bins]);
}
