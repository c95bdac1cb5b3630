import { describe, expect, it } from "vitest";
import { parseCsv } from "@shared/csv/parse";
import { readOccurrenceRows } from "@shared/occurrences/readOccurrenceRows";
import { closestIntervalNames } from "@shared/occurrences/closestIntervalNames";
import { occurrenceMappingSchema } from "@shared/schemas/occurrences";

// Invented finds. Interval ages: ICS chart v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes 48: 105-115):
// Changhsingian 254.14-251.902 Ma, Wuchiapingian base 259.51 Ma, Induan top 249.9 Ma.
const read = (text: string, mapping: Record<string, string>, dropDuplicates = false) =>
  readOccurrenceRows(parseCsv(new TextEncoder().encode(text)), occurrenceMappingSchema.parse(mapping), { dropDuplicates });

describe("readOccurrenceRows", () => {
  it("refuses a line break or other control character in a name, as the API's one-line fields do", () => {
    const result = read('taxon,higher,max,min,coll\n"Alba\nrosea",Albidae,255,253,C-1\nBeta,"Beti\u0007dae",255,253,C-2\n', { taxon: "taxon", higherTaxon: "higher", maxMa: "max", minMa: "min", collection: "coll" });
    expect(result.rows).toEqual([]);
    expect(result.problems.map((p) => [p.row, p.column, p.message])).toEqual([
      [2, "taxon", "Taxon name must be one line of text: it holds a line break"],
      [3, "higher", "Higher taxon must be one line of text: it holds a control character (U+0007)"],
    ]);
  });

  it("reads interval names at the early interval's base and the late interval's top; an empty late cell means the early interval", () => {
    const result = read("taxon,early,late\nA,Wuchiapingian,Changhsingian\nB,changhsingian,\nC,Lopingian,Induan\n", { taxon: "taxon", earlyInterval: "early", lateInterval: "late" });
    expect(result.problems).toEqual([]);
    expect(result.rows.map((r) => [r.taxon, r.maxMa, r.minMa])).toEqual([
      ["A", 259.51, 251.902],
      ["B", 254.14, 251.902], // case ignored
      ["C", 259.51, 249.9], // Lopingian base = Wuchiapingian base; Induan top = Olenekian base
    ]);
  });

  it("reads a single age column as a point age, and an interval name inside an age column at the right limit", () => {
    const point = read("taxon,age\nA,252.5\n", { taxon: "taxon", maxMa: "age" });
    expect(point.rows[0]).toMatchObject({ maxMa: 252.5, minMa: 252.5 });
    const named = read("taxon,max,min\nA,Changhsingian,Changhsingian\n", { taxon: "taxon", maxMa: "max", minMa: "min" });
    expect(named.rows[0]).toMatchObject({ maxMa: 254.14, minMa: 251.902 });
  });

  it("names the row (header = row 1) and the taxon of every problem, and rejects the limits of the scale", () => {
    const result = read(
      "taxon,max,min\nA,10,5\n,10,5\nB,4568,10\nC,-1,-2\nD,5,10\nE,ten,5\n",
      { taxon: "taxon", maxMa: "max", minMa: "min" },
    );
    expect(result.rows.map((r) => r.taxon)).toEqual(["A"]);
    expect(result.invalidRowCount).toBe(5);
    expect(result.problems.map((p) => [p.row, p.taxon, p.column])).toEqual([
      [3, "", "taxon"],
      [4, "B", "max"], // 4,568 Ma: older than the Earth (4,567 Ma, common practice)
      [5, "C", "max"],
      [5, "C", "min"],
      [6, "D", "min"],
      [7, "E", "max"],
    ]);
  });

  it("reports a duplicate row, keeps it by default and drops it on request", () => {
    const text = "taxon,max,min,site\nA,10,5,K1\nA,10,5,K1\nA,10,5,K2\n";
    const kept = read(text, { taxon: "taxon", maxMa: "max", minMa: "min", collection: "site" });
    expect(kept.duplicates).toEqual([{ row: 3, firstRow: 2, taxon: "A" }]);
    expect(kept.rows).toHaveLength(3);
    const dropped = read(text, { taxon: "taxon", maxMa: "max", minMa: "min", collection: "site" }, true);
    expect(dropped.rows.map((r) => r.row)).toEqual([2, 4]);
  });

  it("refuses a mapping without any age column in the shared schema (client and server)", () => {
    const parsed = occurrenceMappingSchema.safeParse({ taxon: "taxon" });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0]?.message).toMatch(/No age columns/);
  });
});

describe("closestIntervalNames", () => {
  it("offers the chart's names nearest a misspelt or outdated one", () => {
    expect(closestIntervalNames("Maastrichtain")[0]).toBe("Maastrichtian");
    expect(closestIntervalNames("Changsingian")[0]).toBe("Changhsingian");
    expect(closestIntervalNames("")).toEqual([]);
  });
});
