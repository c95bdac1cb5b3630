import { cx } from "../lib/cx";
import { Spinner } from "./Spinner";

/**
 * A labelled bar for long work; `value` from 0 to 1, or null while the share is unknown. `busy`
 * adds a spinner beside the label (work that goes on elsewhere, e.g. on the server); `valueText`
 * is what a screen reader hears instead of the percentage.
 */
export function ProgressBar({ label, value, detail, busy = false, valueText }: { label: string; value: number | null; detail?: string; busy?: boolean; valueText?: string }) {
  const percent = value === null ? null : Math.round(Math.max(0, Math.min(1, value)) * 100);
  return (
    <div>
      <div className="flex items-baseline justify-between gap-3 text-sm">
        <span className="inline-flex items-center gap-2 font-medium text-stone-800">
          {busy && <Spinner className="text-accent-600" />}
          {label}
        </span>
        <span className="text-stone-500 tabular-nums">{percent === null ? detail : `${percent}%${detail ? ` · ${detail}` : ""}`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent ?? undefined}
        aria-valuetext={valueText ?? (percent === null ? detail : undefined)}
        className="mt-1.5 h-2.5 overflow-hidden rounded-full bg-stone-200"
      >
        <div
          className={cx("h-full rounded-full bg-accent-600 transition-[width] duration-300", percent === null && "w-1/3 animate-pulse")}
          style={percent === null ? undefined : { width: `${Math.max(percent, 2)}%` }}
        />
      </div>
    </div>
  );
}
