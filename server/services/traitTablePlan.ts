// What a trait-table file would change, shared by its preview and its commit: the rows read against
// the codebook (ranges against the stored taxa of the same names), and per valid row a new taxon or
// the fields that differ from the taxon of that name.
import { sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import type { IntervalLookup } from "../../shared/timebins/intervalLookup";
import type { ParsedCsv } from "../../shared/csv/parse";
import { mappingToRemember } from "../../shared/csv/mapping";
import { validateImportRows, type ImportRowChanges, type ImportValidation } from "../../shared/csv/validate";
import { sameValue } from "../../shared/csv/values";
import type { ImportMapping } from "../../shared/schemas/imports";
import type { AgeCell } from "../../shared/imports/agePlausibility";
import type { Trait } from "../../shared/schemas/traits";
import { TABLE_UPLOAD_REFUSALS, type UploadKind } from "./uploadLifecycle";
import { fieldValue, type TaxonState } from "./taxonModel";

export const TRAIT_TABLE_UPLOAD: UploadKind = {
  target: "taxa",
  ...TABLE_UPLOAD_REFUSALS,
  defaultFileName: "upload.csv",
  notFound: "Import not found in this study.",
  closedCode: "import_closed",
  committingNow: "This import is being committed right now.",
  alreadyDone: (status) => `This import was already ${status}; upload the file again to import it anew.`,
  commitFailed: "The commit failed; nothing was written.",
  noun: "import",
};

/** What committing one valid row changes: a new taxon, or the fields that differ from the taxon of that name. */
export interface PlannedRow {
  row: ImportRowChanges;
  existing: TaxonState | null;
  changes: Array<{ field: string; traitId: string | null; from: unknown; to: unknown }>;
}

export function planRow(row: ImportRowChanges, existing: TaxonState | null): PlannedRow {
  const changes: PlannedRow["changes"] = [];
  const consider = (field: string, traitId: string | null, to: unknown) => {
    const from = existing ? fieldValue(existing, field) : null;
    if (!existing || !sameValue(from, to)) changes.push({ field, traitId, from, to });
  };
  if (row.higherTaxon !== undefined) consider("higherTaxon", null, row.higherTaxon);
  if (row.notes !== undefined) consider("notes", null, row.notes);
  if (row.fad) consider("fad", null, row.fad);
  if (row.lad) consider("lad", null, row.lad);
  for (const [traitId, value] of Object.entries(row.values)) consider(traitId, traitId, value);
  return { row, existing, changes };
}

/** Validates against the codebook and, for ranges, the stored taxa of the same names; interval names resolve through `intervals` (the study's time bins first, then the ICS chart). */
export function validateTraitTable(parsed: ParsedCsv, mapping: ImportMapping, codebook: Trait[], existing: Map<string, TaxonState>, intervals: IntervalLookup): ImportValidation {
  return validateImportRows(parsed, mapping, codebook, {
    intervals,
    existing: (name) => {
      const s = existing.get(name);
      return s ? { fad: fieldValue(s, "fad") as never, lad: fieldValue(s, "lad") as never } : undefined;
    },
  });
}

/** The distinct taxon names of the file's name column. */
export function namesIn(parsed: ParsedCsv, mapping: ImportMapping): string[] {
  const index = parsed.header.indexOf(mapping.name);
  return [...new Set(parsed.rows.map((r) => r.cells[index]?.trim() ?? "").filter(Boolean))];
}

/** Remembers which column went where, merged into what the study remembered, so columns of other files keep their targets. */
export async function rememberMapping(db: DbOrTx, studyId: string, mapping: ImportMapping): Promise<void> {
  const remembered = mappingToRemember(mapping);
  await db.execute(sql`
    UPDATE studies SET settings = jsonb_set(settings, '{importMapping}', COALESCE(settings -> 'importMapping', '{}'::jsonb) || ${JSON.stringify(remembered)}::jsonb)
    WHERE id = ${studyId}`);
}

/** The name column and every mapped column of a trait-table mapping (missing-value tokens apply to these). */
export function traitTableColumns(mapping: ImportMapping): { name: string; higherTaxon: string | null; mapped: Array<string | null> } {
  return { name: mapping.name, higherTaxon: mapping.higherTaxon, mapped: [mapping.name, mapping.higherTaxon, mapping.firstAppearance, mapping.lastAppearance, mapping.notes, ...Object.values(mapping.traits)] };
}

/** Range ends the valid rows give in Ma (interval names resolve to the chart or the study's bins and are not checked), for the plausibility warnings. */
export function traitTableAges(rows: ImportRowChanges[], mapping: ImportMapping): AgeCell[] {
  const ages: AgeCell[] = [];
  for (const r of rows) {
    if (r.fad && r.fad.interval === null && mapping.firstAppearance) ages.push({ row: r.row, column: mapping.firstAppearance, taxon: r.name, ma: r.fad.ma });
    if (r.lad && r.lad.interval === null && mapping.lastAppearance) ages.push({ row: r.row, column: mapping.lastAppearance, taxon: r.name, ma: r.lad.ma });
  }
  return ages;
}
