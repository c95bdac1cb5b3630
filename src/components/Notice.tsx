import type { ReactNode } from "react";
import { cx } from "../lib/cx";

export type NoticeTone = "info" | "success" | "warning" | "error";

const tones: Record<NoticeTone, string> = {
  info: "border-stone-200 bg-stone-100/70 text-stone-800",
  success: "border-accent-200 bg-accent-50 text-accent-900",
  warning: "border-amber-300 bg-amber-50 text-amber-950",
  error: "border-red-200 bg-red-50 text-red-900",
};

export interface NoticeProps {
  tone?: NoticeTone;
  title?: ReactNode;
  children?: ReactNode;
  className?: string;
}

/** An inline message inside a page; errors are announced at once, others politely. */
export function Notice({ tone = "info", title, children, className }: NoticeProps) {
  return (
    <div role={tone === "error" ? "alert" : "status"} className={cx("rounded-lg border px-4 py-3 text-[15px]", tones[tone], className)}>
      {title && <p className="font-semibold">{title}</p>}
      {children && <div className={title ? "mt-1" : undefined}>{children}</div>}
    </div>
  );
}

/**
 * The live region at the top of a form: always present, so screen readers announce the
 * message the moment the server refuses the form.
 */
export function FormError({ message, className }: { message: string | null | undefined; className?: string }) {
  return (
    <div aria-live="assertive" className={className}>
      {message && (
        <div className="rounded-lg border border-red-200 bg-red-50 px-4 py-3 text-[15px] font-medium text-red-900">{message}</div>
      )}
    </div>
  );
}
