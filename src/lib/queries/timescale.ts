// The ICS chart's units, read by the boundary and selectivity screens.
import { queryOptions, useQuery } from "@tanstack/react-query";
import type { Timescale } from "@shared/schemas/timescale";
import { api } from "../api";
import { queryKeys } from "../queryKeys";

/** GET /api/timescale: reference data that never changes while the app runs. */
export const timescaleQuery = () =>
  queryOptions({
    queryKey: queryKeys.timescale,
    queryFn: ({ signal }) => api.get<Timescale>("/timescale", signal),
    staleTime: Infinity,
  });

export const useTimescale = () => useQuery(timescaleQuery());
