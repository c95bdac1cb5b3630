// Reading an uploaded CSV file into a header and numbered rows. Pure: runs in the browser (for a
// first look before upload) and on the server (for preview and commit), with the same results.
import Papa from "papaparse";

export type CsvDelimiter = "," | ";" | "\t";
export type CsvEncoding = "utf-8" | "utf-16le" | "utf-16be" | "windows-1252";

export const CSV_DELIMITERS: readonly CsvDelimiter[] = [",", ";", "\t"];

export interface CsvRow {
  /** The row as a spreadsheet numbers it: the header is row 1, blank lines count. */
  row: number;
  /** One cell per header column (short rows are padded with ""). */
  cells: string[];
}

export interface CsvProblem {
  row: number;
  column: string | null;
  message: string;
}

export interface ParsedCsv {
  header: string[];
  rows: CsvRow[];
  delimiter: CsvDelimiter;
  encoding: CsvEncoding;
  hadBom: boolean;
  /** Rows whose structure is broken (unclosed quote, more cells than the header); they are invalid. */
  problems: CsvProblem[];
}

export interface DecodedText {
  text: string;
  encoding: CsvEncoding;
  hadBom: boolean;
}

/**
 * Bytes to text. A byte-order mark decides the encoding (and is dropped); otherwise UTF-8 when
 * the bytes are valid UTF-8, else windows-1252, which spreadsheet programs on Windows write by
 * default (common practice, no source).
 */
export function decodeCsvBytes(bytes: Uint8Array): DecodedText {
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
    return { text: new TextDecoder("utf-8").decode(bytes.subarray(3)), encoding: "utf-8", hadBom: true };
  }
  if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    return { text: decodeUtf16(bytes.subarray(2), true), encoding: "utf-16le", hadBom: true };
  }
  if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    return { text: decodeUtf16(bytes.subarray(2), false), encoding: "utf-16be", hadBom: true };
  }
  try {
    return { text: new TextDecoder("utf-8", { fatal: true }).decode(bytes), encoding: "utf-8", hadBom: false };
  } catch {
    const withSurrogates = decodeUtf8KeepingSurrogates(bytes);
    if (withSurrogates !== null) return { text: withSurrogates, encoding: "utf-8", hadBom: false };
    return { text: new TextDecoder("windows-1252").decode(bytes), encoding: "windows-1252", hadBom: false };
  }
}

/**
 * UTF-16 code units as they are, lone surrogates included: TextDecoder would silently turn those
 * into U+FFFD, and the row checks refuse them by row and column instead. A last odd byte is U+FFFD.
 */
function decodeUtf16(bytes: Uint8Array, littleEndian: boolean): string {
  const units = new Uint16Array(bytes.length >> 1);
  for (let i = 0; i < units.length; i++) units[i] = littleEndian ? bytes[2 * i] | (bytes[2 * i + 1] << 8) : (bytes[2 * i] << 8) | bytes[2 * i + 1];
  const parts: string[] = [];
  for (let i = 0; i < units.length; i += 8192) parts.push(String.fromCharCode(...units.subarray(i, i + 8192)));
  return parts.join("") + (bytes.length % 2 ? "\uFFFD" : "");
}

/**
 * UTF-8 that is invalid only because it encodes surrogates one by one (ED A0..BF 80..BF, as some
 * programs write UTF-16 text byte for byte): decoded with those surrogates kept, so a lone one is
 * refused by row and column rather than read as windows-1252. Null when anything else is invalid.
 */
function decodeUtf8KeepingSurrogates(bytes: Uint8Array): string | null {
  const strict = new TextDecoder("utf-8", { fatal: true });
  const parts: string[] = [];
  let start = 0;
  let found = false;
  try {
    for (let i = 0; i + 2 < bytes.length; i++) {
      if (bytes[i] !== 0xed || bytes[i + 1] < 0xa0 || bytes[i + 1] > 0xbf || (bytes[i + 2] & 0xc0) !== 0x80) continue;
      parts.push(strict.decode(bytes.subarray(start, i)), String.fromCharCode(0xd000 | ((bytes[i + 1] & 0x3f) << 6) | (bytes[i + 2] & 0x3f)));
      start = i + 3;
      i += 2;
      found = true;
    }
    if (!found) return null;
    parts.push(strict.decode(bytes.subarray(start)));
  } catch {
    return null;
  }
  return parts.join("");
}

