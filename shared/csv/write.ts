// Writing CSV for download: RFC 4180 quoting, and text cells neutralised against formula
// injection so a spreadsheet never runs a cell as a formula.

/**
 * First characters that make a spreadsheet read a cell as a formula or split it: = + - @ tab and
 * carriage return (OWASP, "CSV Injection"); ";" and "|", since where ";" is the list separator a
 * cell ";=1+1" becomes a formula cell, and "|" starts DDE payloads (common practice, no source);
 * and the full-width forms ＝ ＋ － ＠ ； ｜ (U+FF1D, U+FF0B, U+FF0D, U+FF20, U+FF1B, U+FF5C), which
 * spreadsheets in East Asian locales may fold to the ASCII ones (common practice, no source).
 */
const FORMULA_START = /^[=+\-@\t\r;|\uFF1D\uFF0B\uFF0D\uFF20\uFF1B\uFF5C]/;

/** Characters that make a cell quoted: RFC 4180's comma, quote and line breaks, and the other separators a spreadsheet may split on (";", tab), so a formula after one stays inside its cell. */
const NEEDS_QUOTES = /[",;\t\r\n]/;

/**
 * Prefixes a single quote to text that starts with one of the characters above, which a
 * spreadsheet would read as a formula. Numbers are written as numbers and are never prefixed, so
 * negative values stay numeric for statistics software.
 */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One cell: null and undefined are empty; text is neutralised, then quoted when it holds a separator, quote or line break. */
export function csvCell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return Number.isFinite(value) ? String(value) : "";
  if (typeof value === "boolean") return value ? "true" : "false";
  const text = neutraliseFormula(value);
  return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One record, ended by CRLF as RFC 4180 writes it. */
export function csvRow(cells: Array<string | number | boolean | null | undefined>): string {
  return cells.map(csvCell).join(",") + "\r\n";
}
