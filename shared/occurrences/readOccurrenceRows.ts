import type { ParsedCsv } from "../csv/parse";
import { isMissingCell, parseNumberCell } from "../csv/values";
import { oneLineProblem } from "../schemas/common";
import { TIMESCALE_VERSION } from "../timescale/index";
import { chartInterval, closestBinNames, hasBins, numberedIntervalHint, type IntervalLookup, type ResolvedInterval } from "../timebins/intervalLookup";
import { EARTH_AGE_MA, type OccurrenceMapping, type OccurrenceProblem, type OccurrenceRow } from "../schemas/occurrences";
import { closestIntervalNames } from "./closestIntervalNames";

/** Longest taxon name a row may give (as the trait-table import). */
const MAX_TAXON_LENGTH = 300;

export interface ReadOccurrences {
  /** Rows without a problem, in file order (duplicates included unless dropped). */
  rows: OccurrenceRow[];
  /** Every problem, by row. */
  problems: OccurrenceProblem[];
  /** Valid rows identical in every mapped column to an earlier valid row. */
  duplicates: Array<{ row: number; firstRow: number; taxon: string }>;
  rowCount: number;
  invalidRowCount: number;
}

/** A problem as one sentence, for messages that stand alone (a refused commit, a log). */
export function describeOccurrenceProblem(p: OccurrenceProblem): string {
  return `Row ${p.row} (the header is row 1), taxon "${p.taxon}"${p.column ? `, column "${p.column}"` : ""}: ${p.message}`;
}

/**
 * Reads an uploaded occurrence table through a column mapping. Ages come from the Ma columns where their cells
 * are filled (a cell may also hold an interval name: the maximum reads its base, the minimum its top), else
 * from the interval-name columns (early: base, late: top; an empty late cell means the early interval).
 * Interval names are the study's own time bins (`intervals`, a number in an interval column names a bin) and then
 * units of the ICS chart, matched ignoring case, spaces and punctuation; an unknown one is a problem that offers
 * the closest names. Problems: empty or too long taxon, missing or unreadable age,
 * negative age, age older than the Earth, maximum younger than minimum, count not a whole number >= 1.
 * Rows are numbered as a spreadsheet shows them (the header is row 1). With `dropDuplicates`, valid rows
 * identical to an earlier valid row in every mapped column are left out (they are listed either way).
 */
