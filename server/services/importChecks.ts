// Reading an uploaded file as every import reads it (the study's declared missing-value tokens
// blanked, the spellings chosen in the preview merged) and the checks its preview shows beside the
// row errors (shared/imports): the same steps for the trait table and for occurrences, in preview
// and in commit, so what is committed is what was previewed.
import { sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import type { ParsedCsv } from "../../shared/csv/parse";
import { blankMissingTokens } from "../../shared/imports/missingTokens";
import { namesInColumn, renameInColumn } from "../../shared/imports/nameHygiene";
import { importChecks } from "../../shared/imports/importChecks";
import type { AgeCell } from "../../shared/imports/agePlausibility";
import type { ImportChecks, MissingRead, NameMerges } from "../../shared/schemas/importChecks";
import { loadImportSettings } from "./importSettings";

export interface PreparedImportFile {
  /** The file as the rows are read: tokens blanked, names merged. */
  parsed: ParsedCsv;
  /** The name column as written (tokens blanked, before merges), for the similar-name check. */
  fileNames: Array<{ row: number; name: string }>;
  missingTokens: string[];
  missingRead: MissingRead[];
  merges: NameMerges;
  /** The higher-taxon column as written (tokens blanked, before merges), and the chosen higher-taxon merges. */
  fileHigherTaxa: Array<{ row: number; name: string }>;
  higherTaxonMerges: NameMerges;
}

/** The mapped columns (tokens apply there only) and the name column of an upload. */
export interface ImportColumns {
  name: string | null;
  higherTaxon: string | null;
  mapped: Array<string | null>;
}

/** Spellings chosen in the preview: of taxon names and of higher taxa. */
export interface ImportMerges {
  names: NameMerges;
  higherTaxa: NameMerges;
}

export async function prepareImportFile(db: DbOrTx, studyId: string, raw: ParsedCsv, columns: ImportColumns, merges: ImportMerges): Promise<PreparedImportFile> {
  const { missingTokens } = await loadImportSettings(db, studyId);
  const mapped = columns.mapped.filter((c): c is string => c !== null);
  const { parsed: blanked, read } = blankMissingTokens(raw, missingTokens, mapped);
  return {
    parsed: renameInColumn(renameInColumn(blanked, columns.name, merges.names), columns.higherTaxon, merges.higherTaxa),
    fileNames: namesInColumn(blanked, columns.name),
    missingTokens,
    missingRead: read,
    merges: merges.names,
    fileHigherTaxa: namesInColumn(blanked, columns.higherTaxon),
    higherTaxonMerges: merges.higherTaxa,
  };
}

/** The study's span: oldest first appearance to youngest last appearance of its live taxa (either end standing in for a missing other); null without ages. */
export async function studyAgeSpan(db: DbOrTx, studyId: string): Promise<{ oldestMa: number; youngestMa: number } | null> {
  const result = await db.execute(sql`
    SELECT max(greatest(fad_ma, lad_ma)) AS oldest, min(least(fad_ma, lad_ma)) AS youngest
    FROM taxa WHERE study_id = ${studyId} AND deleted_at IS NULL AND (fad_ma IS NOT NULL OR lad_ma IS NOT NULL)`);
  const row = result.rows[0] as { oldest: number | string | null; youngest: number | string | null } | undefined;
  if (!row || row.oldest === null || row.youngest === null) return null;
  return { oldestMa: Number(row.oldest), youngestMa: Number(row.youngest) };
}

/** The names of the study's live taxa whose comparison key is one of the file's (found in SQL, so a large study is not read whole). */
async function studyNamesLike(db: DbOrTx, studyId: string, fileNames: Array<{ name: string }>): Promise<string[]> {
  const names = [...new Set(fileNames.map((n) => n.name))];
  if (names.length === 0) return [];
  // The same key as shared nameKey, in SQL: NFKC, lower case, no white space, punctuation or symbols.
  const key = (expr: ReturnType<typeof sql>) => sql`regexp_replace(lower(normalize(${expr}, NFKC)), '[[:space:][:punct:]]', '', 'g')`;
  const result = await db.execute(sql`
    SELECT t.name FROM taxa t
    WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL
      AND ${key(sql`t.name`)} IN (SELECT ${key(sql`n`)} FROM jsonb_array_elements_text(${JSON.stringify(names)}::jsonb) AS n)`);
  return (result.rows as Array<{ name: string }>).map((r) => r.name);
}

/** The study's distinct higher taxa whose comparison key is one of the file's. */
async function studyHigherTaxaLike(db: DbOrTx, studyId: string, fileHigherTaxa: Array<{ name: string }>): Promise<string[]> {
  const names = [...new Set(fileHigherTaxa.map((n) => n.name))];
  if (names.length === 0) return [];
  const key = (expr: ReturnType<typeof sql>) => sql`regexp_replace(lower(normalize(${expr}, NFKC)), '[[:space:][:punct:]]', '', 'g')`;
  const result = await db.execute(sql`
    SELECT DISTINCT t.higher_taxon AS name FROM taxa t
    WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL AND t.higher_taxon <> ''
      AND ${key(sql`t.higher_taxon`)} IN (SELECT ${key(sql`n`)} FROM jsonb_array_elements_text(${JSON.stringify(names)}::jsonb) AS n)`);
  return (result.rows as Array<{ name: string }>).map((r) => r.name);
}

/** The preview's checks of a prepared file, given the ages read from Ma cells and the higher taxa of its valid rows. */
export async function collectImportChecks(
  db: DbOrTx,
  studyId: string,
  prepared: PreparedImportFile,
  read: { ages: AgeCell[]; higherTaxa: Iterable<{ row: number; higherTaxon?: string | null }> },
): Promise<ImportChecks> {
  const [studySpan, studyNames, studyHigherTaxa] = await Promise.all([
    studyAgeSpan(db, studyId),
    studyNamesLike(db, studyId, prepared.fileNames),
    studyHigherTaxaLike(db, studyId, prepared.fileHigherTaxa),
  ]);
  return importChecks({
    missingTokens: prepared.missingTokens,
    missingRead: prepared.missingRead,
    fileNames: prepared.fileNames,
    studyNames,
    merges: prepared.merges,
    ages: read.ages,
    studySpan,
    higherTaxa: read.higherTaxa,
    fileHigherTaxa: prepared.fileHigherTaxa,
    studyHigherTaxa,
    higherTaxonMerges: prepared.higherTaxonMerges,
  });
}
