// A CSV file of time bins read into rows and checked with the same schema the editor and the API
// use, each problem placed at its file row (the header is row 1) and column.
import type { ParsedCsv } from "../csv/parse";
import { isMissingCell, parseNumberCell } from "../csv/values";
import { TIME_BINS_MAX, timeBinInputSchema, timeBinSetProblems, type TimeBinCsv, type TimeBinProblem } from "../schemas/timeBins";

type Part = "name" | "baseMa" | "topMa" | "chartUnit";

// Headers each part is recognised by, compared in lower case without spaces or punctuation (common practice, no source).
const HEADERS: Record<Part, string[]> = {
  name: ["name", "bin", "binname", "interval", "slice", "timeslice", "stage"],
  baseMa: ["basema", "base", "maxma", "older", "start", "startma", "bottom"],
  topMa: ["topma", "top", "minma", "younger", "end", "endma"],
  chartUnit: ["chartunit", "icsunit", "ics", "unit", "chart", "tiedto"],
};
const PART_LABELS: Record<Part, string> = { name: "name", baseMa: "base (Ma)", topMa: "top (Ma)", chartUnit: "chart unit" };
const normalizeHeader = (h: string) => h.toLowerCase().replace(/[^a-z0-9]/g, "");

/** Which header holds each part: the first header matching one of its names, in the order of those names. */
export function timeBinColumns(header: string[]): TimeBinCsv["columns"] {
  const normal = header.map(normalizeHeader);
  const taken = new Set<number>();
  const pick = (part: Part) => {
    for (const name of HEADERS[part]) {
      const i = normal.findIndex((h, j) => h === name && !taken.has(j));
      if (i >= 0) {
        taken.add(i);
        return header[i]!;
      }
    }
    return null;
  };
  const columns = { name: pick("name"), baseMa: pick("baseMa"), topMa: pick("topMa"), chartUnit: pick("chartUnit") };
  return columns;
}

/**
 * Rows of a time-bin file and every problem, by row (the header is row 1) and column: a missing
 * column, an empty name, an age that is not a number, and every check of timeBinSetSchema (base
 * older than top, 0 to 4,567 Ma, names unique, oldest first, no overlap, a known chart unit).
 */
export function readTimeBinCsv(parsed: ParsedCsv, fileName: string): TimeBinCsv {
  const columns = timeBinColumns(parsed.header);
  const problems: TimeBinProblem[] = [];
  const missing = (["name", "baseMa", "topMa"] as const).filter((part) => columns[part] === null);
  if (missing.length) {
    problems.push({
      row: 1,
      column: null,
      message: `The header has no column for the ${missing.map((p) => PART_LABELS[p]).join(", ")}: name the columns name, base_ma, top_ma (and optionally chart_unit)`,
    });
    return { fileName, columns, bins: [], problems };
  }
  const at = (header: string | null) => (header === null ? -1 : parsed.header.indexOf(header));
  const index = { name: at(columns.name), baseMa: at(columns.baseMa), topMa: at(columns.topMa), chartUnit: at(columns.chartUnit) };
  const decimalComma = parsed.delimiter !== ",";
  for (const p of parsed.problems) problems.push({ row: p.row, column: p.column, message: p.message });

  const bins: TimeBinCsv["bins"] = [];
  for (const { row, cells } of parsed.rows) {
    const cell = (i: number) => (i >= 0 ? (cells[i] ?? "").trim() : "");
    const age = (part: "baseMa" | "topMa") => {
      const text = cell(index[part]);
      if (isMissingCell(text)) {
        problems.push({ row, column: columns[part], message: `The ${PART_LABELS[part]} is empty` });
        return null;
      }
      const n = parseNumberCell(text, { decimalComma });
      if (!n.ok) problems.push({ row, column: columns[part], message: `The ${PART_LABELS[part]}: ${n.message}` });
      return n.ok ? n.value : null;
    };
    const chartUnit = cell(index.chartUnit);
    bins.push({ row, name: cell(index.name), baseMa: age("baseMa"), topMa: age("topMa"), chartUnit: chartUnit && !isMissingCell(chartUnit) ? chartUnit : null });
  }

  // Each row's own checks, then the checks of the set, with the same schema the editor and the API use.
  const columnOf = (field: PropertyKey | undefined) => (field === "name" || field === "baseMa" || field === "topMa" || field === "chartUnit" ? columns[field] : null);
  const readable: Array<{ row: number; name: string; baseMa: number; topMa: number }> = [];
  for (const bin of bins) {
    if (bin.baseMa === null || bin.topMa === null) continue;
    const checked = timeBinInputSchema.safeParse({ name: bin.name, baseMa: bin.baseMa, topMa: bin.topMa, chartUnit: bin.chartUnit });
    if (!checked.success) for (const issue of checked.error.issues) problems.push({ row: bin.row, column: columnOf(issue.path[0]), message: issue.message });
    readable.push({ row: bin.row, name: bin.name, baseMa: bin.baseMa, topMa: bin.topMa });
  }
  for (const p of timeBinSetProblems(readable)) {
    // The set's messages count bins from 1 in order; in a file, the row of the earlier bin is what a person looks for.
    problems.push({ row: readable[p.index]!.row, column: columns[p.field], message: p.message.replace(/\bbin (\d+)\b/g, (_, n: string) => `row ${readable[Number(n) - 1]!.row}`) });
  }
  if (bins.length > TIME_BINS_MAX) problems.push({ row: bins[TIME_BINS_MAX]!.row, column: null, message: `At most ${TIME_BINS_MAX} time bins per study; the file has ${bins.length}` });
  problems.sort((a, b) => a.row - b.row);
  return { fileName, columns, bins, problems };
}
