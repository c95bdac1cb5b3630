// How dates, counts, numbers, p-values, ages and units read everywhere in the app: one module, so
// one number reads the same on every screen, in reports and in chart labels.
import { formatCompact, formatMeasurement, formatNumber } from "@shared/selectivity/formatNumber";

// Three significant figures ("2.80", "0.0123"), and the same without trailing zeros for short
// labels ("2", "0.453"); and a recorded measurement with its unit ("12.5 mm"). Shared with the
// server, which writes them into sentences and thread summaries.
export { formatCompact, formatMeasurement, formatNumber };

// A number with its unit as a scientist writes it ("1 region", "3–4 regions", "per 1 region"); shared
// with the statistics, which name their steps and ranges the same way.
export { formatQuantity, formatQuantityRange, perStep, unitAfter, unitSingular } from "@shared/format/units";

const dateFormat = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric" });
const dateTimeFormat = new Intl.DateTimeFormat("en-GB", {
  day: "numeric",
  month: "short",
  year: "numeric",
  hour: "2-digit",
  minute: "2-digit",
});
const numberFormat = new Intl.NumberFormat("en-GB");

function toDate(value: string | Date): Date | null {
  const date = value instanceof Date ? value : new Date(value);
  return Number.isNaN(date.getTime()) ? null : date;
}

/** "3 Mar 2026" */
export function formatDate(value: string | Date): string {
  const date = toDate(value);
  return date ? dateFormat.format(date) : "—";
}

/** "3 Mar 2026, 14:05" in the viewer's time zone. */
export function formatDateTime(value: string | Date): string {
  const date = toDate(value);
  return date ? dateTimeFormat.format(date) : "—";
}

/** "1,204" */
export function formatCount(value: number): string {
  return numberFormat.format(value);
}

/** "1 member", "3 members"; pass the plural when it is not the singular plus "s". */
export function pluralize(count: number, singular: string, plural = `${singular}s`): string {
  return `${formatCount(count)} ${count === 1 ? singular : plural}`;
}

/**
 * A clause that ends a sentence, ready to be followed by more words: "matches no state of the traits."
 * -> "matches no state of the traits", so "…traits: 1 species" never reads "traits.: 1 species".
 */
export function clause(text: string): string {
  return text.trim().replace(/[.;:,]+$/, "");
}

/** A message as a sentence: first letter capitalised ("window must be…" -> "Window must be…"). */
export function sentence(text: string): string {
  const trimmed = text.trim();
  return trimmed.charAt(0).toUpperCase() + trimmed.slice(1);
}

/** Initials for an avatar: "Ada Stone" -> "AS". */
export function initials(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean);
  if (parts.length === 0) return "?";
  const first = parts[0][0] ?? "";
  const last = parts.length > 1 ? (parts[parts.length - 1][0] ?? "") : "";
  return (first + last).toUpperCase();
}

/** Below this a p-value is shown as a bound: the tail computations are not exact further out. */
const SMALLEST_P = 1e-15;

/** A p-value: "0.0213", "0.43", "3.2e-7", "< 1e-15", "1.00"; "—" when no test was possible. */
export function formatP(p: number | null | undefined): string {
  if (p === null || p === undefined || !Number.isFinite(p)) return "—";
  if (p < SMALLEST_P) return "< 1e-15";
  if (p >= 0.9995) return "1.00";
  if (p >= 0.001) return p.toFixed(p >= 0.1 ? 2 : 3);
  return p.toPrecision(2);
}

/** A p-value in a sentence: "p = 0.0213", "p < 1e-15". */
export function formatPStatement(p: number | null | undefined): string {
  const text = formatP(p);
  return text.startsWith("<") ? `p ${text}` : `p = ${text}`;
}

const percentFormat = new Intl.NumberFormat("en-GB", { style: "percent", minimumFractionDigits: 1, maximumFractionDigits: 1 });

/** A proportion as a percentage with one decimal: 0.4286 -> "42.9%"; "—" when there is none. */
export function formatPercent(value: number | null | undefined): string {
  return value === null || value === undefined || !Number.isFinite(value) ? "—" : percentFormat.format(value);
}

// Ages in Ma and durations in Myr: every decimal an age has, at least one ("66.0 Ma"), and ages
// shown together written alike ("94.00 Ma" beside "94.41 Ma"; agesWriter). Shared with the text the
// statistics write.
export { ageDecimals, agesWriter, formatAgeNumber, formatMa, formatMyr, sharedAgeDecimals, type AgeWriter } from "@shared/format/ages";
