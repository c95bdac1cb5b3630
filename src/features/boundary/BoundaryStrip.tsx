import type { TimescaleRankName, TimescaleUnitDto } from "@shared/schemas/timescale";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import type { ScaleIndex } from "../../components/timescale/scaleIndex";
import { formatAgeNumber, formatMa, formatMyr, RANK_WORD, windowEdge } from "../../components/timescale/ages";

const ROWS: ReadonlyArray<{ rank: TimescaleRankName; label: string }> = [
  { rank: "Period", label: "Period" },
  { rank: "Epoch", label: "Epoch" },
  { rank: "Age", label: "Stage" },
];

/** Stages shown on each side of the boundary (more on the older side when the window reaches further). */
const STAGES_YOUNGER = 3;
const STAGES_OLDER = 3;
const MAX_EXTRA_OLDER = 10;
/** Below this share of the strip's width a unit shows no name (it keeps its tooltip and accessible name). */
const MIN_LABEL_PERCENT = 7;
const MIN_SHORT_LABEL_PERCENT = 3.5;

export interface BoundaryStripProps {
  scale: ScaleIndex;
  boundary: number;
  /** Window below the boundary in Myr; null while it is not known yet. */
  window: number | null;
  /** The unit chosen by name, drawn strongest. */
  chosenUnit?: TimescaleUnitDto;
  onPick: (unit: TimescaleUnitDto) => void;
}

/** The span of ages shown: a few stages either side of the boundary, older far enough to hold the window. */
function spanAround(scale: ScaleIndex, boundary: number, window: number | null): { older: number; younger: number } {
  const stages = scale.overlapping("Age", Infinity, -Infinity); // oldest first
  const below = scale.stageBelow(boundary);
  let at = below ? stages.indexOf(below) : -1;
  if (at < 0) {
    // Older than the oldest stage (or not on the chart): show the oldest stages.
    at = boundary >= stages[0].base ? 0 : stages.length - 1;
  }
  let lo = Math.max(0, at - STAGES_OLDER + 1);
  const reach = window === null ? boundary : windowEdge(boundary, window);
  for (let extra = 0; lo > 0 && stages[lo].base < reach && extra < MAX_EXTRA_OLDER; extra++) lo--;
  const hi = Math.min(stages.length - 1, at + STAGES_YOUNGER);
  const older = Math.max(stages[lo].base, boundary);
  const younger = Math.min(stages[hi].top, boundary);
  // A boundary outside the chart still gets room on both sides.
  const pad = older === younger ? 5 : 0;
  return { older: older + pad, younger: Math.max(0, younger - pad) };
}

/** The last word of a unit's name ("Late Cretaceous" -> "Cretaceous"): narrow cells show as much of it as fits. */
function shortLabel(label: string): string {
  return label.split(" ").pop() ?? label;
}

/**
 * A strip of the time scale around the boundary, oldest at the left: periods, epochs and stages to
 * scale, the boundary as a line and the window below it as a shaded band. Clicking a unit chooses its base.
 */
