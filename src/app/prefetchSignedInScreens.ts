let started = false;

/**
 * Fetches the chunks of the screens that follow signing in (the frame, the studies list, a study's
 * frame and its Overview) once the visitor starts on a form, so that they open without a second
 * round of downloads. Not on load: the sign-in page itself stays small for a cold visit. Also the
 * few kilobytes that say what the Boundary screen asks for, so a click on it from the Overview asks
 * at once, beside its script.
 */
export function prefetchSignedInScreens(): void {
  if (started) return;
  started = true;
  void Promise.all([
    import("./AppShell"),
    import("./StudyLayout"),
    import("../features/studies/StudiesPage"),
    import("../features/study-overview/StudyOverviewPage"),
    import("../features/study-overview/screenQueries"),
    import("../features/boundary/screenQueries"),
  ]).catch(() => {
    // A failed prefetch costs nothing: the router fetches the chunk again when it is needed.
    started = false;
  });
}
