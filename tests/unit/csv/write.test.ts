// Writing CSV: quoting per RFC 4180 section 2 (Shafranovich 2005), and neutralising cells that a
// spreadsheet would run as formulas per OWASP "CSV Injection" (cells starting with = + - @ tab or
// carriage return get a leading single quote; ; | and their full-width forms too, common practice, no source).
import { describe, expect, it } from "vitest";
import { csvCell, csvRow, neutraliseFormula, parseCsv } from "@shared/csv";

describe("formula injection", () => {
  it("prefixes a quote to text starting with each of = + - @ tab CR (OWASP)", () => {
    expect(["=1+1", "+1", "-cmd", "@SUM(A1)", "\tx", "\rx"].map(neutraliseFormula)).toEqual(["'=1+1", "'+1", "'-cmd", "'@SUM(A1)", "'\tx", "'\rx"]);
    expect(neutraliseFormula("Alphella")).toBe("Alphella");
  });

  it("prefixes a quote to text starting with ; or | and to the full-width = + - @ ; | (common practice, no source)", () => {
    const risky = [";=1+1", "|cmd", "\uFF1D1+1", "\uFF0B1", "\uFF0Dcmd", "\uFF20SUM(A1)", "\uFF1B=1", "\uFF5Ccmd"];
    expect(risky.map(neutraliseFormula)).toEqual(risky.map((t) => `'${t}`));
    expect(neutraliseFormula("a;b|c")).toBe("a;b|c");
  });

  it("quotes a cell holding ; or tab, so a formula after one cannot become a cell of its own where ; or tab separates", () => {
    expect(csvCell("Alphella;=1+1")).toBe('"Alphella;=1+1"');
    expect(csvCell(";=1+1")).toBe(`"';=1+1"`);
    expect(csvCell("a\t=1+1")).toBe('"a\t=1+1"');
    // Read with ; as the separator, the cell stays one cell that does not start with "=".
    const parsed = parseCsv("h1;h2\r\n" + [csvCell("Alphella;=1+1"), csvCell("x")].join(";") + "\r\n", { delimiter: ";" });
    expect(parsed.rows[0].cells).toEqual(["Alphella;=1+1", "x"]);
  });

  it("numbers stay numbers, negative ones too", () => {
    expect(csvCell(-3.5)).toBe("-3.5");
    expect(csvCell("-3.5")).toBe("'-3.5");
  });
});

describe("quoting", () => {
  it("quotes cells with commas, quotes or line breaks, doubling inner quotes (RFC 4180, 2.6 and 2.7)", () => {
    expect(csvRow(["a,b", 'say "hi"', "two\nlines", null, 3])).toBe('"a,b","say ""hi""","two\nlines",,3\r\n');
  });

  it("what is written reads back the same", () => {
    const cells = ["Alphella", "notes, with comma", 'a "quoted" word', "line\r\nbreak", "12.5"];
    const parsed = parseCsv("h1,h2,h3,h4,h5\r\n" + csvRow(cells));
    expect(parsed.rows[0].cells).toEqual(cells);
  });
});
