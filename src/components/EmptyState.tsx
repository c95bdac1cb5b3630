import type { ReactNode } from "react";
import { cx } from "../lib/cx";

export interface EmptyStateProps {
  title: ReactNode;
  description?: ReactNode;
  /** Usually one primary ButtonLink or Button. */
  action?: ReactNode;
  /** A small drawing above the title; a neutral layered mark when omitted. */
  illustration?: ReactNode;
  headingLevel?: 2 | 3;
  className?: string;
}

/** What a screen shows when there is nothing yet, and what to do about it. */
export function EmptyState({ title, description, action, illustration, headingLevel = 2, className }: EmptyStateProps) {
  const Heading = headingLevel === 2 ? "h2" : "h3";
  return (
    <div className={cx("flex flex-col items-center rounded-xl border border-dashed border-stone-300 bg-white/60 px-6 py-12 text-center", className)}>
      <div className="mb-5 text-accent-600">{illustration ?? <LayersMark />}</div>
      <Heading className="text-lg font-semibold tracking-tight text-stone-900">{title}</Heading>
      {description && <div className="mt-2 max-w-md text-[15px] text-stone-600">{description}</div>}
      {action && <div className="mt-6 flex flex-wrap justify-center gap-3">{action}</div>}
    </div>
  );
}

function LayersMark() {
  return (
    <svg width="72" height="56" viewBox="0 0 72 56" fill="none" aria-hidden="true">
      <rect x="4" y="6" width="64" height="10" rx="5" fill="currentColor" opacity="0.18" />
      <rect x="4" y="23" width="40" height="10" rx="5" fill="currentColor" opacity="0.32" />
      <rect x="50" y="23" width="18" height="10" rx="5" fill="currentColor" opacity="0.18" />
      <rect x="4" y="40" width="18" height="10" rx="5" fill="currentColor" opacity="0.5" />
      <rect x="28" y="40" width="12" height="10" rx="5" fill="currentColor" opacity="0.18" />
      <rect x="46" y="40" width="22" height="10" rx="5" fill="currentColor" opacity="0.32" />
    </svg>
  );
}
