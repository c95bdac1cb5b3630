// How outcomes, ages and proportions read on the Boundary screen.
import type { BoundaryOutcomeName } from "@shared/schemas/outcomes";
import type { TimescaleRankName } from "@shared/schemas/timescale";

export const OUTCOME_LABEL: Record<BoundaryOutcomeName, string> = {
  survivor: "Survivor",
  victim: "Victim",
  excluded: "Not at risk",
};

export const OUTCOME_GROUP_LABEL: Record<BoundaryOutcomeName, string> = {
  survivor: "Survivors",
  victim: "Victims",
  excluded: "Not at risk",
};

/** The order groups are shown in: the two at risk first. */
export const GROUP_ORDER: readonly BoundaryOutcomeName[] = ["survivor", "victim", "excluded"];

export const RANK_WORD: Record<TimescaleRankName, string> = {
  Eon: "eon",
  Era: "era",
  Period: "period",
  Subperiod: "subperiod",
  Epoch: "epoch",
  Age: "stage",
};

const ageFormat = new Intl.NumberFormat("en-GB", { maximumFractionDigits: 4 });
const rateFormat = new Intl.NumberFormat("en-GB", { minimumFractionDigits: 2, maximumFractionDigits: 3 });
const percentFormat = new Intl.NumberFormat("en-GB", { style: "percent", minimumFractionDigits: 1, maximumFractionDigits: 1 });

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

/** "42.9%" */
export function formatPercent(value: number): string {
  return percentFormat.format(value);
}

/** "30%" */
export function formatWholePercent(value: number): string {
  return `${Math.round(value * 1000) / 10}%`;
}

/** "0.847" */
export function formatRate(value: number): string {
  return rateFormat.format(value);
}

/** The boundary plus the window, rounded to a year so 93.9 + 6.6 reads 100.5, not 100.49999999999999. */
export function windowEdge(boundary: number, window: number): number {
  return Math.round((boundary + window) * 1e6) / 1e6;
}
