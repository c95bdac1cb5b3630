// The grid's columns and how their values read, are typed and are checked. Values typed into a
// cell go through the same readers as a CSV import (shared/csv), so the grid and an import accept
// and refuse the same things with the same words.
import { checkTraitValue, rangeProblem, readRangeCell, readTraitCell, sameValue, type Checked } from "@shared/csv/values";
import type { IntervalLookup } from "@shared/timebins/intervalLookup";
import type { RangeEnd, RangeEndInput, TaxonChanges, TaxonRow } from "@shared/schemas/taxa";
import type { Trait } from "@shared/schemas/traits";
import { formatMa, formatMeasurement } from "../../lib/format";

export type TaxonField = "name" | "higherTaxon" | "fad" | "lad" | "notes";

export type GridColumn =
  | { id: "name" | "higherTaxon" | "notes"; kind: "text"; label: string; sortId: string; field: TaxonField }
  | { id: "fad" | "lad"; kind: "range"; label: string; sortId: string; field: "fad" | "lad" }
  | { id: string; kind: "trait"; label: string; sortId: string; trait: Trait }
  /** Read-only counts from the study's occurrences; Enter or a click opens the taxon's finds. */
  | { id: "occurrences" | "collections"; kind: "count"; label: string; sortId: string };

export const TAXON_COLUMNS: GridColumn[] = [
  { id: "name", kind: "text", label: "Name", sortId: "name", field: "name" },
  { id: "higherTaxon", kind: "text", label: "Higher taxon", sortId: "higherTaxon", field: "higherTaxon" },
  { id: "fad", kind: "range", label: "First appearance", sortId: "fadMa", field: "fad" },
  { id: "lad", kind: "range", label: "Last appearance", sortId: "ladMa", field: "lad" },
  { id: "occurrences", kind: "count", label: "Finds", sortId: "occurrences" },
  { id: "collections", kind: "count", label: "Collections", sortId: "collections" },
];
export const NOTES_COLUMN: GridColumn = { id: "notes", kind: "text", label: "Notes", sortId: "notes", field: "notes" };

export function gridColumns(traits: Trait[]): GridColumn[] {
  const traitColumns: GridColumn[] = traits
    .filter((t) => !t.retired)
    .map((trait) => ({ id: trait.id, kind: "trait", label: trait.label, sortId: trait.id, trait }));
  return [...TAXON_COLUMNS, ...traitColumns, NOTES_COLUMN];
}

/** Empty in the sense of "nothing recorded": no reason is needed to fill it. */
export function isEmptyValue(value: unknown): boolean {
  return value === null || value === undefined || value === "";
}

/** A trait value for people: a state's label, or a number with its unit. */
export function formatTraitValue(trait: Trait | undefined, value: unknown): string {
  if (isEmptyValue(value)) return "";
  if (!trait) return String(value);
  if (trait.kind === "numeric") return typeof value === "number" ? formatMeasurement(value, trait.unit) : String(value);
  const state = trait.states.find((s) => s.code === value);
  return state ? state.label : `${String(value)} (not in the codebook)`;
}

/**
 * A range end for people: "Maastrichtian · 66.0 Ma" or "72.1 Ma"; with decimals, written to match
 * the other ages of its column ("94.00 Ma" beside "94.41 Ma").
 */
export function formatRangeEnd(end: RangeEnd | { ma?: number; interval?: string | null } | null | undefined, decimals?: number): string {
  if (!end || typeof end !== "object") return "";
  const ma = typeof end.ma === "number" ? formatMa(end.ma, decimals) : "";
  if (end.interval) return ma ? `${end.interval} · ${ma}` : end.interval;
  return ma;
}

/** The age of a stored range end, or null: for writing the ages of one view alike (sharedAgeDecimals). */
export function storedAge(value: unknown): number | null {
  return value !== null && typeof value === "object" && typeof (value as { ma?: unknown }).ma === "number" ? (value as { ma: number }).ma : null;
}

/** Any stored value of a field, as the history and conflict views show it. */
export function formatStoredValue(field: string, value: unknown, traits: Map<string, Trait>, ageDecimals?: number): string {
  if (isEmptyValue(value)) return "";
  if (field === "fad" || field === "lad") return formatRangeEnd(value as RangeEnd, ageDecimals);
  const trait = traits.get(field);
  if (trait) return formatTraitValue(trait, value);
  if (typeof value === "object") return JSON.stringify(value);
  return String(value);
}

