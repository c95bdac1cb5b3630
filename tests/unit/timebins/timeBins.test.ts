// A study's own time bins: how interval names resolve (study bins first, then the ICS chart), the one
// schema that checks a set of bins, and reading a CSV file of bins by row and column. Chart ages are
// ICS International Chronostratigraphic Chart v2024/12 (docs/sources.md section 8): Sandbian base
// 458.2 Ma, Katian base 452.8 Ma, Hirnantian base 445.2 Ma, Silurian base 443.1 Ma. The checks on a
// set (names unique, base older than top, oldest first, no overlap) are common practice, no source.
import { describe, expect, it } from "vitest";
import { parseCsv } from "@shared/csv/parse";
import { readRangeCell, resolveRangeEnd } from "@shared/csv/values";
import { readOccurrenceRows } from "@shared/occurrences/readOccurrenceRows";
import { occurrenceMappingSchema } from "@shared/schemas/occurrences";
import { timeBinSetSchema } from "@shared/schemas/timeBins";
import { binsShadowingChart, chartInterval, intervalLookup, readTimeBinCsv, timeBinKey } from "@shared/timebins";

// Invented numbered slices of an invented Late Ordovician basin, oldest first (ages within the chart's Upper Ordovician).
const SLICES = [
  { name: "1", baseMa: 458.2, topMa: 455.0 },
  { name: "2", baseMa: 455.0, topMa: 452.8 },
  { name: "3", baseMa: 452.8, topMa: 449.0 },
  { name: "4", baseMa: 449.0, topMa: 445.2 },
  { name: "Hirnantian", baseMa: 445.2, topMa: 443.6 }, // a regional use of a chart name, ending before the chart's Hirnantian does
];
const csv = (text: string) => parseCsv(new TextEncoder().encode(text));

describe("intervalLookup: study bins first, then the ICS chart", () => {
  const lookup = intervalLookup(SLICES);

  it("reads a number in an interval column as the bin of that number, however it is written", () => {
    expect(lookup("3")).toEqual({ source: "bin", name: "3", baseMa: 452.8, topMa: 449.0 });
    expect(lookup("03")).toEqual(lookup("3"));
    expect(lookup(" 3.0 ")).toEqual(lookup("3"));
    expect(lookup("7")).toBeUndefined(); // no slice 7, and no chart unit is a number
  });

  it("prefers the study's bin when a name is also a chart unit, and says which names are shadowed", () => {
    expect(lookup("hirnantian")).toEqual({ source: "bin", name: "Hirnantian", baseMa: 445.2, topMa: 443.6 });
    expect(chartInterval("Hirnantian")).toEqual({ source: "chart", name: "Hirnantian", baseMa: 445.2, topMa: 443.1 }); // ICS v2024/12
    expect(binsShadowingChart(SLICES)).toEqual([{ bin: "Hirnantian", chartUnit: "Hirnantian" }]);
  });

  it("falls back to the chart for other names, and to the chart alone without bins", () => {
    expect(lookup("Katian")).toEqual({ source: "chart", name: "Katian", baseMa: 452.8, topMa: 445.2 }); // ICS v2024/12
    expect(intervalLookup([])("Late Ordovician")).toEqual({ source: "chart", name: "Upper Ordovician", baseMa: 458.2, topMa: 443.1 }); // ICS v2024/12
    expect(intervalLookup([])("3")).toBeUndefined();
  });

  it("matches names ignoring case and runs of spaces only", () => {
    expect(timeBinKey("  Slice   7 ")).toBe(timeBinKey("slice 7"));
    expect(timeBinKey("Slice-7")).not.toBe(timeBinKey("slice 7"));
  });
});