export function BoundaryStrip({ scale, boundary, window, chosenUnit, onPick }: BoundaryStripProps) {
  const { older, younger } = spanAround(scale, boundary, window);
  const width = older - younger;
  const x = (age: number) => Math.min(100, Math.max(0, ((older - age) / width) * 100));
  const boundaryX = x(boundary);
  const edgeX = window === null ? null : x(windowEdge(boundary, window));
  const windowClipped = window !== null && windowEdge(boundary, window) > older;

  return (
    <figure className="mt-6">
      <div className="flex items-end justify-between text-xs font-medium text-stone-500">
        <span>← older</span>
        <span>younger →</span>
      </div>
      <div className="mt-1 grid grid-cols-[4.25rem_minmax(0,1fr)] gap-x-2">
        <div className="flex flex-col gap-1 pt-6 text-xs font-medium text-stone-500" aria-hidden="true">
          {ROWS.map((row) => (
            <span key={row.rank} className="flex h-9 items-center">
              {row.label}
            </span>
          ))}
        </div>
        <div className="relative pt-6" role="group" aria-label="Time scale around the boundary: choose a unit to use its base">
          {/* The boundary's flag: its age above the line. */}
          <span
            className="absolute top-0 z-20 -translate-x-1/2 rounded bg-accent-700 px-1.5 py-0.5 text-xs font-semibold whitespace-nowrap text-white tabular-nums"
            style={{ left: `${boundaryX}%` }}
          >
            {formatMa(boundary)}
          </span>
          <div className="relative flex flex-col gap-1">
            {ROWS.map((row) => (
              <div key={row.rank} className="relative h-9 overflow-hidden rounded-md bg-stone-100">
                {scale.overlapping(row.rank, older, younger).map((unit, i) => {
                  const left = x(unit.base);
                  const right = x(unit.top);
                  const span = right - left;
                  const startsHere = Math.abs(unit.base - boundary) < 1e-9;
                  const chosen = chosenUnit !== undefined && chosenUnit.name === unit.name && chosenUnit.rank === unit.rank;
                  const name = unit.base > older ? `… ${unit.label}` : unit.label;
                  return (
                    <button
                      key={`${unit.rank}:${unit.name}`}
                      type="button"
                      onClick={() => onPick(unit)}
                      title={`${unit.label} (${RANK_WORD[unit.rank]}): ${formatAgeNumber(unit.base)}–${formatMa(unit.top)}`}
                      aria-label={`Use the base of the ${unit.label} ${RANK_WORD[unit.rank]}, ${formatMa(unit.base)}`}
                      aria-pressed={chosen}
                      className={cx(
                        "absolute inset-y-0 overflow-hidden border-r border-white px-1.5 text-left text-xs font-medium whitespace-nowrap transition-colors",
                        chosen
                          ? "bg-accent-600 text-white"
                          : startsHere
                            ? "bg-accent-100 text-accent-900 hover:bg-accent-200"
                            : i % 2 === 0
                              ? "bg-stone-200/80 text-stone-700 hover:bg-stone-300"
                              : "bg-stone-100 text-stone-700 hover:bg-stone-200",
                        focusRing,
                        "focus-visible:z-30",
                      )}
                      style={{ left: `${left}%`, width: `${span}%` }}
                    >
                      {span >= MIN_LABEL_PERCENT ? <span className="block truncate">{name}</span> : span >= MIN_SHORT_LABEL_PERCENT ? <span className="block truncate">{shortLabel(unit.label)}</span> : null}
                    </button>
                  );
                })}
              </div>
            ))}
            {edgeX !== null && (
              <div
                aria-hidden="true"
                className="pointer-events-none absolute inset-y-0 z-10 border-l-2 border-dashed border-caution-700/70 bg-[repeating-linear-gradient(135deg,rgb(138_90_18/0.16)_0_4px,transparent_4px_9px)]"
                style={{ left: `${edgeX}%`, width: `${Math.max(boundaryX - edgeX, 0.4)}%` }}
              />
            )}
            <div aria-hidden="true" className="pointer-events-none absolute -top-1 -bottom-1 z-20 w-0.5 -translate-x-1/2 bg-accent-700" style={{ left: `${boundaryX}%` }} />
          </div>
          <div className="relative mt-1.5 h-5 text-xs text-stone-500 tabular-nums" aria-hidden="true">
            <span className="absolute left-0">{formatMa(older)}</span>
            <span className="absolute right-0">{formatMa(younger)}</span>
          </div>
        </div>
      </div>
      <figcaption className="mt-1 flex flex-wrap items-center gap-x-5 gap-y-1 text-sm text-stone-600">
        <span className="inline-flex items-center gap-2">
          <span className="inline-block h-3.5 w-0.5 bg-accent-700" aria-hidden="true" />
          Boundary at {formatMa(boundary)}
        </span>
        {window !== null && (
          <span className="inline-flex items-center gap-2">
            <span
              className="inline-block h-3.5 w-5 rounded-sm border border-dashed border-caution-700/70 bg-[repeating-linear-gradient(135deg,rgb(138_90_18/0.2)_0_3px,transparent_3px_6px)]"
              aria-hidden="true"
            />
            Window below it: {formatMyr(window)}, to {formatMa(windowEdge(boundary, window))}
            {windowClipped && " (reaches beyond the strip)"}
          </span>
        )}
        <span className="text-stone-500">Drawn to scale; choose a unit to move the boundary to its base.</span>
      </figcaption>
    </figure>
  );
}
