// How ages and durations of the time scale read wherever a boundary is shown.
import type { TimescaleRankName } from "@shared/schemas/timescale";

export const RANK_WORD: Record<TimescaleRankName, string> = {
  Eon: "eon",
  Era: "era",
  Period: "period",
  Subperiod: "subperiod",
  Epoch: "epoch",
  Age: "stage",
};

// The age formats live with every other number format; re-exported for the time scale widgets.
export { agesWriter, formatAgeNumber, formatMa, formatMyr, type AgeWriter } from "../../lib/format";

/** The boundary plus the window, rounded to a year so 93.9 + 6.6 reads 100.5, not 100.49999999999999. */
export function windowEdge(boundary: number, window: number): number {
  return Math.round((boundary + window) * 1e6) / 1e6;
}
