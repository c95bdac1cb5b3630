// Checking mapped rows against a codebook and the time scale. Interval ages are from the ICS
// International Chronostratigraphic Chart v2024/12 (Cohen, Harper, Gibbard & Car 2025, Episodes
// 48: 105-115): Maastrichtian base 72.2 Ma and top 66.0 Ma, Campanian base 83.6 Ma.
import { describe, expect, it } from "vitest";
import { parseCsv, parseNumberCell, readRangeCell, readTraitCell, suggestMapping, validateImportRows, type CodebookTrait } from "@shared/csv";
import type { ImportMapping } from "@shared/schemas/imports";

const HABIT: CodebookTrait = {
  id: "00000000-0000-4000-8000-000000000001",
  key: "life_habit",
  label: "Life habit",
  kind: "categorical",
  states: [
    { code: "epifaunal", label: "Epifaunal", order: 0 },
    { code: "infaunal", label: "Infaunal", order: 1 },
  ],
  unit: null,
  transform: "none",
  minValue: null,
  maxValue: null,
};
const SIZE: CodebookTrait = {
  id: "00000000-0000-4000-8000-000000000002",
  key: "body_size",
  label: "Body size",
  kind: "numeric",
  states: [],
  unit: "mm",
  transform: "log10",
  minValue: 0,
  maxValue: 2000,
};
const CODEBOOK = [HABIT, SIZE];

const mapping = (over: Partial<ImportMapping> = {}): ImportMapping => ({
  name: "name",
  higherTaxon: "clade",
  firstAppearance: "first",
  lastAppearance: "last",
  notes: null,
  traits: { [HABIT.id]: "habit", [SIZE.id]: "size" },
  ...over,
});

describe("numbers", () => {
  it("decimal commas are read when the separator is not a comma, points always", () => {
    expect(parseNumberCell("12,5", { decimalComma: true })).toEqual({ ok: true, value: 12.5 });
    expect(parseNumberCell(" 12.5 ", { decimalComma: true })).toEqual({ ok: true, value: 12.5 });
    expect(parseNumberCell("-3e2", { decimalComma: false })).toEqual({ ok: true, value: -300 });
  });

  it("a decimal comma in a comma-separated file, thousands separators and words are refused", () => {
    expect(parseNumberCell("12,5", { decimalComma: false })).toMatchObject({ ok: false, message: expect.stringMatching(/ambiguous/) });
    expect(parseNumberCell("1.250,5", { decimalComma: true })).toMatchObject({ ok: false, message: expect.stringMatching(/thousands/) });
    expect(parseNumberCell("12 mm", { decimalComma: true })).toMatchObject({ ok: false, message: '"12 mm" is not a number' });
  });

  it("a numeric trait checks its minimum, maximum and that log10 has a value above 0", () => {
    expect(readTraitCell(SIZE, "2500", { decimalComma: false })).toMatchObject({ ok: false, message: expect.stringMatching(/above the maximum 2000 mm/) });
    expect(readTraitCell(SIZE, "0", { decimalComma: false })).toMatchObject({ ok: false, message: expect.stringMatching(/above 0/) });
    expect(readTraitCell(SIZE, "NA", { decimalComma: false })).toEqual({ ok: true, value: null });
  });
});

describe("states and ranges", () => {
  it("a state is read by code or label, case-blind, and stored as its code", () => {
    expect(readTraitCell(HABIT, "INFAUNAL", { decimalComma: false })).toEqual({ ok: true, value: "infaunal" });
    expect(readTraitCell(HABIT, "Epifaunal", { decimalComma: false })).toEqual({ ok: true, value: "epifaunal" });
    expect(readTraitCell(HABIT, "nektonic", { decimalComma: false })).toMatchObject({ ok: false, message: expect.stringMatching(/Unknown state "nektonic" for Life habit \(allowed: epifaunal, infaunal\)/) });
  });

  it("an interval name resolves to its base for a first appearance and its top for a last one", () => {
    expect(readRangeCell("Maastrichtian", "fad", { decimalComma: false })).toEqual({ ok: true, value: { ma: 72.2, interval: "Maastrichtian" } }); // ICS v2024/12 base
    expect(readRangeCell("maastrichtian", "lad", { decimalComma: false })).toEqual({ ok: true, value: { ma: 66, interval: "Maastrichtian" } }); // ICS v2024/12 top
    expect(readRangeCell("70,1", "lad", { decimalComma: true })).toEqual({ ok: true, value: { ma: 70.1, interval: null } });
    expect(readRangeCell("Jurassic Park", "fad", { decimalComma: false })).toMatchObject({ ok: false, message: expect.stringMatching(/Unknown interval name "Jurassic Park"/) });
  });
});

