import { useEffect, useId, useRef, useState } from "react";
import { Link, useLocation } from "react-router-dom";
import type { User } from "@shared/schemas/auth";
import { Avatar } from "../components/Avatar";
import { focusRing } from "../components/focus";
import { cx } from "../lib/cx";
import { Spinner } from "../components/Spinner";
import { paths } from "../lib/paths";

interface AccountMenuProps {
  user: User;
  showOutbox: boolean;
  signingOut: boolean;
  onSignOut: () => void;
}

const itemClasses = cx("flex w-full items-center gap-2 rounded-md px-3 py-2 text-left text-[15px] text-stone-700 hover:bg-stone-100 hover:text-stone-900", focusRing);

/** The signed-in person, with account settings and sign-out (a disclosure, not an ARIA menu). */
export function AccountMenu({ user, showOutbox, signingOut, onSignOut }: AccountMenuProps) {
  const location = useLocation();
  // Remembering where it was opened closes it on any navigation without an effect.
  const [openAt, setOpenAt] = useState<string | null>(null);
  const open = openAt === location.key;
  const panelId = useId();
  const containerRef = useRef<HTMLDivElement>(null);

  useEffect(() => {
    if (!open) return;
    const closeOnOutsideClick = (event: MouseEvent) => {
      if (containerRef.current && !containerRef.current.contains(event.target as Node)) setOpenAt(null);
    };
    document.addEventListener("mousedown", closeOnOutsideClick);
    return () => document.removeEventListener("mousedown", closeOnOutsideClick);
  }, [open]);

  return (
    <div
      ref={containerRef}
      className="relative"
      onKeyDown={(event) => {
        if (event.key === "Escape" && open) {
          setOpenAt(null);
          containerRef.current?.querySelector<HTMLButtonElement>("button[aria-controls]")?.focus();
        }
      }}
    >
      <button
        type="button"
        aria-expanded={open}
        aria-controls={panelId}
        onClick={() => setOpenAt(open ? null : location.key)}
        className={cx("flex items-center gap-2 rounded-full py-1 pr-2.5 pl-1 text-sm font-medium text-stone-700 hover:bg-stone-100", focusRing)}
      >
        <Avatar name={user.name} />
        <span className="max-w-40 truncate">{user.name}</span>
        <svg className={cx("size-4 text-stone-500 transition-transform", open && "rotate-180")} viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
          <path fillRule="evenodd" d="M5.22 8.22a.75.75 0 0 1 1.06 0L10 11.94l3.72-3.72a.75.75 0 1 1 1.06 1.06l-4.25 4.25a.75.75 0 0 1-1.06 0L5.22 9.28a.75.75 0 0 1 0-1.06Z" clipRule="evenodd" />
        </svg>
        <span className="sr-only">Account</span>
      </button>
      <div
        id={panelId}
        hidden={!open}
        className="absolute right-0 z-40 mt-2 w-72 rounded-xl border border-stone-200 bg-white p-2 shadow-lg"
      >
        <div className="border-b border-stone-100 px-3 pt-2 pb-3">
          <p className="truncate font-medium text-stone-900">{user.name}</p>
          <p className="truncate text-sm text-stone-500">{user.email}</p>
        </div>
        <ul className="pt-2">
          <li>
            <Link to={paths.account} className={itemClasses}>
              Account settings
            </Link>
          </li>
          {showOutbox && (
            <li>
              <Link to={paths.outbox} className={itemClasses}>
                Outbox
              </Link>
            </li>
          )}
          <li>
            <button type="button" onClick={onSignOut} disabled={signingOut} className={itemClasses}>
              {signingOut && <Spinner />}
              Sign out
            </button>
          </li>
        </ul>
      </div>
    </div>
  );
}
