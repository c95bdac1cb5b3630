// Reading nasty CSV files: quoting rules of RFC 4180 (Shafranovich 2005, "Common Format and MIME
// Type for Comma-Separated Values (CSV) Files", section 2), byte-order marks (The Unicode
// Standard: U+FEFF is EF BB BF in UTF-8, FF FE in UTF-16LE), blank lines and separators.
import { describe, expect, it } from "vitest";
import { decodeCsvBytes, detectDelimiter, parseCsv, stripBom } from "@shared/csv";

const utf8 = (text: string) => new TextEncoder().encode(text);

describe("separators", () => {
  it("detects comma, semicolon and tab", () => {
    expect(detectDelimiter("name,habit\nA,x\nB,y\n")).toBe(",");
    expect(detectDelimiter("name;habit\nA;x\nB;y\n")).toBe(";");
    expect(detectDelimiter("name\thabit\nA\tx\nB\ty\n")).toBe("\t");
  });

  it("a semicolon file with decimal commas is read as semicolon separated", () => {
    // The commas inside numbers would give ragged rows if they were separators.
    const text = "name;size;range\nAlpha;12,5;3\nBeta;7;4,25\nGamma;1,75;2\n";
    expect(detectDelimiter(text)).toBe(";");
    expect(parseCsv(text).rows.map((r) => r.cells)).toEqual([
      ["Alpha", "12,5", "3"],
      ["Beta", "7", "4,25"],
      ["Gamma", "1,75", "2"],
    ]);
  });

  it("a separator inside quotes does not split the cell (RFC 4180, 2.6)", () => {
    const text = 'name,notes,habit\n"Alpha","found in shale, rarely in marl",x\nBeta,"semi; colon",y\n';
    const parsed = parseCsv(text);
    expect(parsed.delimiter).toBe(",");
    expect(parsed.rows[0].cells).toEqual(["Alpha", "found in shale, rarely in marl", "x"]);
    expect(parsed.rows[1].cells).toEqual(["Beta", "semi; colon", "y"]);
  });

  it("a doubled quote inside quotes is one quote (RFC 4180, 2.7)", () => {
    const parsed = parseCsv('name,notes\nAlpha,"the ""giant"" form"\n');
    expect(parsed.rows[0].cells[1]).toBe('the "giant" form');
  });
});

describe("line breaks, blank lines and row numbers", () => {
  it("a line break inside a quoted cell stays in the cell, and the next record is the next spreadsheet row", () => {
    const text = 'name,notes\r\nAlpha,"first line\r\nsecond line"\r\nBeta,plain\r\n';
    const parsed = parseCsv(text);
    expect(parsed.rows).toEqual([
      { row: 2, cells: ["Alpha", "first line\r\nsecond line"] },
      { row: 3, cells: ["Beta", "plain"] },
    ]);
  });

  it("blank lines are skipped but still counted, as a spreadsheet shows them", () => {
    // Worked by hand: header row 1, Alpha row 2, blank row 3, blank-with-separators row 4, Beta row 5.
    const text = "name,habit\nAlpha,x\n\n , \nBeta,y\n\n";
    expect(parseCsv(text).rows).toEqual([
      { row: 2, cells: ["Alpha", "x"] },
      { row: 5, cells: ["Beta", "y"] },
    ]);
  });

  it("short rows are padded; a row with extra filled cells is a problem naming its row", () => {
    const parsed = parseCsv("name,habit,size\nAlpha,x\nBeta,y,3,surplus\nGamma,z,4,\n");
    expect(parsed.rows[0].cells).toEqual(["Alpha", "x", ""]);
    expect(parsed.problems).toEqual([{ row: 3, column: null, message: expect.stringMatching(/4 cells but the header has 3/) }]);
  });

  it("an unclosed quote is reported on its row", () => {
    const parsed = parseCsv('name,notes\nAlpha,ok\nBeta,"never closed\nGamma,z\n');
    expect(parsed.problems.map((p) => p.row)).toEqual([3]);
    expect(parsed.problems[0].message).toMatch(/never closed/);
  });

  it("blank and repeated header names get usable names", () => {
    expect(parseCsv("name,,size,size\nA,1,2,3\n").header).toEqual(["name", "column 2", "size", "size (2)"]);
  });
});

describe("byte-order marks and encodings", () => {
  it("a UTF-8 BOM (EF BB BF) is dropped, so the first header is 'name', not '\\uFEFFname'", () => {
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...utf8("name;habit\nÄlpha;x\n")]);
    const parsed = parseCsv(bytes);
    expect(parsed.hadBom).toBe(true);
    expect(parsed.header).toEqual(["name", "habit"]);
    expect(parsed.rows[0].cells[0]).toBe("Älpha");
  });

  it("the same file without a BOM reads the same", () => {
    const parsed = parseCsv(utf8("name;habit\nÄlpha;x\n"));
    expect(parsed.hadBom).toBe(false);
    expect(parsed.header).toEqual(["name", "habit"]);
  });

  it("text with a BOM character is stripped too", () => {
    expect(stripBom("\uFEFFname")).toEqual({ text: "name", hadBom: true });
  });

  it("UTF-16LE with its BOM (FF FE), as spreadsheet 'Unicode text' exports write it", () => {
    const text = "name\thabit\nÅlpha\tx\n";
    const bytes = new Uint8Array(2 + text.length * 2);
    bytes.set([0xff, 0xfe]);
    for (let i = 0; i < text.length; i++) {
      bytes[2 + 2 * i] = text.charCodeAt(i) & 0xff;
      bytes[3 + 2 * i] = text.charCodeAt(i) >> 8;
    }
    const parsed = parseCsv(bytes);
    expect(parsed.encoding).toBe("utf-16le");
    expect(parsed.delimiter).toBe("\t");
    expect(parsed.rows[0].cells).toEqual(["Ålpha", "x"]);
  });

  it("bytes that are not UTF-8 are read as windows-1252 (0xE9 is é there)", () => {
    const decoded = decodeCsvBytes(new Uint8Array([0x6e, 0x61, 0x6d, 0x65, 0x0a, 0x43, 0x61, 0x66, 0xe9]));
    expect(decoded).toEqual({ text: "name\nCafé", encoding: "windows-1252", hadBom: false });
  });
});
