// Names that differ only by case, spacing or punctuation ("Idiocrista" and "idiocrista ") are almost
// always one taxon written two ways; imported as they are, they become two taxa (one may end up a
// survivor, the other a victim). These helpers find such spellings and read one as another.
import type { ParsedCsv } from "../csv/parse";
import type { NameMerges, SimilarNames } from "../schemas/importChecks";

/**
 * The comparison key of a name: Unicode NFKC form, lower case, with every white-space,
 * punctuation and symbol character removed. Two names with the same key differ only by case,
 * spacing or punctuation.
 * @example nameKey(" Idio-crista. ") // "idiocrista"
 */
export function nameKey(name: string): string {
  return name.normalize("NFKC").toLowerCase().replace(/[\s\p{P}\p{S}]/gu, "");
}

const FIRST_ROWS = 5;

/**
 * Groups of two or more distinct spellings with one key, among the file's names (with their rows)
 * and the names the study's taxa already have. A group is listed only when the file uses at least
 * one of its spellings. Spellings are listed study names first, then by file rows (most first).
 * `merges` (spelling -> chosen spelling) fills each group's `mergedInto` when every spelling of
 * the group is read as the same one.
 * @example similarNames([{ row: 2, name: "idiocrista" }], ["Idiocrista"])
 *   // [{ key: "idiocrista", spellings: [Idiocrista (in the study), idiocrista (row 2)], mergedInto: null }]
 */
export function similarNames(fileNames: Iterable<{ row: number; name: string }>, studyNames: Iterable<string>, merges: NameMerges = {}): SimilarNames[] {
  type Spelling = { name: string; fileRows: number; firstRows: number[]; inStudy: boolean };
  // One pass over the rows by exact spelling (half a million rows name a few thousand taxa), then keys per spelling.
  const spellings = new Map<string, Spelling>();
  for (const { row, name } of fileNames) {
    if (!name) continue;
    let s = spellings.get(name);
    if (!s) spellings.set(name, (s = { name, fileRows: 0, firstRows: [], inStudy: false }));
    s.fileRows++;
    if (s.firstRows.length < FIRST_ROWS) s.firstRows.push(row);
  }
  const byKey = new Map<string, Spelling[]>();
  for (const s of spellings.values()) {
    const key = nameKey(s.name);
    if (!key) continue;
    const group = byKey.get(key);
    if (group) group.push(s);
    else byKey.set(key, [s]);
  }
  for (const name of studyNames) {
    const group = byKey.get(nameKey(name));
    if (!group) continue;
    const known = group.find((s) => s.name === name);
    if (known) known.inStudy = true;
    else group.push({ name, fileRows: 0, firstRows: [], inStudy: true });
  }
  const groups: SimilarNames[] = [];
  for (const [key, group] of byKey) {
    if (group.length < 2) continue;
    const sorted = group.sort((a, b) => Number(b.inStudy) - Number(a.inStudy) || b.fileRows - a.fileRows || (a.name < b.name ? -1 : 1));
    const targets = new Set(sorted.map((s) => mergedName(s.name, merges)));
    const mergedInto = targets.size === 1 ? [...targets][0]! : null;
    groups.push({ key, spellings: sorted, mergedInto });
  }
  return groups.sort((a, b) => (a.key < b.key ? -1 : 1));
}

/** A name as the chosen merges read it: its chosen spelling, or itself. */
export function mergedName(name: string, merges: NameMerges): string {
  return Object.prototype.hasOwnProperty.call(merges, name) ? merges[name]! : name;
}

/** The names of one column (by header) with their rows, empty cells left out; none when the column is absent. */
export function namesInColumn(parsed: ParsedCsv, column: string | null): Array<{ row: number; name: string }> {
  const index = column === null ? -1 : parsed.header.indexOf(column);
  if (index < 0) return [];
  const out: Array<{ row: number; name: string }> = [];
  for (const r of parsed.rows) {
    const name = (r.cells[index] ?? "").trim();
    if (name) out.push({ row: r.row, name });
  }
  return out;
}

/**
 * The file with the names of one column read through the merges (a cell whose trimmed text is a
 * merged spelling becomes the chosen spelling). The input is not changed; untouched rows are shared.
 * @example renameInColumn(parseCsv("name\nidiocrista\n"), "name", { idiocrista: "Idiocrista" }).rows[0].cells // ["Idiocrista"]
 */
export function renameInColumn(parsed: ParsedCsv, column: string | null, merges: NameMerges): ParsedCsv {
  const index = column === null ? -1 : parsed.header.indexOf(column);
  if (index < 0 || Object.keys(merges).length === 0) return parsed;
  const rows = parsed.rows.map((r) => {
    const name = (r.cells[index] ?? "").trim();
    const to = name ? mergedName(name, merges) : name;
    if (to === name) return r;
    const cells = [...r.cells];
    cells[index] = to;
    return { row: r.row, cells };
  });
  return { ...parsed, rows };
}
