import { QueryClientProvider } from "@tanstack/react-query";
import { RouterProvider } from "react-router-dom";
import { ToastProvider } from "../components/Toast";
import { paths, withNext } from "../lib/paths";
import { studyQuery } from "../lib/queries/study";
import { timescaleQuery } from "../lib/queries/timescale";
import { meQuery } from "../lib/session";
import { isPublicPath } from "./publicRoutes";
import { createQueryClient } from "./queryClient";
import { createAppRouter } from "./router";
import { provideScreenDataClient } from "./screenData";

/** The session ended (or never began): sign in, then come back to the same page. */
function redirectToSignIn() {
  const { pathname, search } = router.state.location;
  if (isPublicPath(pathname)) return;
  void router.navigate(withNext(paths.signIn, pathname + search), { replace: true });
}

const queryClient = createQueryClient(redirectToSignIn);
provideScreenDataClient(queryClient);

// The first screen's own data is asked for at once, while its chunks are still arriving, instead of
// after them: the session, the study of a study address, and the time scale of the screens that draw it.
function prefetchFirstScreen(pathname: string) {
  if (isPublicPath(pathname)) return;
  void queryClient.prefetchQuery(meQuery());
  const studyId = /^\/studies\/([0-9a-f-]{36})(\/|$)/.exec(pathname)?.[1];
  if (studyId) void queryClient.prefetchQuery(studyQuery(studyId));
  if (studyId && /\/(boundary|selectivity)(\/|$)/.test(pathname)) void queryClient.prefetchQuery(timescaleQuery());
}
prefetchFirstScreen(window.location.pathname);

// Made after those requests are asked for: creating the router asks for the first screen's script
// chunks (about 40 on a cold visit), and the browser's six connections to the server serve requests
// in the order they were asked, so the study and the session would otherwise wait behind them.
const router = createAppRouter();

export function AppProviders() {
  return (
    <QueryClientProvider client={queryClient}>
      <ToastProvider>
        <RouterProvider router={router} />
      </ToastProvider>
    </QueryClientProvider>
  );
}