/** Drops a leading byte-order mark (U+FEFF) from text that was decoded without removing it. */
export function stripBom(text: string): { text: string; hadBom: boolean } {
  return text.charCodeAt(0) === 0xfeff ? { text: text.slice(1), hadBom: true } : { text, hadBom: false };
}

const isBlank = (cells: string[]) => cells.every((c) => c.trim() === "");

/**
 * The separator that splits the first records (read quote-aware) into the most rows with as
 * many cells as the header; ties go to the separator giving more columns. A file with a single
 * column reads as comma separated.
 */
export function detectDelimiter(text: string): CsvDelimiter {
  let best: { delimiter: CsvDelimiter; consistent: number; columns: number } = { delimiter: ",", consistent: -1, columns: 1 };
  for (const delimiter of CSV_DELIMITERS) {
    const records = (Papa.parse<string[]>(text, { delimiter, preview: 30, skipEmptyLines: "greedy" }).data ?? []).filter((r) => !isBlank(r));
    if (records.length === 0) continue;
    const columns = records[0].length;
    if (columns < 2) continue;
    const consistent = records.slice(1).filter((r) => r.length === columns).length;
    if (consistent > best.consistent || (consistent === best.consistent && columns > best.columns)) best = { delimiter, consistent, columns };
  }
  return best.delimiter;
}

/** Header names made usable as keys: trimmed; a blank one becomes "column N"; a repeat gets " (2)". */
function cleanHeader(raw: string[]): string[] {
  const seen = new Map<string, number>();
  return raw.map((h, i) => {
    const base = h.trim() || `column ${i + 1}`;
    const n = (seen.get(base) ?? 0) + 1;
    seen.set(base, n);
    return n === 1 ? base : `${base} (${n})`;
  });
}

/**
 * Parses a CSV file (bytes or text): with or without a BOM, comma, semicolon or tab separated
 * (detected unless given), quoted fields may hold separators, quotes ("" inside quotes) and line
 * breaks (RFC 4180). Blank lines are skipped but keep their row numbers.
 */
export function parseCsv(input: Uint8Array | string, opts: { delimiter?: CsvDelimiter } = {}): ParsedCsv {
  const decoded: DecodedText = typeof input === "string" ? { ...stripBom(input), encoding: "utf-8" } : decodeCsvBytes(input);
  const text = decoded.text;
  const delimiter = opts.delimiter ?? detectDelimiter(text);
  const result = Papa.parse<string[]>(text, { delimiter, skipEmptyLines: false });
  const records = result.data;
  const problems: CsvProblem[] = [];
  const brokenRecords = new Map<number, string>();
  for (const e of result.errors) {
    if (typeof e.row !== "number") continue;
    const message =
      e.code === "MissingQuotes"
        ? "A quoted cell is never closed: a quote mark is missing, so the rest of the file ran into this cell"
        : e.code === "InvalidQuotes"
          ? "A quote mark inside an unquoted cell or after a closing quote; enclose the cell in quotes and double inner quotes"
          : e.message;
    if (!brokenRecords.has(e.row)) brokenRecords.set(e.row, message);
  }

  const headerIndex = records.findIndex((r) => !isBlank(r));
  if (headerIndex < 0) return { header: [], rows: [], delimiter, encoding: decoded.encoding, hadBom: decoded.hadBom, problems };
  const header = cleanHeader(records[headerIndex]);
  const rows: CsvRow[] = [];
  for (let i = headerIndex + 1; i < records.length; i++) {
    const cells = records[i];
    const row = i + 1;
    if (isBlank(cells)) continue;
    const broken = brokenRecords.get(i);
    if (broken) problems.push({ row, column: null, message: broken });
    else if (cells.length > header.length) {
      const extra = cells.slice(header.length);
      if (!isBlank(extra)) {
        problems.push({
          row,
          column: null,
          message: `The row has ${cells.length} cells but the header has ${header.length}: a separator inside a cell needs quotes around the cell`,
        });
      }
    }
    const padded = cells.length >= header.length ? cells.slice(0, header.length) : [...cells, ...Array(header.length - cells.length).fill("")];
    rows.push({ row, cells: padded });
  }
  return { header, rows, delimiter, encoding: decoded.encoding, hadBom: decoded.hadBom, problems };
}
