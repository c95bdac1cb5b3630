import { describe, expect, it } from "vitest";
import { parseCsv } from "../../../shared/csv/parse";
import { blankMissingTokens, isMissingToken } from "../../../shared/imports/missingTokens";
import { importSettingsSchema } from "../../../shared/schemas/importChecks";

// Hand-worked cases: the rows are numbered as a spreadsheet shows them (header row 1), so the
// first data row is row 2.
describe("isMissingToken", () => {
  it("matches a declared token whole, trimmed and ignoring case", () => {
    expect(isMissingToken(" indet. ", ["Indet."])).toBe(true);
    expect(isMissingToken("?", ["?"])).toBe(true);
    expect(isMissingToken("Indet", ["Indet."])).toBe(false);
    expect(isMissingToken("Indeterminate", ["Indet."])).toBe(false);
    expect(isMissingToken("", ["Indet."])).toBe(false);
  });
});

describe("blankMissingTokens", () => {
  const csv = "name,order,fad\nA,Indet.,450\nB,Strovelida,?\nC, indet. ,NA\nD,?,460\n";

  it("empties the token cells and says what was read as missing, by column then row", () => {
    const parsed = parseCsv(csv);
    const { parsed: out, read } = blankMissingTokens(parsed, ["Indet.", "?"]);
    expect(out.rows.map((r) => r.cells)).toEqual([
      ["A", "", "450"],
      ["B", "Strovelida", ""],
      ["C", "", "NA"],
      ["D", "", "460"],
    ]);
    // order: "Indet." on rows 2 and 4 (" indet. " counts), "?" on row 5; fad: "?" on row 3.
    expect(read).toEqual([
      { column: "order", token: "Indet.", count: 2, firstRows: [2, 4] },
      { column: "order", token: "?", count: 1, firstRows: [5] },
      { column: "fad", token: "?", count: 1, firstRows: [3] },
    ]);
    // The input is left as it was.
    expect(parsed.rows[0]!.cells[1]).toBe("Indet.");
  });

  it("only touches the columns asked for", () => {
    const { parsed: out, read } = blankMissingTokens(parseCsv(csv), ["?"], ["fad"]);
    expect(out.rows[3]!.cells).toEqual(["D", "?", "460"]);
    expect(read).toEqual([{ column: "fad", token: "?", count: 1, firstRows: [3] }]);
  });

  it("changes nothing without tokens", () => {
    const parsed = parseCsv(csv);
    expect(blankMissingTokens(parsed, []).parsed).toBe(parsed);
  });
});

describe("importSettingsSchema", () => {
  it("trims tokens and refuses empty, repeated (ignoring case) or multi-line ones, naming the entry", () => {
    expect(importSettingsSchema.parse({ missingTokens: [" Indet. ", "?"] })).toEqual({ missingTokens: ["Indet.", "?"] });
    const empty = importSettingsSchema.safeParse({ missingTokens: ["  "] });
    expect(empty.success).toBe(false);
    expect(empty.error!.issues[0]!.path).toEqual(["missingTokens", 0]);
    const repeated = importSettingsSchema.safeParse({ missingTokens: ["NA", "na"] });
    expect(repeated.error!.issues[0]).toMatchObject({ path: ["missingTokens", 1], message: '"na" is already in the list (tokens are matched ignoring case)' });
    expect(importSettingsSchema.safeParse({ missingTokens: ["a\nb"] }).success).toBe(false);
    expect(importSettingsSchema.safeParse({ missingTokens: [], other: 1 }).success).toBe(false);
  });
});
