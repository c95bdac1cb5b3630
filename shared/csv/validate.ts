// Checking every row of a mapped CSV file against the codebook and the time scale, so the
// preview lists each problem by row and column before anything is written.
import { oneLineProblem } from "../schemas/common";
import type { ImportMapping } from "../schemas/imports";
import type { RangeEnd } from "../schemas/taxa";
import type { IntervalLookup } from "../timebins/intervalLookup";
import type { ParsedCsv } from "./parse";
import { checkRows, type CheckedRows } from "./rowChecks";
import { readRangeCell, readTraitCell, rangeProblem, type CodebookTrait } from "./values";

/** What an import row sets on a taxon; a part the row leaves empty is absent (kept as it is). */
export interface ImportRowChanges {
  row: number;
  name: string;
  higherTaxon?: string;
  notes?: string;
  fad?: NonNullable<RangeEnd>;
  lad?: NonNullable<RangeEnd>;
  values: Record<string, string | number>;
}

/** The stored range of a taxon with the same name, for ends a row leaves empty. */
export interface ExistingRange {
  fad: RangeEnd;
  lad: RangeEnd;
}

export type ImportValidation = CheckedRows<ImportRowChanges>;

const MAX_TEXT = { higherTaxon: 300, notes: 8000 };

/**
 * Validates the rows of `parsed` read through `mapping`. Problems: a missing name, a name given on
 * an earlier row too, an unknown state, a number that is not one or out of range, an unknown
 * interval name, and a first appearance younger than the last (taking the taxon's stored range
 * for an end the row leaves empty, through `existing`). Structural problems of the file count too.
 * Empty cells keep what a taxon of that name already holds.
 */
export function validateImportRows(
  parsed: ParsedCsv,
  mapping: ImportMapping,
  traits: CodebookTrait[],
  opts: { existing?: (name: string) => ExistingRange | undefined; /** The study's interval lookup (its time bins first, then the ICS chart); the chart alone unless given. */ intervals?: IntervalLookup } = {},
): ImportValidation {
  const decimalComma = parsed.delimiter !== ",";
  const col = (header: string | null) => (header === null ? -1 : parsed.header.indexOf(header));
  const nameCol = col(mapping.name);
  const higherCol = col(mapping.higherTaxon);
  const fadCol = col(mapping.firstAppearance);
  const ladCol = col(mapping.lastAppearance);
  const notesCol = col(mapping.notes);
  const byId = new Map(traits.map((t) => [t.id, t]));
  const traitCols = Object.entries(mapping.traits)
    .map(([id, header]) => ({ trait: byId.get(id), index: col(header) }))
    .filter((t): t is { trait: CodebookTrait; index: number } => t.trait !== undefined && t.index >= 0);

  return checkRows(parsed, nameCol, { label: "Name", kind: "taxon" }, (row, cells, name, problem) => {
    const changes: ImportRowChanges = { row, name, values: {} };
    const text = (index: number, key: "higherTaxon" | "notes") => {
      if (index < 0) return;
      const t = cells[index].trim();
      if (!t) return;
      const oneLine = key === "higherTaxon" ? oneLineProblem("Higher taxon", t) : null;
      if (t.length > MAX_TEXT[key]) problem(index, `${key === "notes" ? "Notes have" : "Higher taxon has"} ${t.length} characters; at most ${MAX_TEXT[key]}`);
      else if (oneLine) problem(index, oneLine);
      else changes[key] = t;
    };
    text(higherCol, "higherTaxon");
    text(notesCol, "notes");
    for (const [index, end] of [
      [fadCol, "fad"],
      [ladCol, "lad"],
    ] as const) {
      if (index < 0) continue;
      const r = readRangeCell(cells[index], end, { decimalComma, intervals: opts.intervals });
      if (!r.ok) problem(index, `${end === "fad" ? "First" : "Last"} appearance: ${r.message}`);
      else if (r.value) changes[end] = r.value;
    }
    if (changes.fad || changes.lad) {
      const stored = name ? opts.existing?.(name) : undefined;
      const message = rangeProblem(changes.fad ?? stored?.fad ?? null, changes.lad ?? stored?.lad ?? null);
      if (message) problem(changes.fad ? fadCol : ladCol, changes.fad && changes.lad ? message : `${message}, given the stored range`);
    }
    for (const { trait, index } of traitCols) {
      const r = readTraitCell(trait, cells[index], { decimalComma });
      if (!r.ok) problem(index, r.message);
      else if (r.value !== null) changes.values[trait.id] = r.value;
    }
    return changes;
  });
}
