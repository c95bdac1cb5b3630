// How the modern comparison screens write numbers and categories.
import { IUCN_CATEGORY_NAMES, threatGroup, type IucnCategory } from "@shared/iucn";
import { formatCompact, formatPStatement } from "../../lib/format";

/** "0.73": a predicted probability, two decimals. */
export const formatProbability = (p: number | null | undefined) => (p === null || p === undefined ? "—" : p.toFixed(2));

/** "0.66": an area under the curve or a correlation, two decimals. */
export const formatTwo = (v: number) => v.toFixed(2);

/** "2.7": an odds ratio to three significant figures. */
export const formatOdds = (v: number | null | undefined) => (v === null || v === undefined ? "—" : formatCompact(v));

/** "0.31 – 7.8" */
export const formatInterval = (ci: [number, number] | null | undefined, format: (v: number) => string = formatCompact) =>
  ci ? `${format(ci[0])} – ${format(ci[1])}` : "—";

/** "p = 0.012", "p < 1e-15": the same digits as every other p-value of the app. */
export const formatP = formatPStatement;

export const categoryTitle = (c: IucnCategory) => `${c} · ${IUCN_CATEGORY_NAMES[c]}`;

/** The category badge's look: threatened in clay, not threatened in stone, kept-out ones outlined. */
export function categoryTone(c: IucnCategory): string {
  const group = threatGroup(c);
  if (group === "threatened") return "bg-caution-50 text-caution-700 ring-caution-200";
  if (group === "notThreatened") return "bg-stone-100 text-stone-700 ring-stone-200";
  return "bg-white text-stone-500 ring-stone-300";
}

/** What an area under the curve means, in words, for the headline. */
export function aucReading(auc: number, ci: [number, number]): string {
  if (ci[0] > 0.5) return "Species listed as threatened today tend to score higher than those that are not: the past crisis's selectivity ranks them better than chance.";
  if (ci[1] < 0.5) return "Species listed as threatened today tend to score lower than those that are not: the past crisis's selectivity ranks them against today's listing.";
  return auc >= 0.5
    ? "The interval includes 0.5: the scores do not separate threatened from not-threatened species better than chance with any confidence."
    : "The interval includes 0.5: the scores do not separate threatened from not-threatened species with any confidence.";
}