/** The value a cell holds, in the stored form the API compares. */
export function cellValue(column: GridColumn, row: TaxonRow): unknown {
  switch (column.kind) {
    case "trait":
      return row.values[column.id] ?? null;
    case "count":
      return row[column.id] ?? null;
    case "range": {
      const ma = column.field === "fad" ? row.fadMa : row.ladMa;
      const interval = column.field === "fad" ? row.fadInterval : row.ladInterval;
      return ma === null ? null : { ma, interval };
    }
    default:
      return row[column.field as "name" | "higherTaxon" | "notes"] ?? "";
  }
}

/** A cell as people read it; ageDecimals writes the range columns' ages alike (sharedAgeDecimals of the rows shown). */
export function displayText(column: GridColumn, row: TaxonRow, ageDecimals?: number): string {
  const value = cellValue(column, row);
  if (column.kind === "trait") return formatTraitValue(column.trait, value);
  if (column.kind === "range") return formatRangeEnd(value as RangeEnd, ageDecimals);
  if (column.kind === "count") return typeof value === "number" ? value.toLocaleString("en-US") : "";
  return String(value ?? "");
}

/** What the editor starts with: a state's code, a number, an interval's name or an age. */
export function editText(column: GridColumn, row: TaxonRow): string {
  const value = cellValue(column, row);
  if (isEmptyValue(value)) return "";
  if (column.kind === "range") {
    const end = value as RangeEnd;
    return end?.interval ?? (end ? String(end.ma) : "");
  }
  return String(value);
}

export interface CellChange {
  changes: TaxonChanges;
  oldValue: unknown;
  newValue: unknown;
  /** The new value as people read it (for the reason dialog). */
  newText: string;
}

/**
 * The grid is not a CSV file, but it reads numbers the same way: "12,5" could be 12.5 or a typo
 * of 125, so a comma is refused with a message that fits a typed cell.
 */
export function decimalCommaProblem(text: string): string | null {
  return /\d,\d/.test(text) ? `"${text.trim()}" is not a number: write it with a decimal point (e.g. 12.5)` : null;
}

function toRangeInput(end: RangeEnd): RangeEndInput {
  if (end === null) return null;
  return end.interval ? { interval: end.interval } : { ma: end.ma };
}

/**
 * Reads what was typed into a cell. An empty cell (or NA) clears a trait value or a range end;
 * a state trait takes a code or a label, case-blind. `null` means nothing changed.
 */
/** `intervals`: the study's interval lookup (its time bins, then the ICS chart), as the server reads the names. */
export function readCellEdit(column: GridColumn, row: TaxonRow, text: string, intervals?: IntervalLookup): Checked<CellChange | null> {
  const oldValue = cellValue(column, row);
  if (column.kind === "trait") {
    const comma = column.trait.kind === "numeric" ? decimalCommaProblem(text) : null;
    if (comma) return { ok: false, message: `${column.label}: ${comma}` };
    const read = readTraitCell(column.trait, text, { decimalComma: false });
    if (!read.ok) return read;
    if (read.value !== null) {
      const checked = checkTraitValue(column.trait, read.value);
      if (!checked.ok) return checked;
    }
    if (sameValue(read.value, oldValue)) return { ok: true, value: null };
    return {
      ok: true,
      value: { changes: { values: { [column.id]: read.value } }, oldValue, newValue: read.value, newText: formatTraitValue(column.trait, read.value) },
    };
  }
  if (column.kind === "range") {
    const comma = decimalCommaProblem(text);
    if (comma) return { ok: false, message: comma };
    const read = readRangeCell(text, column.field, { decimalComma: false, intervals });
    if (!read.ok) return read;
    const other = column.field === "fad" ? cellValue({ ...column, id: "lad", field: "lad" }, row) : cellValue({ ...column, id: "fad", field: "fad" }, row);
    const problem = column.field === "fad" ? rangeProblem(read.value, other as RangeEnd) : rangeProblem(other as RangeEnd, read.value);
    if (problem) return { ok: false, message: problem };
    if (sameValue(read.value?.ma ?? null, (oldValue as RangeEnd)?.ma ?? null) && sameValue(read.value?.interval ?? null, (oldValue as RangeEnd)?.interval ?? null)) {
      return { ok: true, value: null };
    }
    return {
      ok: true,
      value: { changes: { [column.field]: toRangeInput(read.value) }, oldValue, newValue: read.value, newText: formatRangeEnd(read.value) },
    };
  }
  if (column.kind === "count") return { ok: false, message: `${column.label} are counted from the study's occurrences and cannot be edited` };
  const next = text.trim();
  if (column.field === "name" && next === "") return { ok: false, message: "Name is required" };
  if (next === String(oldValue ?? "")) return { ok: true, value: null };
  return { ok: true, value: { changes: { [column.field]: next }, oldValue, newValue: next, newText: next } };
}
