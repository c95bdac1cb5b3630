// Writing CSV: quoting per RFC 4180 section 2 (Shafranovich 2005), and neutralising cells that a
// spreadsheet would run as formulas per OWASP "CSV Injection" (cells starting with = + - @ tab or
// carriage return get a leading single quote).
import { describe, expect, it } from "vitest";
import { csvCell, csvRow, neutraliseFormula, parseCsv } from "@shared/csv";

describe("formula injection", () => {
  it("prefixes a quote to text starting with each of = + - @ tab CR (OWASP)", () => {
    expect(["=1+1", "+1", "-cmd", "@SUM(A1)", "\tx", "\rx"].map(neutraliseFormula)).toEqual(["'=1+1", "'+1", "'-cmd", "'@SUM(A1)", "'\tx", "'\rx"]);
    expect(neutraliseFormula("Alphella")).toBe("Alphella");
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
