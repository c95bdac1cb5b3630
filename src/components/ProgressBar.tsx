import { cx } from "../lib/cx";

/** A labelled bar for long work; `value` from 0 to 1, or null while the share is unknown. */
export function ProgressBar({ label, value, detail }: { label: string; value: number | null; detail?: string }) {
  const percent = value === null ? null : Math.round(Math.max(0, Math.min(1, value)) * 100);
  return (
    <div>
      <div className="flex items-baseline justify-between gap-3 text-sm">
        <span className="font-medium text-stone-800">{label}</span>
        <span className="text-stone-500 tabular-nums">{percent === null ? detail : `${percent}%${detail ? ` · ${detail}` : ""}`}</span>
      </div>
      <div
        role="progressbar"
        aria-label={label}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent ?? undefined}
        aria-valuetext={percent === null ? detail : undefined}
        className="mt-1.5 h-2.5 overflow-hidden rounded-full bg-stone-200"
      >
        <div
          className={cx("h-full rounded-full bg-accent-600 transition-[width] duration-300", percent === null && "w-1/3 animate-pulse")}
          style={percent === null ? undefined : { width: `${percent}%` }}
        />
      </div>
    </div>
  );
}