export function readOccurrenceRows(parsed: ParsedCsv, mapping: OccurrenceMapping, opts: { dropDuplicates: boolean; intervals?: IntervalLookup }): ReadOccurrences {
  const intervals = opts.intervals ?? chartInterval;
  const withBins = hasBins(intervals);
  const column = (header: string | null) => (header === null ? -1 : parsed.header.indexOf(header));
  const at = {
    taxon: column(mapping.taxon),
    higherTaxon: column(mapping.higherTaxon),
    maxMa: column(mapping.maxMa),
    minMa: column(mapping.minMa),
    earlyInterval: column(mapping.earlyInterval),
    lateInterval: column(mapping.lateInterval),
    collection: column(mapping.collection),
    count: column(mapping.count),
  };
  const decimalComma = parsed.delimiter !== ",";
  const broken = new Map<number, string>();
  for (const p of parsed.problems) if (!broken.has(p.row)) broken.set(p.row, p.message);
  // Ages and interval names repeat across many rows (a chart's limits, a few stages): each text is read once.
  const numbers = new Map<string, ReturnType<typeof parseNumberCell>>();
  const readNumber = (text: string) => {
    let n = numbers.get(text);
    if (!n) numbers.set(text, (n = parseNumberCell(text, { decimalComma })));
    return n;
  };
  const units = new Map<string, ResolvedInterval | null>();
  const unitNamed = (name: string) => {
    let unit = units.get(name);
    if (unit === undefined) units.set(name, (unit = intervals(name) ?? null));
    return unit;
  };
  const closest = new Map<string, string[]>();
  const closestTo = (name: string) => {
    let names = closest.get(name);
    if (!names) closest.set(name, (names = withBins ? [...new Set([...closestBinNames(name, intervals, 2), ...closestIntervalNames(name, 2)])] : closestIntervalNames(name)));
    return names;
  };

  const rows: OccurrenceRow[] = [];
  const problems: OccurrenceProblem[] = [];
  const duplicates: ReadOccurrences["duplicates"] = [];
  const firstRowOf = new Map<string, number>();
  let invalidRowCount = 0;

  // The current row, read by the helpers below. They are made once, not per row: half a million rows would
  // otherwise make millions of short-lived functions (and their names, under the runtime the server uses).
  let row = 0;
  let cells: string[] = [];
  let taxon = "";
  let valid: boolean;
  const cell = (index: number) => (index >= 0 ? (cells[index] ?? "").trim() : "");
  const problem = (index: number, message: string, suggestions?: string[]) => {
    problems.push({ row, taxon, column: index >= 0 ? parsed.header[index]! : null, message, ...(suggestions ? { suggestions } : {}) });
    valid = false;
  };
  // An interval name resolved to one of its limits, or null after reporting why not.
  const interval = (index: number, name: string, end: "base" | "top"): number | null => {
    const unit = unitNamed(name);
    if (unit) return end === "base" ? unit.baseMa : unit.topMa;
    const offer = closestTo(name);
    const where = withBins ? `not one of the study's time bins nor a unit of the ICS chart ${TIMESCALE_VERSION}` : `not a unit of the ICS chart ${TIMESCALE_VERSION}`;
    problem(index, `Unknown interval name "${name}": ${where}${numberedIntervalHint(name, withBins)}${offer.length ? `; closest: ${offer.join(", ")}` : ""}`, offer);
    return null;
  };
  // A Ma cell: a number, or an interval name read at the given limit.
  const age = (index: number, end: "base" | "top"): number | null => {
    const text = cell(index);
    const n = readNumber(text);
    if (n.ok) return n.value;
    if (/[a-z]/i.test(text) && !/^[+-]?[\d.,]+[eE]/.test(text)) return interval(index, text, end);
    problem(index, n.message);
    return null;
  };
  const checkAge = (value: number, index: number, what: string) => {
    if (value < 0) problem(index, `The ${what} ${value} Ma is negative; ages are in Ma before present`);
    else if (value > EARTH_AGE_MA) problem(index, `The ${what} ${value} Ma is older than the Earth (${EARTH_AGE_MA.toLocaleString("en")} Ma)`);
  };

  for (const parsedRow of parsed.rows) {
    row = parsedRow.row;
    cells = parsedRow.cells;
    taxon = cell(at.taxon);
    valid = true;
    const brokenMessage = broken.get(row);
    if (brokenMessage) problem(-1, brokenMessage);
    if (!taxon) problem(at.taxon, "The taxon name is empty");
    else if (taxon.length > MAX_TAXON_LENGTH) problem(at.taxon, `The taxon name has ${taxon.length} characters; at most ${MAX_TAXON_LENGTH}`);
    // Names are single lines wherever they are shown or mailed (one rule with the API's fields).
    for (const [index, label] of [[at.taxon, "Taxon name"], [at.higherTaxon, "Higher taxon"], [at.collection, "Collection"]] as const) {
      const text = index >= 0 ? cell(index) : "";
      const oneLine = text ? oneLineProblem(label, text) : null;
      if (oneLine) problem(index, oneLine);
    }

    let maxMa: number | null = null;
    let minMa: number | null = null;
    let earlyInterval: string | null = null;
    let lateInterval: string | null = null;
    const maxGiven = at.maxMa >= 0 && !isMissingCell(cell(at.maxMa));
    const earlyGiven = at.earlyInterval >= 0 && !isMissingCell(cell(at.earlyInterval));
    if (earlyGiven) {
      earlyInterval = cell(at.earlyInterval);
      lateInterval = at.lateInterval >= 0 && !isMissingCell(cell(at.lateInterval)) ? cell(at.lateInterval) : null;
    }
    if (maxGiven) {
      maxMa = age(at.maxMa, "base");
      if (at.minMa < 0) minMa = maxMa;
      else if (isMissingCell(cell(at.minMa))) problem(at.minMa, "The minimum age is empty (the maximum age is given)");
      else minMa = age(at.minMa, "top");
    } else if (earlyGiven) {
      maxMa = interval(at.earlyInterval, earlyInterval!, "base");
      minMa = lateInterval === null ? (maxMa === null ? null : unitNamed(earlyInterval!)!.topMa) : interval(at.lateInterval, lateInterval, "top");
      if (maxMa !== null && minMa !== null && minMa >= maxMa) {
        problem(at.lateInterval, `The late interval "${lateInterval}" ends (${minMa} Ma) before the early interval "${earlyInterval}" begins (${maxMa} Ma): are the two swapped?`);
      }
    } else {
      problem(at.maxMa >= 0 ? at.maxMa : at.earlyInterval, "No age: the age cells of this row are empty");
    }
    if (maxMa !== null && minMa !== null) {
      checkAge(maxMa, maxGiven ? at.maxMa : at.earlyInterval, "maximum age");
      if (minMa !== maxMa || at.minMa >= 0) checkAge(minMa, maxGiven ? at.minMa : at.lateInterval, "minimum age");
      if (maxMa < minMa && maxGiven) problem(at.minMa, `The maximum age ${maxMa} Ma is younger than the minimum age ${minMa} Ma: are the two columns swapped?`);
    }

    let count: number | null = null;
    if (at.count >= 0 && !isMissingCell(cell(at.count))) {
      const n = parseNumberCell(cell(at.count), { decimalComma });
      if (!n.ok || !Number.isInteger(n.value) || n.value < 1 || n.value > 2_147_483_647) problem(at.count, `The count "${cell(at.count)}" is not a whole number of at least 1`);
      else count = n.value;
    }

    if (!valid || maxMa === null || minMa === null) {
      invalidRowCount++;
      continue;
    }
    const higher = cell(at.higherTaxon);
    const collection = cell(at.collection);
    const read: OccurrenceRow = {
      row,
      taxon,
      higherTaxon: higher && !isMissingCell(higher) ? higher : null,
      maxMa,
      minMa,
      earlyInterval,
      lateInterval,
      collection: collection && !isMissingCell(collection) ? collection : null,
      count,
    };
    const key = `${taxon}\u0000${read.higherTaxon ?? ""}\u0000${maxMa}\u0000${minMa}\u0000${earlyInterval ?? ""}\u0000${lateInterval ?? ""}\u0000${read.collection ?? ""}\u0000${count ?? ""}`;
    const first = firstRowOf.get(key);
    if (first !== undefined) {
      duplicates.push({ row, firstRow: first, taxon });
      if (opts.dropDuplicates) continue;
    } else firstRowOf.set(key, row);
    rows.push(read);
  }
  return { rows, problems, duplicates, rowCount: parsed.rows.length, invalidRowCount };
}