describe("the slice numbers of a dated file are no longer taken for ages", () => {
  it("trait table: a number naming a bin resolves to that bin; without bins it stays an age; '12 Ma' is always an age", () => {
    const lookup = intervalLookup(SLICES);
    expect(readRangeCell("4", "fad", { decimalComma: false, intervals: lookup })).toEqual({ ok: true, value: { ma: 449.0, interval: "4" } });
    expect(readRangeCell("4", "lad", { decimalComma: false, intervals: lookup })).toEqual({ ok: true, value: { ma: 445.2, interval: "4" } });
    // The failure this prevents: "4" read as 4 Ma in an Ordovician study.
    expect(readRangeCell("4", "fad", { decimalComma: false })).toEqual({ ok: true, value: { ma: 4, interval: null } });
    expect(readRangeCell("4 Ma", "fad", { decimalComma: false, intervals: lookup })).toEqual({ ok: true, value: { ma: 4, interval: null } });
    expect(readRangeCell("Katian", "fad", { decimalComma: false, intervals: lookup })).toEqual({ ok: true, value: { ma: 452.8, interval: "Katian" } });
    expect(readRangeCell("Slice nine", "fad", { decimalComma: false, intervals: lookup })).toMatchObject({ ok: false, message: expect.stringMatching(/not one of the study's time bins nor a unit/) });
  });

  it("grid and API edits: { interval } resolves through the study's bins", () => {
    const lookup = intervalLookup(SLICES);
    expect(resolveRangeEnd({ interval: "2" }, "fad", lookup)).toEqual({ ok: true, value: { ma: 455.0, interval: "2" } });
    expect(resolveRangeEnd({ interval: "9" }, "fad", lookup)).toMatchObject({ ok: false, message: expect.stringMatching(/no bin has this number/) });
    expect(resolveRangeEnd({ interval: "9" }, "fad")).toMatchObject({ ok: false, message: expect.stringMatching(/define the study's time bins/) });
  });

  it("occurrences: numbers in the early/late interval columns resolve to bins; an unknown one offers the closest bins", () => {
    const parsed = csv("taxon,early,late\nTethyspira ignota,1,2\nTethyspira ignota,3,\nUmbonella invented,Katian,4\nUmbonella invented,23,4\n");
    const mapping = occurrenceMappingSchema.parse({ taxon: "taxon", earlyInterval: "early", lateInterval: "late" });
    const read = readOccurrenceRows(parsed, mapping, { dropDuplicates: false, intervals: intervalLookup(SLICES) });
    expect(read.rows.map((r) => [r.row, r.maxMa, r.minMa])).toEqual([
      [2, 458.2, 452.8], // base of slice 1, top of slice 2
      [3, 452.8, 449.0], // slice 3 alone
      [4, 452.8, 445.2], // Katian base (ICS v2024/12), top of slice 4
    ]);
    expect(read.problems).toHaveLength(1);
    expect(read.problems[0]).toMatchObject({ row: 5, column: "early", message: expect.stringMatching(/Unknown interval name "23": not one of the study's time bins.*no bin has this number/) });
    expect(read.problems[0]!.suggestions).toContain("2");
    // Without bins the same numbers are unknown interval names, never ages.
    const chartOnly = readOccurrenceRows(parsed, mapping, { dropDuplicates: false });
    expect(chartOnly.rows).toHaveLength(0);
    expect(chartOnly.problems[0]!.message).toMatch(/define the study's time bins/);
  });
});

describe("timeBinSetSchema: one check of a set of bins", () => {
  const issues = (bins: unknown[]) => {
    const r = timeBinSetSchema.safeParse({ bins });
    return r.success ? [] : r.error.issues.map((i) => ({ path: i.path.join("."), message: i.message }));
  };

  it("accepts bins oldest first, touching or with gaps, and an empty set", () => {
    expect(issues(SLICES)).toEqual([]);
    expect(issues([{ name: "A", baseMa: 10, topMa: 8 }, { name: "B", baseMa: 7, topMa: 5 }])).toEqual([]);
    expect(issues([])).toEqual([]);
  });

  it("names the bin and the field at fault", () => {
    expect(issues([{ name: "A", baseMa: 8, topMa: 10 }])).toEqual([{ path: "bins.0.topMa", message: "Base (8 Ma) must be older than top (10 Ma): ages are in Ma, larger is older" }]);
    expect(issues([{ name: "A", baseMa: 4600, topMa: 10 }])[0]).toMatchObject({ path: "bins.0.baseMa", message: expect.stringMatching(/at most 4,567 Ma/) });
    expect(issues([{ name: "A", baseMa: 10, topMa: -1 }])[0]).toMatchObject({ path: "bins.0.topMa", message: expect.stringMatching(/must not be negative/) });
    expect(issues([{ name: " ", baseMa: 10, topMa: 8 }])[0]).toMatchObject({ path: "bins.0.name", message: "Name is required" });
  });

  it("refuses a name used twice (case, spacing and number spelling ignored)", () => {
    expect(issues([{ name: "7", baseMa: 10, topMa: 8 }, { name: "07", baseMa: 8, topMa: 6 }])).toEqual([
      { path: "bins.1.name", message: "The name “07” is already used by bin 1 (names are matched ignoring case, spaces and how a number is written)" },
    ]);
  });

  it("refuses bins out of order and bins that overlap, naming the earlier bin", () => {
    expect(issues([{ name: "A", baseMa: 8, topMa: 6 }, { name: "B", baseMa: 10, topMa: 8 }])).toEqual([
      { path: "bins.1.baseMa", message: "Bins go from oldest to youngest: this bin's base (10 Ma) is not younger than the base of bin 1 “A” (8 Ma)" },
    ]);
    expect(issues([{ name: "A", baseMa: 10, topMa: 8 }, { name: "B", baseMa: 9, topMa: 6 }])).toEqual([
      { path: "bins.1.baseMa", message: "Overlaps bin 1 “A”: this bin's base (9 Ma) is older than that bin's top (8 Ma)" },
    ]);
  });

  it("checks a tie to a chart unit: the unit must exist and share time with the bin", () => {
    expect(issues([{ name: "A", baseMa: 452, topMa: 450, chartUnit: "Katian" }])).toEqual([]);
    expect(issues([{ name: "A", baseMa: 452, topMa: 450, chartUnit: "Katyan" }])[0]).toMatchObject({ path: "bins.0.chartUnit" });
    expect(issues([{ name: "A", baseMa: 70, topMa: 66, chartUnit: "Katian" }])).toEqual([
      { path: "bins.0.chartUnit", message: "The bin (70 Ma to 66 Ma) does not overlap Katian (452.8 Ma to 445.2 Ma)" },
    ]);
  });
});

describe("readTimeBinCsv: a file of bins, problems by row (header = row 1) and column", () => {
  it("reads the columns by their usual names, decimal commas in semicolon files included", () => {
    const read = readTimeBinCsv(csv("Slice;Base (Ma);Top (Ma);ICS unit\n1;458,2;455\n2;455;452,8;Sandbian\n"), "slices.csv");
    expect(read.columns).toEqual({ name: "Slice", baseMa: "Base (Ma)", topMa: "Top (Ma)", chartUnit: "ICS unit" });
    expect(read.problems).toEqual([]);
    expect(read.bins).toEqual([
      { row: 2, name: "1", baseMa: 458.2, topMa: 455, chartUnit: null },
      { row: 3, name: "2", baseMa: 455, topMa: 452.8, chartUnit: "Sandbian" },
    ]);
  });

  it("names the row and the column of every problem, the earlier bin by its row", () => {
    const read = readTimeBinCsv(csv("name,base_ma,top_ma\nA,10,8\nB,9,6\nC,5,six\nA,4,5\n"), "bad.csv");
    expect(read.problems).toEqual([
      { row: 3, column: "base_ma", message: "Overlaps row 2 “A”: this bin's base (9 Ma) is older than that bin's top (8 Ma)" },
      { row: 4, column: "top_ma", message: 'The top (Ma): "six" is not a number' },
      { row: 5, column: "top_ma", message: "Base (4 Ma) must be older than top (5 Ma): ages are in Ma, larger is older" },
      { row: 5, column: "name", message: "The name “A” is already used by row 2 (names are matched ignoring case, spaces and how a number is written)" },
    ]);
  });

  it("refuses a file without the age columns at the header row", () => {
    const read = readTimeBinCsv(csv("name,age\nA,10\n"), "ages.csv");
    expect(read.bins).toEqual([]);
    expect(read.problems).toEqual([{ row: 1, column: null, message: "The header has no column for the base (Ma), top (Ma): name the columns name, base_ma, top_ma (and optionally chart_unit)" }]);
  });
});
