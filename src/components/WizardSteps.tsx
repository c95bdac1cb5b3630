import { cx } from "../lib/cx";

interface WizardStepsProps {
  /** Names the list for screen readers, e.g. "Steps of the import". */
  label: string;
  steps: readonly { key: string; label: string }[];
  /** Index of the current step; -1 before the first (e.g. while a file is being chosen). */
  current: number;
}

/** The numbered steps of a wizard (upload, map, check, save), the current one marked. */
export function WizardSteps({ label, steps, current }: WizardStepsProps) {
  return (
    <ol className="mb-6 flex flex-wrap gap-2 text-sm" aria-label={label}>
      {steps.map((s, i) => (
        <li
          key={s.key}
          aria-current={i === current ? "step" : undefined}
          className={cx(
            "flex items-center gap-2 rounded-full px-3 py-1 ring-1",
            i === current ? "bg-accent-50 font-semibold text-accent-900 ring-accent-200" : i < current ? "text-stone-700 ring-stone-200" : "text-stone-500 ring-stone-200",
          )}
        >
          <span className="tabular-nums">{i + 1}</span> {s.label}
          {i < current && <span className="sr-only">(done)</span>}
        </li>
      ))}
    </ol>
  );
}
