import type { ReactNode, SelectHTMLAttributes } from "react";
import { controlClasses, FieldShell } from "./Field";
import { cx } from "../lib/cx";

export interface SelectOption {
  value: string;
  label: string;
  disabled?: boolean;
}

export interface SelectProps extends Omit<SelectHTMLAttributes<HTMLSelectElement>, "className" | "id"> {
  label: ReactNode;
  options: readonly SelectOption[];
  hint?: ReactNode;
  error?: string;
  optional?: boolean;
  className?: string;
  /** Keeps the label for screen readers only, e.g. a role picker inside a table row. */
  hideLabel?: boolean;
}

export function Select({ label, options, hint, error, optional, className, hideLabel, ...select }: SelectProps) {
  return (
    <FieldShell
      label={hideLabel ? <span className="sr-only">{label}</span> : label}
      hint={hint}
      error={error}
      optional={optional}
      className={cx(hideLabel && "gap-0", className)}
    >
      {({ id, describedBy, invalid }) => (
        <div className="relative">
          <select
            id={id}
            aria-describedby={describedBy}
            aria-invalid={invalid || undefined}
            className={cx(controlClasses(invalid), "h-10 appearance-none pr-9")}
            {...select}
          >
            {options.map((option) => (
              <option key={option.value} value={option.value} disabled={option.disabled}>
                {option.label}
              </option>
            ))}
          </select>
          <svg className="pointer-events-none absolute top-1/2 right-2.5 size-5 -translate-y-1/2 text-stone-500" viewBox="0 0 20 20" fill="currentColor" aria-hidden="true">
            <path
              fillRule="evenodd"
              d="M5.22 8.22a.75.75 0 0 1 1.06 0L10 11.94l3.72-3.72a.75.75 0 1 1 1.06 1.06l-4.25 4.25a.75.75 0 0 1-1.06 0L5.22 9.28a.75.75 0 0 1 0-1.06Z"
              clipRule="evenodd"
            />
          </svg>
        </div>
      )}
    </FieldShell>
  );
}
