import { useId, type ReactNode } from "react";
import { cx } from "../lib/cx";

export interface FieldControlIds {
  id: string;
  describedBy: string | undefined;
  invalid: boolean;
}

export interface FieldShellProps {
  label: ReactNode;
  /** A short help line under the label's control. */
  hint?: ReactNode;
  error?: string;
  /** Shown after the label; the input's own `required` does the checking. */
  optional?: boolean;
  className?: string;
  children: (ids: FieldControlIds) => ReactNode;
}

/** Label, control, hint and error, wired together with ids and aria-describedby. */
export function FieldShell({ label, hint, error, optional, className, children }: FieldShellProps) {
  const id = useId();
  const hintId = `${id}-hint`;
  const errorId = `${id}-error`;
  const describedBy = [hint ? hintId : null, error ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={cx("flex flex-col gap-1.5", className)}>
      <label htmlFor={id} className="text-sm font-medium text-stone-800">
        {label}
        {optional && <span className="ml-1.5 font-normal text-stone-500">(optional)</span>}
      </label>
      {children({ id, describedBy, invalid: Boolean(error) })}
      {hint && (
        <p id={hintId} className="text-sm text-stone-500">
          {hint}
        </p>
      )}
      <p id={errorId} aria-live="polite" className={error ? "flex items-start gap-1.5 text-sm font-medium text-red-700" : "sr-only"}>
        {error && (
          <>
            <svg className="mt-0.5 size-4 shrink-0" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
              <path
                fillRule="evenodd"
                d="M10 18a8 8 0 1 0 0-16 8 8 0 0 0 0 16Zm-.75-11.5a.75.75 0 0 1 1.5 0v4a.75.75 0 0 1-1.5 0v-4ZM10 14.75a1 1 0 1 0 0-2 1 1 0 0 0 0 2Z"
                clipRule="evenodd"
              />
            </svg>
            {error}
          </>
        )}
      </p>
    </div>
  );
}

export const controlClasses = (invalid: boolean) =>
  cx(
    "w-full rounded-lg border bg-white px-3 text-[15px] text-stone-900 shadow-sm placeholder:text-stone-400 transition-colors",
    "focus:outline-none focus-visible:ring-2 focus-visible:ring-offset-0",
    "disabled:cursor-not-allowed disabled:bg-stone-100 disabled:text-stone-500",
    invalid
      ? "border-red-500 focus-visible:border-red-600 focus-visible:ring-red-200"
      : "border-stone-300 hover:border-stone-400 focus-visible:border-accent-600 focus-visible:ring-accent-200",
  );
