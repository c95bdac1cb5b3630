import { initials } from "../lib/format";
import { cx } from "../lib/cx";

/** Initials in a circle; decorative, the name is always written next to it. */
export function Avatar({ name, className }: { name: string; className?: string }) {
  return (
    <span
      aria-hidden="true"
      className={cx("inline-flex size-8 shrink-0 items-center justify-center rounded-full bg-accent-100 text-xs font-semibold text-accent-900", className)}
    >
      {initials(name)}
    </span>
  );
}
