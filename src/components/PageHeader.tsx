import type { ReactNode } from "react";
import { cx } from "../lib/cx";

export interface PageHeaderProps {
  title: ReactNode;
  /** A small line above the title, e.g. the study a screen belongs to. */
  eyebrow?: ReactNode;
  description?: ReactNode;
  /** Buttons at the right (below the title on phones). */
  actions?: ReactNode;
  /** Extra content under the description, e.g. badges. */
  children?: ReactNode;
  className?: string;
}

/** The page's one h1, with what the page is for and its main actions. */
export function PageHeader({ title, eyebrow, description, actions, children, className }: PageHeaderProps) {
  return (
    <header className={cx("mb-8 flex flex-col gap-4 sm:flex-row sm:items-end sm:justify-between", className)}>
      <div className="min-w-0">
        {eyebrow && <p className="mb-1 text-sm font-medium text-accent-700">{eyebrow}</p>}
        <h1 className="text-2xl font-semibold tracking-tight text-balance text-stone-900 sm:text-[28px] sm:leading-tight">{title}</h1>
        {description && <div className="mt-2 max-w-2xl text-[15px] text-stone-600">{description}</div>}
        {children && <div className="mt-3">{children}</div>}
      </div>
      {actions && <div className="flex shrink-0 flex-wrap items-center gap-3">{actions}</div>}
    </header>
  );
}
