// How outcomes and proportions read on the Boundary screen (ages: components/timescale/ages.ts).
import type { BoundaryOutcomeName } from "@shared/schemas/outcomes";

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

const rateFormat = new Intl.NumberFormat("en-GB", { minimumFractionDigits: 2, maximumFractionDigits: 3 });
export { formatPercent } from "../../lib/format";

/** "30%" */
export function formatWholePercent(value: number): string {
  return `${Math.round(value * 1000) / 10}%`;
}

/** "0.847" */
export function formatRate(value: number): string {
  return rateFormat.format(value);
}
