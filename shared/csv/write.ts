// Writing CSV for download: RFC 4180 quoting, and text cells neutralised against formula
// injection so a spreadsheet never runs a cell as a formula.

const FORMULA_START = /^[=+\-@\t\r]/;

/**
 * Prefixes a single quote to text that starts with = + - @ tab or carriage return, which a
 * spreadsheet would read as a formula (OWASP, "CSV Injection"). Numbers are written as numbers
 * and are never prefixed, so negative values stay numeric for statistics software.
 */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One cell: null and undefined are empty; text is neutralised, then quoted when it holds a comma, quote or line break. */
export function csvCell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "true" : "false";
  const text = neutraliseFormula(value);
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One record, ended by CRLF as RFC 4180 writes it. */
export function csvRow(cells: Array<string | number | boolean | null | undefined>): string {
  return cells.map(csvCell).join(",") + "\r\n";
}
