import { isRouteErrorResponse, useRouteError } from "react-router-dom";
import { Button } from "../components/Button";
import { Wordmark } from "./Wordmark";

/** Shown when a page fails to render: says so plainly and offers a reload. */
export function RouteErrorPage() {
  const error = useRouteError();
  const detail = isRouteErrorResponse(error) ? `${error.status} ${error.statusText}` : error instanceof Error ? error.message : null;
  return (
    <main className="mx-auto max-w-lg px-4 py-16">
      <Wordmark />
      <h1 className="mt-8 text-2xl font-semibold tracking-tight">Something broke on this page</h1>
      <p className="mt-3 text-stone-600">The page could not be shown. Reloading usually helps; your saved work is on the server.</p>
      {detail && <pre className="mt-4 overflow-x-auto rounded-lg bg-stone-100 p-3 text-sm whitespace-pre-wrap text-stone-700">{detail}</pre>}
      <Button className="mt-6" onClick={() => window.location.reload()}>
        Reload the page
      </Button>
    </main>
  );
}
