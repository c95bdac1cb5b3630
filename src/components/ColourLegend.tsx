import { cx } from "../lib/cx";

export interface LegendEntry {
  colour: string;
  label: string;
  /** "bar" (a square, default), "dot" (a filled circle) or "line" (a short dash). */
  mark?: "bar" | "dot" | "line";
}

/** What each colour of a chart stands for, as swatches with words; a list, so a screen reader reads it too. */
export function ColourLegend({ entries, label = "Colours", className }: { entries: readonly LegendEntry[]; label?: string; className?: string }) {
  return (
    <ul aria-label={label} className={cx("flex flex-wrap gap-x-4 gap-y-1.5 text-sm text-stone-600", className)} data-testid="colour-legend">
      {entries.map((entry) => (
        <li key={entry.label} className="inline-flex items-center gap-2" data-colour={entry.colour}>
          <span
            aria-hidden="true"
            className={cx("inline-block shrink-0", entry.mark === "line" ? "h-0.5 w-4" : "size-3", entry.mark === "dot" ? "rounded-full" : "rounded-sm", entry.mark !== "line" && "ring-1 ring-black/15 ring-inset")}
            style={{ background: entry.colour }}
          />
          {entry.label}
        </li>
      ))}
    </ul>
  );
}
