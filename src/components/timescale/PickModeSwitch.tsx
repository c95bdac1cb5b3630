import { useId } from "react";
import { cx } from "../../lib/cx";

export type BoundaryPickMode = "unit" | "age";

const OPTIONS: ReadonlyArray<{ value: BoundaryPickMode; label: string }> = [
  { value: "unit", label: "Unit of the chart" },
  { value: "age", label: "Custom age" },
];

/** Two ways to place a boundary: the base of a unit of the time scale, or an age typed in Ma. */
export function PickModeSwitch({ mode, onChange }: { mode: BoundaryPickMode; onChange: (mode: BoundaryPickMode) => void }) {
  const name = useId();
  return (
    <fieldset>
      <legend className="sr-only">Choose the boundary by</legend>
      <div className="inline-flex rounded-lg border border-stone-300 bg-stone-100 p-0.5">
        {OPTIONS.map((option) => (
          <label
            key={option.value}
            className={cx(
              "cursor-pointer rounded-md px-3 py-1.5 text-sm font-medium transition-colors has-[:focus-visible]:ring-2 has-[:focus-visible]:ring-accent-500",
              mode === option.value ? "bg-white text-stone-900 shadow-sm" : "text-stone-600 hover:text-stone-900",
            )}
          >
            <input type="radio" name={name} value={option.value} checked={mode === option.value} onChange={() => onChange(option.value)} className="sr-only" />
            {option.label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}
