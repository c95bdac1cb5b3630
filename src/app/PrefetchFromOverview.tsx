import { useEffect } from "react";
import { useIsFetching, useQueryClient } from "@tanstack/react-query";
import { timescaleQuery } from "../lib/queries/timescale";

let fetched = false;

/**
 * On a study's Overview, once its own data is in and the browser is idle: the Boundary screen's
 * script (with the charts) and the time scale, the likely next screen's pieces that are the same for
 * every study, so that screen asks only for its own data when opened. Once per page load.
 */
export function PrefetchFromOverview() {
  const queryClient = useQueryClient();
  const fetching = useIsFetching();
  useEffect(() => {
    if (fetched || fetching > 0) return;
    const prefetch = () => {
      fetched = true;
      void queryClient.prefetchQuery(timescaleQuery());
      import("../features/boundary/BoundaryPage").catch(() => {
        // The router fetches the chunk again when it is needed.
        fetched = false;
      });
    };
    if (typeof window.requestIdleCallback !== "function") {
      const timer = window.setTimeout(prefetch, 200);
      return () => window.clearTimeout(timer);
    }
    const idle = window.requestIdleCallback(prefetch, { timeout: 2000 });
    return () => window.cancelIdleCallback(idle);
  }, [fetching, queryClient]);
  return null;
}
