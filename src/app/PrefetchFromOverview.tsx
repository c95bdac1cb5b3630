import { useEffect } from "react";
import { useIsFetching, useQueryClient } from "@tanstack/react-query";
import type { Study } from "@shared/schemas/studies";
import { timescaleQuery } from "../lib/queries/timescale";
import { taxaTotalQuery } from "../features/study-overview/api";

/**
 * The main boundary is fetched ahead only for studies up to this size, whose four answers cost the
 * server tens of milliseconds; a larger study's Boundary screen asks for them when it is opened.
 */
const FETCH_AHEAD_MAX_TAXA = 20_000;

let scriptFetched = false;
/** Studies whose main boundary was fetched ahead in this page load, by id and boundary. */
const boundariesFetched = new Set<string>();

/**
 * On a study's Overview, once its own data is in and the browser is idle: what the Boundary screen
 * (the likely next one) needs, so that it opens without waiting. Its script (with the charts) and the
 * time scale once per page load; the study's main boundary (outcomes, turnover, rates, sampling) once
 * per study and boundary, when the study is not large (FETCH_AHEAD_MAX_TAXA). Those answers are
 * refreshed when the screen opens more than a few seconds later (src/features/boundary/api.ts), and
 * shown meanwhile.
 */
export function PrefetchFromOverview({ study }: { study: Study }) {
  const queryClient = useQueryClient();
  const fetching = useIsFetching();
  const boundaryKey = study.mainBoundary ? `${study.id}:${JSON.stringify(study.mainBoundary)}` : null;
  useEffect(() => {
    // The Overview's own count of taxa, in by the time nothing is fetching.
    const taxa = queryClient.getQueryData(taxaTotalQuery(study.id).queryKey)?.total;
    const boundaryDue = boundaryKey !== null && !boundariesFetched.has(boundaryKey) && taxa !== undefined && taxa <= FETCH_AHEAD_MAX_TAXA;
    if ((scriptFetched && !boundaryDue) || fetching > 0) return;
    const prefetch = () => {
      const screen = import("../features/boundary/BoundaryPage");
      if (!scriptFetched) {
        scriptFetched = true;
        void queryClient.prefetchQuery(timescaleQuery());
        screen.catch(() => {
          // The router fetches the chunk again when it is needed.
          scriptFetched = false;
        });
      }
      if (boundaryDue) {
        boundariesFetched.add(boundaryKey);
        import("../features/boundary/screenQueries")
          .then((queries) => queries.prefetchBoundaryScreen(queryClient, study, new URLSearchParams()))
          .catch(() => boundariesFetched.delete(boundaryKey));
      }
    };
    if (typeof window.requestIdleCallback !== "function") {
      const timer = window.setTimeout(prefetch, 200);
      return () => window.clearTimeout(timer);
    }
    const idle = window.requestIdleCallback(prefetch, { timeout: 2000 });
    return () => window.cancelIdleCallback(idle);
  }, [boundaryKey, fetching, queryClient, study]);
  return null;
}
