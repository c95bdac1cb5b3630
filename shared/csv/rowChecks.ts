// The part every mapped-CSV validator shares: rows with a structural problem count as invalid, each
// row needs a one-line name that is not too long and not given on an earlier row, no cell may hold
// a lone UTF-16 surrogate, problems are kept by row and then by column in file order, and only
// rows without a problem are kept.
import { loneSurrogateIn, loneSurrogateMessage, oneLineProblem } from "../schemas/common";
import type { CsvProblem, ParsedCsv } from "./parse";

/** Longest name a row may give. */
export const MAX_NAME_LENGTH = 300;

export interface CheckedRows<T> {
  /** The valid rows, in file order. */
  rows: T[];
  /** Every problem, by row and then by column in file order. */
  problems: CsvProblem[];
  rowCount: number;
  invalidRowCount: number;
}

/** Records a problem in the cell of column `index` (-1: the row as a whole); the row becomes invalid. */
export type ReportProblem = (index: number, message: string) => void;

/**
 * Checks each row's name in column `nameColumn` (-1 when unmapped) and reads the rest with
 * `readRow`, which reports its own problems and may return null for a row it cannot use. `what`
 * words the name's problems: `{ label: "Name", kind: "taxon" }` gives "Name is missing" and
 * 'Duplicate taxon "x": also on row 3'.
 */
export function checkRows<T>(
  parsed: ParsedCsv,
  nameColumn: number,
  what: { label: string; kind: string },
  readRow: (row: number, cells: string[], name: string, problem: ReportProblem) => T | null,
): CheckedRows<T> {
  const problems: Array<CsvProblem & { order: number }> = parsed.problems.map((p) => ({ ...p, order: -1 }));
  const broken = new Set(parsed.problems.map((p) => p.row));
  const firstRowOfName = new Map<string, number>();
  const rows: T[] = [];
  let invalidRowCount = 0;

  for (const { row, cells } of parsed.rows) {
    let valid = !broken.has(row);
    const problem: ReportProblem = (index, message) => {
      problems.push({ row, column: index >= 0 ? parsed.header[index] : null, message, order: index });
      valid = false;
    };
    const name = nameColumn >= 0 ? cells[nameColumn].trim() : "";
    const nameProblem = name ? oneLineProblem(what.label, name) : null;
    if (!name) problem(nameColumn, `${what.label} is missing`);
    else if (name.length > MAX_NAME_LENGTH) problem(nameColumn, `${what.label} has ${name.length} characters; at most ${MAX_NAME_LENGTH}`);
    else if (nameProblem) problem(nameColumn, nameProblem);
    else {
      const earlier = firstRowOfName.get(name);
      if (earlier !== undefined) problem(nameColumn, `Duplicate ${what.kind} "${name}": also on row ${earlier}`);
      else firstRowOfName.set(name, row);
    }
    // Text that is not valid Unicode (a lone surrogate, e.g. from a damaged UTF-16 file) is refused in any cell.
    cells.forEach((cell, index) => {
      const codePoint = index === nameColumn ? null : loneSurrogateIn(cell);
      if (codePoint) problem(index, loneSurrogateMessage("The cell", codePoint));
    });
    const read = readRow(row, cells, name, problem);
    if (valid && read !== null) rows.push(read);
    else invalidRowCount++;
  }
  problems.sort((a, b) => a.row - b.row || a.order - b.order);
  return { rows, problems: problems.map(({ row, column, message }) => ({ row, column, message })), rowCount: parsed.rows.length, invalidRowCount };
}
