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

const ageFormat = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 4 });

/** "93.9 Ma" (ages before present, in millions of years). */
export function formatMa(age: number): string {
  return `${ageFormat.format(age)} Ma`;
}

/** "6.6 Myr" (a duration in millions of years). */
export function formatMyr(duration: number): string {
  return `${ageFormat.format(duration)} Myr`;
}

/** A plain number as ages are written, without the unit: "93.9". */
export function formatAgeNumber(age: number): string {
  return ageFormat.format(age);
}

/** The boundary plus the window, rounded to a year so 93.9 + 6.6 reads 100.5, not 100.49999999999999. */
export function windowEdge(boundary: number, window: number): number {
  return Math.round((boundary + window) * 1e6) / 1e6;
}
