// Reading an uploaded modern species list: which column holds the species name, the higher taxon,
// the threat category and the trait columns; every row checked so the preview can list each problem
// by row and column before anything is written. The file itself is parsed by shared/csv.
import type { ParsedCsv } from "../csv/parse";
import { checkRows, type CheckedRows } from "../csv/rowChecks";
import { IUCN_CATEGORIES, IUCN_CATEGORY_NAMES, readIucnCategory, type IucnCategory } from "../iucn";
import type { ModernListMapping, ModernListMappingDraft } from "../schemas/modernLists";
import { oneLineProblem } from "../schemas/common";

export interface ModernListRow {
  /** The row as a spreadsheet numbers it (the header is row 1). */
  row: number;
  name: string;
  higherTaxon: string;
  category: IucnCategory;
  /** The trait columns' cells, trimmed, by column header ("" when empty). */
  traits: Record<string, string>;
}

export type ModernListValidation = CheckedRows<ModernListRow>;

const MAX_TEXT = { higherTaxon: 300, trait: 300 };
const normal = (s: string) => s.toLowerCase().replace(/[^a-z0-9]/g, "");

// Header words lists commonly use (common practice, no source).
const GUESSES: Array<["name" | "higherTaxon" | "category", string[]]> = [
  ["name", ["species", "name", "scientificname", "taxon", "binomial", "speciesname", "taxonname"]],
  ["higherTaxon", ["highertaxon", "family", "order", "class", "clade", "group", "genus"]],
  ["category", ["category", "status", "iucn", "iucncategory", "redlistcategory", "redliststatus", "threatcategory", "threatstatus", "rlcategory"]],
];

/** A first mapping from the header names; every other column is offered as a trait column. */
export function suggestModernListMapping(header: string[]): ModernListMappingDraft {
  const draft: ModernListMappingDraft = { name: null, higherTaxon: null, category: null, traitColumns: [] };
  const used = new Set<string>();
  for (const [target, words] of GUESSES) {
    const column = header.find((h) => !used.has(h) && words.includes(normal(h)));
    if (column) {
      draft[target] = column;
      used.add(column);
    }
  }
  draft.traitColumns = header.filter((h) => !used.has(h));
  return draft;
}

/** Columns a mapping names that the file lacks, by mapping field. */
export function modernMappingProblems(mapping: ModernListMapping, header: string[]): Record<string, string> {
  const has = new Set(header);
  const problems: Record<string, string> = {};
  const check = (path: string, column: string | null) => {
    if (column !== null && !has.has(column)) problems[path] = `The file has no column "${column}"`;
  };
  check("name", mapping.name);
  check("higherTaxon", mapping.higherTaxon);
  check("category", mapping.category);
  mapping.traitColumns.forEach((c, i) => check(`traitColumns.${i}`, c));
  return problems;
}

const allowedCategories = IUCN_CATEGORIES.map((c) => `${c} (${IUCN_CATEGORY_NAMES[c]})`).join(", ");

/**
 * Validates every row: a name is required and appears once in the file; the category is one of
 * the IUCN 3.1 codes or names; texts have at most 300 characters. Structural problems of the file
 * (an unclosed quote, too many cells) count too. Trait cells are kept as written (trimmed): the
 * crosswalk reads them later.
 */
export function validateModernListRows(parsed: ParsedCsv, mapping: ModernListMapping): ModernListValidation {
  const col = (header: string | null) => (header === null ? -1 : parsed.header.indexOf(header));
  const nameCol = col(mapping.name);
  const higherCol = col(mapping.higherTaxon);
  const categoryCol = col(mapping.category);
  const traitCols = mapping.traitColumns.map((header) => ({ header, index: col(header) })).filter((t) => t.index >= 0);

  return checkRows(parsed, nameCol, { label: "Species name", kind: "species" }, (row, cells, name, problem): ModernListRow | null => {
    const higherTaxon = higherCol >= 0 ? cells[higherCol].trim() : "";
    if (higherTaxon.length > MAX_TEXT.higherTaxon) problem(higherCol, `Higher taxon has ${higherTaxon.length} characters; at most ${MAX_TEXT.higherTaxon}`);
    const higherOneLine = higherTaxon ? oneLineProblem("Higher taxon", higherTaxon) : null;
    if (higherOneLine) problem(higherCol, higherOneLine);
    const categoryText = categoryCol >= 0 ? cells[categoryCol].trim() : "";
    const category = readIucnCategory(categoryText);
    if (!categoryText) problem(categoryCol, "Threat category is missing (use NE for a species not evaluated)");
    else if (!category) problem(categoryCol, `Unknown threat category "${categoryText}": use an IUCN 3.1 code or name: ${allowedCategories}`);
    const traits: Record<string, string> = {};
    for (const { header, index } of traitCols) {
      const text = cells[index].trim();
      if (text.length > MAX_TEXT.trait) problem(index, `The cell has ${text.length} characters; at most ${MAX_TEXT.trait}`);
      traits[header] = text;
    }
    return category ? { row, name, higherTaxon, category, traits } : null;
  });
}
