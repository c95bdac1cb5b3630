import type { RunStatus } from "@shared/schemas/runs";
import { cx } from "../../lib/cx";

const LOOK: Record<RunStatus, { label: string; className: string }> = {
  queued: { label: "Queued", className: "bg-stone-100 text-stone-700 ring-stone-200" },
  running: { label: "Running", className: "bg-accent-50 text-accent-900 ring-accent-200" },
  succeeded: { label: "Finished", className: "bg-accent-100 text-accent-900 ring-accent-200" },
  failed: { label: "Failed", className: "bg-red-50 text-red-800 ring-red-200" },
};

export function RunStatusBadge({ status }: { status: RunStatus }) {
  const look = LOOK[status];
  return (
    <span data-status={status} className={cx("inline-flex items-center rounded-full px-2.5 py-0.5 text-xs font-semibold ring-1", look.className)}>
      {look.label}
    </span>
  );
}
