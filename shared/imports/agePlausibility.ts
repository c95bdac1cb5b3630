// Ages that are readable but implausible for the study: far outside its span, or small whole
// numbers among ages of hundreds of Ma, which is what numbered intervals ("slice 4") look like once
// read as ages (a taxon "at 4 Ma" in an Ordovician study). These are warnings, not row errors: the
// analyst reads them in the preview and may still commit.
import type { AgeSpan, ImportWarning } from "../schemas/importChecks";

/** One age read from a cell given in Ma (interval names resolve to the chart and are not checked). */
export interface AgeCell {
  row: number;
  column: string;
  taxon: string;
  ma: number;
}

/** Fewest ages a file needs before its own middle half serves as the span (common practice, no source). */
export const MIN_FILE_AGES_FOR_SPAN = 8;
/** Least tolerance beyond the span, in Myr, so a narrow study does not warn about its neighbours (common practice, no source). */
export const MIN_TOLERANCE_MYR = 10;
/** Largest whole number read as a possible interval number (numbered slices rarely pass 100; common practice, no source). */
export const MAX_INTERVAL_NUMBER = 99;

/**
 * The span ages are compared with: the study's own ranges when it has any (oldest first
 * appearance to youngest last appearance), else the middle half of the file's ages (first to third
 * quartile, nearest rank), so a minority of wrong ages cannot widen it. Null when neither exists
 * (a file with fewer than MIN_FILE_AGES_FOR_SPAN ages and a study without ages).
 * @example referenceSpan(null, [450, 452, 455, 460, 461, 463, 470, 4]) // { oldestMa: 461, youngestMa: 450, source: "file" }
 */
export function referenceSpan(study: { oldestMa: number; youngestMa: number } | null, fileAges: readonly number[]): AgeSpan | null {
  if (study) return { oldestMa: study.oldestMa, youngestMa: study.youngestMa, source: "study" };
  if (fileAges.length < MIN_FILE_AGES_FOR_SPAN) return null;
  // A typed array sorts numerically and fast (a million ages of a large occurrence file).
  const sorted = Float64Array.from(fileAges).sort();
  const rank = (p: number) => sorted[Math.max(0, Math.ceil(p * sorted.length) - 1)]!;
  return { oldestMa: rank(0.75), youngestMa: rank(0.25), source: "file" };
}

const fmt = (n: number) => String(Math.round(n * 1000) / 1000);

/**
 * Warnings for ages implausible against `span`, one per cell, in the cells' order. Two rules:
 * - interval number: a whole number from 1 to MAX_INTERVAL_NUMBER that is at most a tenth of the
 *   span's youngest age (4 among ages of 443 to 485 Ma);
 * - far outside: more than the span's width (at least MIN_TOLERANCE_MYR) younger than its
 *   youngest or older than its oldest age.
 * No span, no warnings.
 * @example agePlausibilityWarnings([{ row: 5, column: "FAD", taxon: "Rhynia", ma: 4 }], { oldestMa: 485, youngestMa: 443, source: "study" })
 *   // [{ row: 5, column: "FAD", taxon: "Rhynia", kind: "age_interval_number", message: "4 Ma looks like an interval number ..." }]
 */
export function agePlausibilityWarnings(cells: Iterable<AgeCell>, span: AgeSpan | null): ImportWarning[] {
  if (!span) return [];
  const width = span.oldestMa - span.youngestMa;
  const tolerance = Math.max(width, MIN_TOLERANCE_MYR);
  const spanText = `${fmt(span.oldestMa)} to ${fmt(span.youngestMa)} Ma (${span.source === "study" ? "the study's ranges" : "the middle half of this file's ages"})`;
  const warnings: ImportWarning[] = [];
  for (const { row, column, taxon, ma } of cells) {
    if (Number.isInteger(ma) && ma >= 1 && ma <= MAX_INTERVAL_NUMBER && ma * 10 <= span.youngestMa) {
      warnings.push({
        row,
        column,
        taxon,
        kind: "age_interval_number",
        message: `${fmt(ma)} Ma looks like an interval number, not an age: the other ages run from ${spanText}. If the file numbers its intervals, give ages in Ma or the intervals' names.`,
      });
    } else if (ma < span.youngestMa - tolerance || ma > span.oldestMa + tolerance) {
      const beyond = ma < span.youngestMa ? span.youngestMa - ma : ma - span.oldestMa;
      warnings.push({
        row,
        column,
        taxon,
        kind: "age_far_outside",
        message: `${fmt(ma)} Ma is far outside ${spanText}: ${fmt(beyond)} Myr beyond it (more than ${fmt(tolerance)} Myr). Check the value and its unit (Ma, not ka or years).`,
      });
    }
  }
  return warnings;
}
