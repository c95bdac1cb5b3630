// Higher taxa written with a qualifier of open nomenclature ("Anavelidae?", "?Anavelidae",
// "cf. Anavelidae", "aff. Anavelidae", "Anavelidae (?)"): the placement is uncertain. The name is
// kept as written; these helpers recognise the qualifier so screens can mark it and results can
// say how such taxa were counted.
import type { QualifiedHigherTaxonDto } from "../schemas/importChecks";

export interface QualifiedName {
  /** The name without its qualifier. */
  base: string;
  /** "?", "cf." or "aff.". */
  qualifier: "?" | "cf." | "aff.";
}

/**
 * How results count a taxon whose higher taxon is qualified: as its own group under the name as
 * written, never pooled into the clade it names, so an uncertain placement cannot move that
 * clade's estimate. Stated on screen beside clade-adjusted results.
 */
export const QUALIFIED_HIGHER_TAXON_RULE =
  "A taxon whose higher taxon carries a qualifier (?, cf., aff.) is not pooled into the clade it names: its higher taxon as written (e.g. \"Anavelidae?\") is a clade of its own in clade-adjusted estimates.";

const OPEN_NOMENCLATURE = /(^|\s)(cf|aff)\.?(?=\s|$)/i;

/**
 * The qualifier of a higher taxon, or null when it has none. Recognised: a question mark before or
 * after the name (also "(?)"), and the words cf. and aff. (with or without the full stop) before
 * or after it. Case and spacing are ignored; the base name keeps its own spelling.
 * @example qualifiedHigherTaxon("Anavelidae?") // { base: "Anavelidae", qualifier: "?" }
 * @example qualifiedHigherTaxon("cf. Anavelidae") // { base: "Anavelidae", qualifier: "cf." }
 * @example qualifiedHigherTaxon("Anavelidae") // null
 */
export function qualifiedHigherTaxon(text: string | null | undefined): QualifiedName | null {
  if (!text) return null;
  const t = text.trim();
  if (!t) return null;
  const word = OPEN_NOMENCLATURE.exec(t);
  if (word) {
    const qualifier = word[2]!.toLowerCase() === "cf" ? "cf." : "aff.";
    const base = (t.slice(0, word.index) + " " + t.slice(word.index + word[0].length)).replace(/\s+/g, " ").trim();
    return base ? { base, qualifier } : null;
  }
  const question = /^\?\s*(.+)$/.exec(t) ?? /^(.+?)\s*(\(\?\)|\?)$/.exec(t);
  if (question) {
    const base = question[1]!.trim();
    return base && !base.includes("?") ? { base, qualifier: "?" } : null;
  }
  return null;
}

/** The distinct qualified higher taxa of a file, with how many rows give each, in order of first row. */
export function qualifiedHigherTaxaIn(rows: Iterable<{ row: number; higherTaxon?: string | null }>): QualifiedHigherTaxonDto[] {
  const seen = new Map<string, QualifiedHigherTaxonDto | null>();
  for (const { row, higherTaxon } of rows) {
    if (!higherTaxon) continue;
    let entry = seen.get(higherTaxon);
    if (entry === undefined) {
      const q = qualifiedHigherTaxon(higherTaxon);
      seen.set(higherTaxon, (entry = q ? { name: higherTaxon, base: q.base, qualifier: q.qualifier, rows: 0, firstRow: row } : null));
    }
    if (entry) entry.rows++;
  }
  return [...seen.values()].filter((e): e is QualifiedHigherTaxonDto => e !== null).sort((a, b) => a.firstRow - b.firstRow);
}
