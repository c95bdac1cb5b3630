import { QueryClientProvider } from "@tanstack/react-query";
import { RouterProvider } from "react-router-dom";
import { ToastProvider } from "../components/Toast";
import { paths, withNext } from "../lib/paths";
import { isPublicPath } from "./publicRoutes";
import { createQueryClient } from "./queryClient";
import { router } from "./router";

/** The session ended (or never began): sign in, then come back to the same page. */
function redirectToSignIn() {
  const { pathname, search } = router.state.location;
  if (isPublicPath(pathname)) return;
  void router.navigate(withNext(paths.signIn, pathname + search), { replace: true });
}

const queryClient = createQueryClient(redirectToSignIn);

export function AppProviders() {
  return (
    <QueryClientProvider client={queryClient}>
      <ToastProvider>
        <RouterProvider router={router} />
      </ToastProvider>
    </QueryClientProvider>
  );
}
