import { useId, type ReactNode } from "react";
import { cx } from "../lib/cx";

export interface CardProps {
  title?: ReactNode;
  description?: ReactNode;
  /** Buttons or links at the right of the title. */
  actions?: ReactNode;
  /** The title's heading level, to keep headings in order on the page. */
  headingLevel?: 2 | 3;
  tone?: "default" | "danger";
  className?: string;
  children?: ReactNode;
}

export function Card({ title, description, actions, headingLevel = 2, tone = "default", className, children }: CardProps) {
  const Heading = headingLevel === 2 ? "h2" : "h3";
  const titleId = useId();
  return (
    <section
      aria-labelledby={title ? titleId : undefined}
      className={cx(
        "rounded-xl border bg-white shadow-[0_1px_2px_rgb(28_25_23/0.04)]",
        tone === "danger" ? "border-red-200" : "border-stone-200",
        className,
      )}
    >
      {(title || actions) && (
        <header className="flex flex-wrap items-start justify-between gap-3 border-b border-stone-100 px-5 py-4 sm:px-6">
          <div className="min-w-0">
            {title && <Heading id={titleId} className={cx("text-base font-semibold tracking-tight", tone === "danger" ? "text-red-800" : "text-stone-900")}>{title}</Heading>}
            {description && <p className="mt-1 text-sm text-stone-600">{description}</p>}
          </div>
          {actions && <div className="flex shrink-0 items-center gap-2">{actions}</div>}
        </header>
      )}
      <div className="px-5 py-5 sm:px-6">{children}</div>
    </section>
  );
}
