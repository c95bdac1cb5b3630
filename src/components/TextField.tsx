import { useState, type InputHTMLAttributes, type ReactNode, type TextareaHTMLAttributes } from "react";
import { controlClasses, FieldShell } from "./Field";
import { focusRing } from "./focus";
import { cx } from "../lib/cx";

interface CommonFieldProps {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  optional?: boolean;
  className?: string;
}

export type TextFieldProps = CommonFieldProps & Omit<InputHTMLAttributes<HTMLInputElement>, "className" | "id">;

export function TextField({ label, hint, error, optional, className, ...input }: TextFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} optional={optional} className={className}>
      {({ id, describedBy, invalid }) => (
        <input id={id} aria-describedby={describedBy} aria-invalid={invalid || undefined} className={cx(controlClasses(invalid), "h-10")} {...input} />
      )}
    </FieldShell>
  );
}

export type TextAreaProps = CommonFieldProps & Omit<TextareaHTMLAttributes<HTMLTextAreaElement>, "className" | "id">;

export function TextArea({ label, hint, error, optional, className, rows = 4, ...textarea }: TextAreaProps) {
  return (
    <FieldShell label={label} hint={hint} error={error} optional={optional} className={className}>
      {({ id, describedBy, invalid }) => (
        <textarea
          id={id}
          rows={rows}
          aria-describedby={describedBy}
          aria-invalid={invalid || undefined}
          className={cx(controlClasses(invalid), "py-2 leading-relaxed")}
          {...textarea}
        />
      )}
    </FieldShell>
  );
}

export type PasswordFieldProps = Omit<TextFieldProps, "type">;

/** A password input with a button that shows what was typed (helps on phones). */
export function PasswordField({ label, hint, error, optional, className, ...input }: PasswordFieldProps) {
  const [visible, setVisible] = useState(false);
  return (
    <FieldShell label={label} hint={hint} error={error} optional={optional} className={className}>
      {({ id, describedBy, invalid }) => (
        <div className="relative">
          <input
            id={id}
            type={visible ? "text" : "password"}
            aria-describedby={describedBy}
            aria-invalid={invalid || undefined}
            className={cx(controlClasses(invalid), "h-10 pr-20")}
            {...input}
          />
          <button
            type="button"
            onClick={() => setVisible((v) => !v)}
            aria-pressed={visible}
            aria-controls={id}
            className={cx(
              "absolute inset-y-1 right-1 rounded-md px-2.5 text-sm font-medium text-stone-600 hover:bg-stone-100 hover:text-stone-900",
              focusRing,
            )}
          >
            {visible ? "Hide" : "Show"}
            <span className="sr-only"> password</span>
          </button>
        </div>
      )}
    </FieldShell>
  );
}