describe("validating an import", () => {
  it("lists every problem by spreadsheet row and CSV column", () => {
    const text = [
      "name;clade;first;last;habit;size",
      "Alphella;Invented A;Campanian;Maastrichtian;epifaunal;12,5", // row 2: fine
      ";Invented A;80;70;infaunal;3", // row 3: missing name
      "Betella;Invented B;Maastrichtian;Campanian;burrower;4", // row 4: swapped interval names, unknown state
      "Gammella;Invented B;Eoarchean-ish;70;infaunal;4.5", // row 5: unknown interval
      "Alphella;Invented A;80;70;infaunal;3", // row 6: duplicate of row 2
      "Deltella;Invented C;80;70;epifaunal;-2", // row 7: below minimum
      "Epsilonella;Invented C;80;70;epifaunal;1.5", // row 8: fine, decimal point in a semicolon file
    ].join("\n");
    const result = validateImportRows(parseCsv(text), mapping(), CODEBOOK);
    expect(result.problems.map((p) => [p.row, p.column])).toEqual([
      [3, "name"],
      [4, "first"],
      [4, "habit"],
      [5, "first"],
      [6, "name"],
      [7, "size"],
    ]);
    // Maastrichtian base 72.2 Ma = Campanian top (ICS v2024/12): a zero-length range from swapped names.
    expect(result.problems[1].message).toBe("First appearance interval Maastrichtian begins (72.2 Ma) where last appearance interval Campanian ends: the names look swapped");
    expect(result.problems[4].message).toBe('Duplicate taxon "Alphella": also on row 2');
    expect(result.rows.map((r) => r.name)).toEqual(["Alphella", "Epsilonella"]);
    expect(result.rows[0]).toEqual({
      row: 2,
      name: "Alphella",
      higherTaxon: "Invented A",
      fad: { ma: 83.6, interval: "Campanian" }, // ICS v2024/12 Campanian base
      lad: { ma: 66, interval: "Maastrichtian" }, // ICS v2024/12 Maastrichtian top
      values: { [HABIT.id]: "epifaunal", [SIZE.id]: 12.5 },
    });
    expect(result.invalidRowCount).toBe(5);
  });

  it("ages may meet (a single-age range) but not cross", () => {
    const parsed = parseCsv("name,clade,first,last,habit,size\nAlphella,,70,70,,\nBetella,,69.5,70,,\n");
    expect(validateImportRows(parsed, mapping(), CODEBOOK).problems).toEqual([
      { row: 3, column: "first", message: "First appearance (69.5 Ma) is younger than last appearance (70 Ma)" },
    ]);
  });

  it("an end the row leaves empty is checked against the stored range", () => {
    const parsed = parseCsv("name,clade,first,last,habit,size\nAlphella,,,90,,\n");
    const result = validateImportRows(parsed, mapping(), CODEBOOK, { existing: () => ({ fad: { ma: 80, interval: null }, lad: { ma: 70, interval: null } }) });
    expect(result.problems).toEqual([{ row: 2, column: "last", message: "First appearance (80 Ma) is younger than last appearance (90 Ma), given the stored range" }]);
  });

  it("a 10,000-row file with three bad rows: exactly those three rows are listed", () => {
    const lines = ["name,clade,first,last,habit,size"];
    for (let i = 1; i <= 10000; i++) lines.push(`Taxon${i},Clade${i % 7},${80 + (i % 5)},${70 - (i % 3)},${i % 2 ? "epifaunal" : "Infaunal"},${(i % 50) + 0.5}`);
    lines[2500] = "Taxon2500,Clade1,80,70,swimmer,3"; // data row 2500 is spreadsheet row 2501
    lines[5000] = 'Taxon5000,Clade2,80,70,epifaunal,"3,5"'; // a quoted decimal comma in a comma file
    lines[9999] = "Taxon9999,Clade3,60,70,epifaunal,3"; // inverted range
    const text = lines.join("\r\n") + "\r\n";
    const result = validateImportRows(parseCsv(text), mapping(), CODEBOOK);
    expect(result.problems.map((p) => [p.row, p.column])).toEqual([
      [2501, "habit"],
      [5001, "size"],
      [10000, "first"],
    ]);
    expect(result.rows).toHaveLength(9997);
    expect(result.rowCount).toBe(10000);
  });
});

describe("suggested mapping", () => {
  it("guesses from header words and codebook keys or labels; remembered columns win", () => {
    const header = ["Taxon", "Family", "FAD", "LAD", "Life habit", "body_size", "misc"];
    const guessed = suggestMapping(header, CODEBOOK);
    expect(guessed.mapping).toEqual({
      name: "Taxon",
      higherTaxon: "Family",
      firstAppearance: "FAD",
      lastAppearance: "LAD",
      notes: null,
      traits: { [HABIT.id]: "Life habit", [SIZE.id]: "body_size" },
    });
    const remembered = suggestMapping(header, CODEBOOK, { misc: "notes", Family: "name", Taxon: "higherTaxon" });
    expect(remembered.mapping).toMatchObject({ name: "Family", higherTaxon: "Taxon", notes: "misc" });
    expect(remembered.rememberedColumns).toEqual(["Taxon", "Family", "misc"]);
  });

  it("never suggests a retired trait", () => {
    const { mapping: m } = suggestMapping(["name", "body_size"], [HABIT, { ...SIZE, retired: true }]);
    expect(m.traits).toEqual({});
  });
});
