import { useId, useState } from "react";
import { Link, NavLink, Outlet, useLocation, useMatch } from "react-router-dom";
import type { Me } from "@shared/schemas/auth";
import { ErrorState } from "../components/ErrorState";
import { focusRing } from "../components/focus";
import { cx } from "../lib/cx";
import { LoadingState } from "../components/LoadingState";
import { NotificationBell } from "../features/notifications/NotificationBell";
import { ApiError } from "../lib/api";
import { paths } from "../lib/paths";
import { useMe } from "../lib/session";
import { AccountMenu } from "./AccountMenu";
import { useSignOutAndLeave } from "./useSignOutAndLeave";
import { Wordmark } from "./Wordmark";

/** The frame of every signed-in page: top bar, then the page. Signed-out visitors are sent to sign in. */
export function AppShell() {
  const me = useMe();

  if (me.isPending || (me.error instanceof ApiError && me.error.isUnauthorized)) {
    // A 401 is already on its way to the sign-in page (see providers.tsx).
    return (
      <div className="mx-auto max-w-6xl px-4 py-16 sm:px-6">
        <LoadingState label="Opening Stratasieve" lines={0} />
      </div>
    );
  }
  if (me.isError) {
    return (
      <main className="mx-auto max-w-2xl px-4 py-16 sm:px-6">
        <h1 className="mb-6 text-2xl font-semibold tracking-tight">Stratasieve is not reachable</h1>
        <ErrorState error={me.error} title="Your account could not be loaded" onRetry={() => void me.refetch()} />
      </main>
    );
  }
  return <SignedInFrame me={me.data} />;
}

function SignedInFrame({ me }: { me: Me }) {
  const { signOut, pending: signingOut } = useSignOutAndLeave();
  // The trait table is wide: it takes the whole window rather than the reading width of other pages.
  const fullWidth = useMatch("/studies/:studyId/table") !== null;
  // The fake mailbox exists outside production; everyone signed in reads their own mail in it.
  const showOutbox = me.environment !== "production";

  return (
    <div className="flex min-h-screen flex-col">
      <a href="#main" className={cx("sr-only rounded-md bg-white px-3 py-2 font-medium focus:not-sr-only focus:absolute focus:top-3 focus:left-3 focus:z-50", focusRing)}>
        Skip to content
      </a>
      <TopBar me={me} showOutbox={showOutbox} signingOut={signingOut} onSignOut={signOut} />
      <main id="main" tabIndex={-1} className={cx("mx-auto w-full flex-1 px-4 py-8 focus:outline-none sm:px-6 lg:px-8 lg:py-10", fullWidth ? "max-w-none" : "max-w-6xl")}>
        <Outlet />
      </main>
    </div>
  );
}

const topLinkClasses = ({ isActive }: { isActive: boolean }) =>
  cx(
    "rounded-md px-3 py-1.5 text-[15px] font-medium transition-colors",
    isActive ? "bg-stone-100 text-stone-900" : "text-stone-600 hover:bg-stone-100 hover:text-stone-900",
    focusRing,
  );

interface TopBarProps {
  me: Me;
  showOutbox: boolean;
  signingOut: boolean;
  onSignOut: () => void;
}

function TopBar({ me, showOutbox, signingOut, onSignOut }: TopBarProps) {
  const location = useLocation();
  // Opened "at" a location: any navigation closes the phone menu without an effect.
  const [menuOpenAt, setMenuOpenAt] = useState<string | null>(null);
  const menuOpen = menuOpenAt === location.key;
  const menuId = useId();
  const inStudies = location.pathname === "/" || location.pathname.startsWith("/studies");

  return (
    <header className="sticky top-0 z-30 border-b border-stone-200 bg-white/90 backdrop-blur">
      <div className="mx-auto flex h-16 max-w-6xl items-center gap-6 px-4 sm:px-6 lg:px-8">
        <Link to={paths.home} className={cx("rounded-md", focusRing)}>
          <Wordmark />
        </Link>
        {me.environment !== "production" && <EnvironmentTag environment={me.environment} />}

        <nav aria-label="Main" className="hidden flex-1 items-center gap-1 md:flex">
          <Link to={paths.home} className={topLinkClasses({ isActive: inStudies })} aria-current={inStudies ? "page" : undefined}>
            Studies
          </Link>
          {showOutbox && (
            <NavLink to={paths.outbox} className={topLinkClasses}>
              Outbox
            </NavLink>
          )}
        </nav>
        <div className="ml-auto md:ml-0">
          <NotificationBell />
        </div>
        <div className="hidden md:block">
          <AccountMenu user={me.user} showOutbox={showOutbox} signingOut={signingOut} onSignOut={onSignOut} />
        </div>

        <button
          type="button"
          className={cx("inline-flex items-center gap-2 rounded-md px-3 py-1.5 text-[15px] font-medium text-stone-700 hover:bg-stone-100 md:hidden", focusRing)}
          aria-expanded={menuOpen}
          aria-controls={menuId}
          onClick={() => setMenuOpenAt(menuOpen ? null : location.key)}
        >
          <svg className="size-5" viewBox="0 0 20 20" fill="none" stroke="currentColor" strokeWidth="1.8" strokeLinecap="round" aria-hidden="true">
            {menuOpen ? <path d="M5 5l10 10M15 5 5 15" /> : <path d="M3 6h14M3 10h14M3 14h14" />}
          </svg>
          Menu
        </button>
      </div>

      <div id={menuId} hidden={!menuOpen} className="border-t border-stone-200 bg-white px-4 pt-3 pb-4 md:hidden">
        <nav aria-label="Main (phone)">
          <ul className="space-y-1">
            <li>
              <Link to={paths.home} className={cx(topLinkClasses({ isActive: inStudies }), "block")} aria-current={inStudies ? "page" : undefined}>
                Studies
              </Link>
            </li>
            {showOutbox && (
              <li>
                <NavLink to={paths.outbox} className={(state) => cx(topLinkClasses(state), "block")}>
                  Outbox
                </NavLink>
              </li>
            )}
            <li>
              <NavLink to={paths.account} className={(state) => cx(topLinkClasses(state), "block")}>
                Account settings
              </NavLink>
            </li>
          </ul>
        </nav>
        <div className="mt-3 flex items-center justify-between gap-3 border-t border-stone-100 pt-3">
          <div className="min-w-0">
            <p className="truncate text-sm font-medium text-stone-900">{me.user.name}</p>
            <p className="truncate text-sm text-stone-500">{me.user.email}</p>
          </div>
          <button
            type="button"
            onClick={onSignOut}
            disabled={signingOut}
            className={cx("shrink-0 rounded-md border border-stone-300 px-3 py-1.5 text-sm font-medium text-stone-700 hover:bg-stone-50", focusRing)}
          >
            Sign out
          </button>
        </div>
      </div>
    </header>
  );
}

function EnvironmentTag({ environment }: { environment: Me["environment"] }) {
  return (
    <span
      className="hidden rounded-full border border-caution-200 bg-caution-50 px-2 py-0.5 text-xs font-semibold tracking-wide text-caution-700 uppercase sm:inline"
      title="Not the production site: e-mail goes to the local outbox"
    >
      {environment === "test" ? "Test" : "Development"}
    </span>
  );
}
