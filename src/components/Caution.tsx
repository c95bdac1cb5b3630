import type { ReactNode } from "react";
import { cx } from "../lib/cx";

/** A standing caution about how to read a result (not an error): calm, but hard to miss. */
export function Caution({ title, children, className }: { title: ReactNode; children: ReactNode; className?: string }) {
  return (
    <aside role="note" className={cx("flex gap-3 rounded-lg border border-caution-200 bg-caution-50 px-4 py-3 text-caution-700", className)}>
      <svg className="mt-0.5 size-5 shrink-0" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
        <path
          fillRule="evenodd"
          d="M18 10a8 8 0 1 1-16 0 8 8 0 0 1 16 0Zm-7-4a1 1 0 1 1-2 0 1 1 0 0 1 2 0ZM9 9a.75.75 0 0 0 0 1.5h.253a.25.25 0 0 1 .244.304l-.459 2.066A1.75 1.75 0 0 0 10.747 15H11a.75.75 0 0 0 0-1.5h-.253a.25.25 0 0 1-.244-.304l.459-2.066A1.75 1.75 0 0 0 9.253 9H9Z"
          clipRule="evenodd"
        />
      </svg>
      <div className="text-[15px]">
        <p className="font-semibold">{title}</p>
        <div className="mt-1 text-stone-700">{children}</div>
      </div>
    </aside>
  );
}
