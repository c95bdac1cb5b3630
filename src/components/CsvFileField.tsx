import { FieldShell, controlClasses } from "./Field";
import { cx } from "../lib/cx";

interface CsvFileFieldProps {
  label: string;
  hint: string;
  error?: string;
  disabled?: boolean;
  /** The chosen file, or null when the choice is cleared. */
  onFile: (file: File | null) => void;
}

/** A labelled file input for comma, semicolon or tab separated files. */
export function CsvFileField({ label, hint, error, disabled, onFile }: CsvFileFieldProps) {
  return (
    <FieldShell label={label} hint={hint} error={error}>
      {({ id, describedBy, invalid }) => (
        <input
          id={id}
          type="file"
          accept=".csv,.tsv,.txt,text/csv,text/tab-separated-values"
          aria-describedby={describedBy}
          aria-invalid={invalid || undefined}
          disabled={disabled}
          onChange={(e) => onFile(e.target.files?.[0] ?? null)}
          className={cx(
            controlClasses(invalid),
            "h-auto py-2 file:mr-3 file:rounded-md file:border-0 file:bg-accent-50 file:px-3 file:py-1.5 file:text-sm file:font-medium file:text-accent-900 hover:file:bg-accent-100",
          )}
        />
      )}
    </FieldShell>
  );
}
