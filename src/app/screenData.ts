import type { QueryClient } from "@tanstack/react-query";
import type { LoaderFunctionArgs, ShouldRevalidateFunctionArgs } from "react-router-dom";
import type { Study } from "@shared/schemas/studies";
import { queryKeys } from "../lib/queryKeys";
import { studiesQuery, studyQuery } from "../lib/queries/study";
import { meQuery } from "../lib/session";

// The router runs the first page's loaders as soon as it is created, before the providers have made
// the query client: the loaders wait for it (without holding the navigation).
let provide: (queryClient: QueryClient) => void = () => undefined;
const client = new Promise<QueryClient>((resolve) => (provide = resolve));

/** The app's query client, for the route loaders below (given once by the providers). */
export function provideScreenDataClient(queryClient: QueryClient): void {
  provide(queryClient);
}

/** The study as cached (its own answer, else the studies list's copy), or asked for (joining a request in flight). */
async function studyFor(queryClient: QueryClient, studyId: string): Promise<Study> {
  const cached = queryClient.getQueryData(studyQuery(studyId).queryKey) ?? queryClient.getQueryData<Study[]>(queryKeys.studies.list())?.find((s) => s.id === studyId);
  return cached ?? queryClient.fetchQuery(studyQuery(studyId));
}

/**
 * Route loader of the Boundary screen: starts the screen's requests as the navigation begins, beside
 * its script, instead of after the script has loaded and the screen drawn. Never holds the navigation
 * (answers at once) and never fails it: the screen asks again, and shows its own errors.
 */
export function boundaryDataLoader({ params, request }: LoaderFunctionArgs): null {
  const studyId = params.studyId;
  if (!studyId) return null;
  const search = new URL(request.url).searchParams;
  void client
    .then((queryClient) =>
      Promise.all([studyFor(queryClient, studyId), import("../features/boundary/screenQueries")]).then(([study, screen]) =>
        screen.prefetchBoundaryScreen(queryClient, study, search),
      ),
    )
    .catch(() => undefined);
  return null;
}

/** Route loader of a study's Overview: its requests start as the navigation begins (as above). */
export function overviewDataLoader({ params }: LoaderFunctionArgs): null {
  const studyId = params.studyId;
  if (!studyId) return null;
  void Promise.all([client, import("../features/study-overview/screenQueries")])
    .then(([queryClient, screen]) => screen.prefetchOverviewScreen(queryClient, studyId))
    .catch(() => undefined);
  return null;
}

/**
 * Route loader of the studies list: a person with one study is taken straight to it (the list's
 * own rule, after signing in), so that study's Overview requests start as soon as the list arrives,
 * beside the list's script and the session, instead of a round trip after the redirect. Never holds
 * or fails the navigation; a person with several studies costs nothing more.
 */
export function studiesDataLoader(): null {
  void client
    .then(async (queryClient) => {
      // The session first (it answers 200 for nobody): a signed-out visit asks nothing that would fail.
      await queryClient.fetchQuery(meQuery());
      const studies = await queryClient.fetchQuery(studiesQuery());
      if (studies.length !== 1) return;
      const screen = await import("../features/study-overview/screenQueries");
      screen.prefetchOverviewScreen(queryClient, studies[0].id);
    })
    .catch(() => undefined);
  return null;
}

/** Within a screen (a new boundary, a list's page) the screen asks for itself: the loader runs when the screen is entered. */
export const onEnteringOnly = ({ currentUrl, nextUrl }: ShouldRevalidateFunctionArgs) => currentUrl.pathname !== nextUrl.pathname;
