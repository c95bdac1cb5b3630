import { Link, Outlet } from "react-router-dom";
import { focusRing } from "../components/focus";
import { cx } from "../lib/cx";
import { paths } from "../lib/paths";
import { prefetchSignedInScreens } from "./prefetchSignedInScreens";
import { Wordmark } from "./Wordmark";

/** Pages for people who are not signed in (or may not be): one calm column with a white panel. */
export function PublicLayout() {
  return (
    <div className="flex min-h-screen flex-col bg-radial-[ellipse_at_top] from-accent-50 via-stone-50 to-stone-50">
      <header className="px-4 pt-10 pb-6 sm:pt-16">
        <div className="mx-auto flex max-w-md justify-center">
          <Link to={paths.home} className={cx("rounded-md", focusRing)}>
            <Wordmark size="lg" />
          </Link>
        </div>
      </header>
      <main id="main" className="flex-1 px-4 pb-16" onFocusCapture={prefetchSignedInScreens} onPointerDownCapture={prefetchSignedInScreens}>
        <div className="mx-auto max-w-md rounded-2xl border border-stone-200 bg-white px-6 py-8 shadow-sm sm:px-8">
          <Outlet />
        </div>
      </main>
      <footer className="px-4 pb-8 text-center text-sm text-stone-500">
        A shared workbench for testing whether a past biotic crisis was selective by trait.
      </footer>
    </div>
  );
}
