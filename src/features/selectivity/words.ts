// How the numbers of a selectivity run read on screen, in the report and in chart labels.
import { formatNumber } from "../../lib/format";
import { CORRECTION_LABELS, type RunParams } from "@shared/schemas/runs";
import type { TraitKind } from "@shared/codebook";

export const KIND_LABEL: Record<TraitKind, string> = {
  binary: "Binary",
  categorical: "Categorical",
  ordinal: "Ordinal",
  numeric: "Numeric",
};

export const CORRECTION_SHORT: Record<RunParams["correction"], string> = {
  bh: "Benjamini-Hochberg",
  holm: "Holm",
  bonferroni: "Bonferroni",
};

export { CORRECTION_LABELS };
// p-values and percentages read as everywhere else in the app.
export { formatP, formatPercent } from "../../lib/format";

/** An odds ratio, an estimate or a statistic: three significant figures ("2.67", "0.412", "Infinity" as "∞"). */
export function formatEstimate(value: number | null | undefined): string {
  if (value === null || value === undefined || Number.isNaN(value)) return "—";
  if (value === Infinity) return "∞";
  if (value === -Infinity) return "−∞";
  return formatNumber(value).replace(/^-/, "−");
}

/** "1.85 to 3.90" */
export function formatInterval(ci: readonly [number, number] | null | undefined): string {
  if (!ci) return "—";
  return `${formatEstimate(ci[0])} to ${formatEstimate(ci[1])}`;
}

const wholePercentFormat = new Intl.NumberFormat("en-GB", { style: "percent", maximumFractionDigits: 0 });

/** "10%" */
export function formatWholePercent(value: number): string {
  return wholePercentFormat.format(value);
}

/** How far an odds ratio moves on adjustment, |adjusted / crude − 1| as a percentage: "61%". */
export function formatChange(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return `${Math.round(value * 100)}%`;
}

/** "95%" from 0.95 */
export function levelWords(level: number): string {
  return `${Math.round(level * 1000) / 10}%`;
}

/** A trait key or label as part of a file name: "feeding-mode". */
export function fileSlug(text: string): string {
  const slug = text
    .normalize("NFKD")
    .replace(/[^\w\s-]/g, "")
    .trim()
    .toLowerCase()
    .replace(/[\s_]+/g, "-")
    .replace(/-+/g, "-")
    .slice(0, 60);
  return slug || "chart";
}
