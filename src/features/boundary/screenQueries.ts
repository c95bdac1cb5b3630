// What the Boundary screen asks for, worked out from the study and the address alone, so the requests
// can start with the navigation to the screen (src/app/screenData.ts) instead of after its script has
// loaded and drawn: the same keys and parameters as the screen's own hooks, which then find them.
import type { QueryClient } from "@tanstack/react-query";
import type { Study } from "@shared/schemas/studies";
import { outcomesQuery, ratesQuery, threeTimerQuery, turnoverQuery, type OutcomesRequest, type TurnoverRequest } from "./api";
import { mainBoundarySearch, readBoundaryView, type BoundaryView } from "./boundaryParams";

/** Taxa per page of the outcome lists. */
export const LIST_PAGE_SIZE = 50;

/** An address without a boundary opens at the study's main boundary (set on the overview, or the newest run's crisis). */
export function openingSearch(study: Study, search: URLSearchParams): URLSearchParams | null {
  return !search.has("unit") && !search.has("age") && study.mainBoundary ? mainBoundarySearch(search, study.mainBoundary) : null;
}

export function outcomesRequestOf(view: BoundaryView): OutcomesRequest | null {
  if (!view.choice) return null;
  const where = view.choice.kind === "unit" ? { boundaryUnit: view.choice.name } : { boundary: view.choice.age };
  return { ...where, window: view.window, pageSize: LIST_PAGE_SIZE };
}

export function turnoverRequestOf(request: OutcomesRequest | null, splitBy: string): TurnoverRequest | null {
  return request ? { boundaryUnit: request.boundaryUnit, boundary: request.boundary, window: request.window, splitBy: splitBy || undefined } : null;
}

/** The boundary's age without the time scale: a custom age, or the main boundary chosen by its unit (the study carries its age). */
export function knownBoundaryAge(study: Study, view: BoundaryView): number | null {
  if (view.choice?.kind === "age") return view.choice.age;
  if (view.choice?.kind === "unit" && study.mainBoundary?.unit === view.choice.name) return study.mainBoundary.boundaryMa;
  return null;
}

/** Starts the requests of the screen's first view (outcomes, turnover unsplit, rates, sampling); never waits for them. */
export function prefetchBoundaryScreen(queryClient: QueryClient, study: Study, search: URLSearchParams): void {
  const view = readBoundaryView(openingSearch(study, search) ?? search);
  const request = outcomesRequestOf(view);
  const turnoverRequest = turnoverRequestOf(request, "");
  if (request) void queryClient.prefetchQuery(outcomesQuery(study.id, request));
  if (turnoverRequest) void queryClient.prefetchQuery(turnoverQuery(study.id, turnoverRequest));
  void queryClient.prefetchQuery(ratesQuery(study.id));
  const age = knownBoundaryAge(study, view);
  if (age !== null || !view.choice) void queryClient.prefetchQuery(threeTimerQuery(study.id, age));
}
