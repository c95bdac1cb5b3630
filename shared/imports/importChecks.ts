// One import's checks beside its row errors, put together the same way for the trait table and
// for occurrences: the preview shows them, and none of them blocks a commit.
import { IMPORT_MAX_WARNINGS_LISTED, type ImportChecks, type MissingRead, type NameMerges } from "../schemas/importChecks";
import { agePlausibilityWarnings, referenceSpan, type AgeCell } from "./agePlausibility";
import { similarNames } from "./nameHygiene";
import { qualifiedHigherTaxaIn, qualifiedHigherTaxon } from "./qualifiedHigherTaxon";

export interface ImportCheckInput {
  /** The study's declared tokens, and what blankMissingTokens read as missing with them. */
  missingTokens: string[];
  missingRead: MissingRead[];
  /** The file's names as written (before merges), and the names of the study's taxa. */
  fileNames: Array<{ row: number; name: string }>;
  studyNames: Iterable<string>;
  merges: NameMerges;
  /** Ages read from cells given in Ma, and the study's own span (null: it has no ages yet). */
  ages: AgeCell[];
  studySpan: { oldestMa: number; youngestMa: number } | null;
  higherTaxa: Iterable<{ row: number; higherTaxon?: string | null }>;
  /** The file's higher taxa as written (before merges), the study's, and the chosen higher-taxon merges. */
  fileHigherTaxa: Array<{ row: number; name: string }>;
  studyHigherTaxa: Iterable<string>;
  higherTaxonMerges: NameMerges;
}

/**
 * The preview's checks: age warnings by row (at most IMPORT_MAX_WARNINGS_LISTED listed, all
 * counted) against the study's span or else the file's own, what was read as missing, names that
 * differ only by case, spacing or punctuation (taxa and, apart from qualified ones, higher taxa),
 * and qualified higher taxa.
 */
export function importChecks(input: ImportCheckInput): ImportChecks {
  const span = referenceSpan(input.studySpan, input.studySpan ? [] : input.ages.map((a) => a.ma));
  const warnings = agePlausibilityWarnings(input.ages, span);
  return {
    warnings: warnings.slice(0, IMPORT_MAX_WARNINGS_LISTED),
    warningCount: warnings.length,
    ageSpan: span,
    missingRead: input.missingRead,
    missingTokens: input.missingTokens,
    similarNames: similarNames(input.fileNames, input.studyNames, input.merges),
    // A qualified higher taxon ("Anavelidae?") differs from its base on purpose: not offered for merging.
    similarHigherTaxa: similarNames(
      input.fileHigherTaxa.filter((h) => qualifiedHigherTaxon(h.name) === null),
      [...input.studyHigherTaxa].filter((h) => qualifiedHigherTaxon(h) === null),
      input.higherTaxonMerges,
    ),
    qualifiedHigherTaxa: qualifiedHigherTaxaIn(input.higherTaxa),
  };
}
