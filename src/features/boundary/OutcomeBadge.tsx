import type { BoundaryOutcomeName } from "@shared/schemas/outcomes";
import { cx } from "../../lib/cx";
import { OUTCOME_LABEL } from "./words";

const TONE: Record<BoundaryOutcomeName, string> = {
  survivor: "bg-accent-50 text-accent-900 ring-accent-200",
  victim: "bg-red-50 text-red-800 ring-red-200",
  excluded: "bg-stone-100 text-stone-700 ring-stone-200",
};

/** An outcome as a small label, coloured like its count on the summary. */
export function OutcomeBadge({ outcome, className }: { outcome: BoundaryOutcomeName; className?: string }) {
  return (
    <span data-outcome={outcome} className={cx("inline-flex items-center rounded-full px-2 py-0.5 text-xs font-semibold ring-1", TONE[outcome], className)}>
      {OUTCOME_LABEL[outcome]}
    </span>
  );
}
