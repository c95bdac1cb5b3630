// What the Overview asks for, started with the navigation to it (src/app/screenData.ts) instead of after
// its script has run: the same query options as its own hooks, which then find the answers.
import type { QueryClient } from "@tanstack/react-query";
import { traitsQuery } from "../../lib/queries/codebook";
import { activityQuery, mentionPreferencesQuery, taxaTotalQuery } from "./api";

export function prefetchOverviewScreen(queryClient: QueryClient, studyId: string): void {
  void queryClient.prefetchQuery(taxaTotalQuery(studyId));
  void queryClient.prefetchQuery(traitsQuery(studyId));
  void queryClient.prefetchQuery(activityQuery(studyId, 1));
  void queryClient.prefetchQuery(mentionPreferencesQuery());
}
