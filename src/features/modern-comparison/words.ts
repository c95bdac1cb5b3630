// How the modern comparison screens write numbers and categories.
import { IUCN_CATEGORY_NAMES, threatGroup, type IucnCategory } from "@shared/iucn";
import { ROC_MIN_PER_CLASS } from "@shared/comparison/compareWithThreatList";
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

/** What an area under the curve means, in words, for the headline: a verdict only when the interval excludes 0.5 and each group is large enough. */
export function aucReading(roc: { auc: number; ci: [number, number]; cases: number; controls: number; verdict?: string; smallSample?: boolean }): string {
  // Results stored before the verdict was gated carry no verdict: gate them here the same way.
  const small = roc.smallSample ?? (roc.cases < ROC_MIN_PER_CLASS || roc.controls < ROC_MIN_PER_CLASS);
  const verdict = roc.verdict ?? (small ? "no-verdict" : roc.ci[0] > 0.5 ? "better-than-chance" : roc.ci[1] < 0.5 ? "worse-than-chance" : "no-verdict");
  if (small) {
    return `Too few species for a verdict: ${roc.cases} threatened and ${roc.controls} not threatened are scored, and a verdict needs at least ${ROC_MIN_PER_CLASS} of each. With so few, even a perfect ranking can arise by chance; read the area and its interval as a rough guide only.`;
  }
  if (verdict === "better-than-chance") return "Species listed as threatened today tend to score higher than those that are not: the past crisis's selectivity ranks them better than chance.";
  if (verdict === "worse-than-chance") return "Species listed as threatened today tend to score lower than those that are not: the past crisis's selectivity ranks them against today's listing.";
  return roc.auc >= 0.5
    ? "The interval includes 0.5: the scores do not separate threatened from not-threatened species better than chance with any confidence."
    : "The interval includes 0.5: the scores do not separate threatened from not-threatened species with any confidence.";
}

/** How the Spearman p-value was obtained, in words. */
export function spearmanMethodWords(spearman: { method?: string; df: number }): string {
  return spearman.method === "exact-permutation" ? "exact, over every permutation" : `by the t approximation on ${spearman.df} df`;
}
