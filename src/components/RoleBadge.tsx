import { ROLE_LABELS, ROLE_SUMMARIES, type StudyRole } from "@shared/roles";
import { cx } from "../lib/cx";

/** A person's role in a study, named as the app names it; hover or focus shows what it allows. */
export function RoleBadge({ role, className }: { role: StudyRole; className?: string }) {
  return (
    <span
      title={ROLE_SUMMARIES[role]}
      data-role={role}
      className={cx(
        "inline-flex items-center rounded-full px-2.5 py-0.5 text-xs font-semibold tracking-wide",
        role === "owner" ? "bg-accent-100 text-accent-900 ring-1 ring-accent-200" : "bg-stone-100 text-stone-700 ring-1 ring-stone-200",
        className,
      )}
    >
      {ROLE_LABELS[role]}
    </span>
  );
}
