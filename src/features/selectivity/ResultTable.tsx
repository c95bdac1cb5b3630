import type { ReactNode } from "react";
import { cx } from "../../lib/cx";

export const th = "px-3 py-2 text-left text-xs font-semibold tracking-wide text-stone-500 uppercase";
export const thNum = "px-3 py-2 text-right text-xs font-semibold tracking-wide text-stone-500 uppercase";
export const td = "px-3 py-2 text-left text-stone-800";
export const tdNum = "px-3 py-2 text-right tabular-nums text-stone-800 whitespace-nowrap";

/**
 * A results table that scrolls sideways on a narrow screen and keeps its caption for screen readers.
 * The scrolling box takes the keyboard focus (a named region), so it can be scrolled without a mouse.
 */
export function ResultTable({ caption, children, className, minWidth = "36rem" }: { caption: string; children: ReactNode; className?: string; minWidth?: string }) {
  return (
    <div
      role="region"
      aria-label={caption}
      tabIndex={0}
      className={cx("overflow-x-auto rounded-lg border border-stone-200 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-accent-600", className)}
    >
      <table className="w-full text-sm" style={{ minWidth }}>
        <caption className="sr-only">{caption}</caption>
        {children}
      </table>
    </div>
  );
}

export function HeadRow({ children }: { children: ReactNode }) {
  return (
    <thead className="border-b border-stone-200 bg-stone-50">
      <tr>{children}</tr>
    </thead>
  );
}

/** A column heading; numeric columns are right-aligned like their cells. */
export function ColHead({ numeric = false, children }: { numeric?: boolean; children: ReactNode }) {
  return (
    <th scope="col" className={numeric ? thNum : th}>
      {children}
    </th>
  );
}

export function Body({ children }: { children: ReactNode }) {
  return <tbody className="divide-y divide-stone-100">{children}</tbody>;
}
