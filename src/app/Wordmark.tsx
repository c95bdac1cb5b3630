import { cx } from "../lib/cx";

/** The product's mark: strata with gaps, the layers a sieve lets through. */
export function Wordmark({ className, size = "md" }: { className?: string; size?: "md" | "lg" }) {
  return (
    <span className={cx("inline-flex items-center gap-2.5 font-semibold tracking-tight text-stone-900", size === "lg" ? "text-2xl" : "text-lg", className)}>
      <svg className={size === "lg" ? "size-9" : "size-7"} viewBox="0 0 32 32" aria-hidden="true">
        <rect width="32" height="32" rx="7" className="fill-accent-700" />
        <path d="M7 10h18M7 16h7m4 0h7M7 22h3m4 0h4m4 0h3" className="stroke-accent-50" strokeWidth="2.5" strokeLinecap="round" fill="none" />
      </svg>
      Stratasieve
    </span>
  );
}
