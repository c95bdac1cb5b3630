import { cx } from "../lib/cx";
import { Spinner } from "./Spinner";

export interface LoadingStateProps {
  /** What is loading, e.g. "Loading members". */
  label?: string;
  /** Grey placeholder lines under the label, shaped like the content to come. */
  lines?: number;
  className?: string;
}

export function LoadingState({ label = "Loading", lines = 3, className }: LoadingStateProps) {
  return (
    <div role="status" aria-live="polite" className={cx("py-6", className)}>
      <p className="flex items-center gap-2 text-sm font-medium text-stone-600">
        <Spinner className="text-accent-600" />
        {label}…
      </p>
      {lines > 0 && (
        <div className="mt-5 space-y-3" aria-hidden="true">
          {Array.from({ length: lines }, (_, i) => (
            <div key={i} className="h-4 animate-pulse rounded bg-stone-200/70" style={{ width: `${92 - ((i * 17) % 40)}%` }} />
          ))}
        </div>
      )}
    </div>
  );
}
