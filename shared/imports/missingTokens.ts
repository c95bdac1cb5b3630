// A study's declared missing-value tokens ("Indet.", "?", "NA"): a cell holding one is read as
// missing, never as a value or a state (an "Indet." order read as a state once grouped six victims
// and no survivor, and the regression separated). The tokens are blanked before the rows are read,
// so every reader (trait values, higher taxa, ages) treats them as it treats an empty cell.
import type { ParsedCsv } from "../csv/parse";
import type { MissingRead } from "../schemas/importChecks";

const FIRST_ROWS = 5;

/**
 * Whether a cell holds one of the tokens: compared whole, trimmed, ignoring case.
 * @example isMissingToken(" indet. ", ["Indet."]) // true
 */
export function isMissingToken(text: string, tokens: readonly string[]): boolean {
  const t = text.trim().toLowerCase();
  return t !== "" && tokens.some((token) => token.trim().toLowerCase() === t);
}

/**
 * The file with every cell of the given columns (all columns when omitted) that holds a declared
 * token made empty, and what was read as missing, by column and token in file order. The input is
 * not changed; rows without a token are shared, not copied.
 * @example blankMissingTokens(parseCsv("name,order\nA,Indet.\n"), ["Indet."]).read
 *   // [{ column: "order", token: "Indet.", count: 1, firstRows: [2] }]
 */
export function blankMissingTokens(parsed: ParsedCsv, tokens: readonly string[], columns?: readonly string[]): { parsed: ParsedCsv; read: MissingRead[] } {
  if (tokens.length === 0) return { parsed, read: [] };
  const byLower = new Map(tokens.map((t) => [t.trim().toLowerCase(), t]));
  const longest = Math.max(...tokens.map((t) => t.length));
  // First characters a token can start with (either case): most cells are ruled out by their first character.
  const firsts = new Set(tokens.flatMap((t) => [t.trim()[0]!.toLowerCase(), t.trim()[0]!.toUpperCase()]));
  const isSpace = (c: string) => c === " " || c === "\t" || c === "\u00a0";
  const indices = columns ? columns.map((c) => parsed.header.indexOf(c)).filter((i) => i >= 0) : parsed.header.map((_, i) => i);
  const counts = new Map<string, MissingRead>();
  const rows = parsed.rows.map((r) => {
    let cells: string[] | null = null;
    for (const i of indices) {
      const cell = r.cells[i];
      // Most cells are longer than any token, or plainly a value: skip the lower-casing for them.
      if (!cell || cell.length > longest + 20 || (!firsts.has(cell[0]!) && !isSpace(cell[0]!))) continue;
      const token = byLower.get(cell.trim().toLowerCase());
      if (token === undefined) continue;
      if (!cells) cells = [...r.cells];
      cells[i] = "";
      const key = `${i}\u0000${token}`;
      let entry = counts.get(key);
      if (!entry) counts.set(key, (entry = { column: parsed.header[i]!, token, count: 0, firstRows: [] }));
      entry.count++;
      if (entry.firstRows.length < FIRST_ROWS) entry.firstRows.push(r.row);
    }
    return cells ? { row: r.row, cells } : r;
  });
  const order = new Map(parsed.header.map((h, i) => [h, i]));
  const read = [...counts.values()].sort((a, b) => order.get(a.column)! - order.get(b.column)! || a.firstRows[0]! - b.firstRows[0]!);
  return { parsed: { ...parsed, rows }, read };
}
