// Text and ages that come in: lone UTF-16 surrogates (Unicode 15.0, section 3.9, D91-D92: a
// well-formed UTF-16 code unit sequence has no unpaired surrogate), control characters in one-line
// fields, and ages older than the Earth (4,567 Ma, common practice) are refused, in the API's
// schemas and in CSV imports by row and column.
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { AGE_LIMIT_MA, findLoneSurrogate, loneSurrogateIn, oneLine, oneLineProblem, wellFormed } from "@shared/schemas/common";
import { studyCreateSchema, studyUpdateSchema } from "@shared/schemas/studies";
import { signupSchema } from "@shared/schemas/auth";
import { taxonChangesSchema, taxonCreateSchema } from "@shared/schemas/taxa";
import { decodeCsvBytes, parseCsv, readRangeCell, resolveRangeEnd, validateImportRows } from "@shared/csv";

describe("lone surrogates", () => {
  it("finds a high half without its low half and a low half without its high half; a pair is fine", () => {
    expect(loneSurrogateIn("ab\uD800c")).toBe("U+D800");
    expect(loneSurrogateIn("ab\uD83D")).toBe("U+D83D");
    expect(loneSurrogateIn("\uDC00ab")).toBe("U+DC00");
    expect(loneSurrogateIn("\uDE00\uD83D")).toBe("U+DE00"); // reversed halves are two lone ones
    expect(loneSurrogateIn("Gr\u00FCn \uD83D\uDE00 \u4E2D")).toBeNull(); // ü, an emoji as a pair, a CJK letter
  });

  it("finds the first lone surrogate anywhere in a request's input, naming its path", () => {
    expect(findLoneSurrogate({ version: 1, changes: { values: { a: "x", b: ["ok", "bad\uDBFF"] } } })).toEqual({ path: "changes.values.b.1", codePoint: "U+DBFF" });
    expect(findLoneSurrogate({ ["key\uD800"]: 1 })).toEqual({ path: "key\uD800", codePoint: "U+D800" });
    expect(findLoneSurrogate("\uDC01")).toEqual({ path: "_", codePoint: "U+DC01" });
    expect(findLoneSurrogate({ a: [1, null, true, { b: "\uD83D\uDE00" }] })).toBeNull();
  });

  it("the shared field checks refuse it with a message naming the field", () => {
    const notes = z.string().check(wellFormed("Notes"));
    expect(notes.safeParse("two\nlines").success).toBe(true);
    expect(notes.safeParse("x\uD800").error?.issues[0].message).toMatch(/^Notes holds a lone UTF-16 surrogate \(U\+D800\)/);
    const created = taxonCreateSchema.safeParse({ name: "Alphella", notes: "broken \uDC00" });
    expect(created.error?.issues[0]).toMatchObject({ path: ["notes"], message: expect.stringMatching(/^Notes holds a lone UTF-16 surrogate/) });
  });
});

describe("one-line fields", () => {
  it("refuse line breaks, tabs and other control characters, naming the field", () => {
    expect(oneLineProblem("Name", "Ann\nBell")).toBe("Name must be one line of text: it holds a line break");
    expect(oneLineProblem("Name", "Ann\rBell")).toBe("Name must be one line of text: it holds a line break");
    expect(oneLineProblem("Name", "Ann\tBell")).toBe("Name must be one line of text: it holds a tab");
    expect(oneLineProblem("Name", "Ann\u0007")).toBe("Name must be one line of text: it holds a control character (U+0007)");
    expect(oneLineProblem("Name", "Ann\u0085")).toBe("Name must be one line of text: it holds a control character (U+0085)"); // C1 next line
    expect(oneLineProblem("Name", "Ann\u2028Bell")).toBe("Name must be one line of text: it holds a control character (U+2028)"); // line separator
    expect(oneLineProblem("Name", "Ann-Sofie O'Brien (invented) \u00E9\u00DF")).toBeNull();
  });

  it("are checked by the schemas of people's, studies' and taxa's names; a line break at either end is trimmed away first", () => {
    const bad = "Invented\nSubject: forged header";
    expect(signupSchema.safeParse({ email: "a@example.test", password: "long enough password", name: bad }).error?.issues[0]).toMatchObject({ path: ["name"], message: "Name must be one line of text: it holds a line break" });
    expect(studyCreateSchema.safeParse({ name: bad }).error?.issues[0]).toMatchObject({ path: ["name"], message: "Name must be one line of text: it holds a line break" });
    expect(studyUpdateSchema.safeParse({ name: bad }).success).toBe(false);
    expect(taxonChangesSchema.safeParse({ higherTaxon: "Inventidae\u0000" }).error?.issues[0]).toMatchObject({ path: ["higherTaxon"], message: "Higher taxon must be one line of text: it holds a control character (U+0000)" });
    expect(studyCreateSchema.parse({ name: "\nInvented study\n", description: "Line one\nline two" })).toEqual({ name: "Invented study", description: "Line one\nline two", suggestedCodebook: false });
    expect(z.string().check(oneLine("Title")).safeParse("a\u2029b").success).toBe(false);
  });
});

describe("ages older than the Earth", () => {
  it(`refuses ages over ${AGE_LIMIT_MA} Ma in the API schema, the grid's reading and CSV cells; ${AGE_LIMIT_MA} itself is allowed`, () => {
    expect(taxonCreateSchema.safeParse({ name: "Alphella", fad: { ma: 1e300 } }).error?.issues[0]).toMatchObject({ path: ["fad", "ma"], message: "Age must be at most 4,567 Ma: nothing is older than the Earth" });
    expect(taxonCreateSchema.safeParse({ name: "Alphella", fad: { ma: 4567 } }).success).toBe(true);
    expect(resolveRangeEnd({ ma: 4567.01 }, "fad")).toEqual({ ok: false, message: "Age must be at most 4,567 Ma: nothing is older than the Earth" });
    expect(readRangeCell("1e300", "fad", { decimalComma: false })).toEqual({ ok: false, message: "1e300 is not an age: age must be at most 4,567 Ma: nothing is older than the Earth" });
    expect(readRangeCell("5000,5", "lad", { decimalComma: true }).ok).toBe(false);
    expect(readRangeCell("4567", "fad", { decimalComma: false })).toEqual({ ok: true, value: { ma: 4567, interval: null } });
  });
});

describe("CSV imports", () => {
  const mapping = { name: "name", higherTaxon: "clade", firstAppearance: "first", lastAppearance: null, notes: "notes", traits: {} };

  it("a UTF-16 file keeps a lone surrogate (rather than turning it into U+FFFD), and the row check names its row and column", () => {
    const text = "name,clade,first,notes\r\nAlphella,Inventidae,70,fine\r\nBetella,Inventidae,70,bro\uD800ken\r\n";
    const bytes = new Uint8Array(2 + text.length * 2);
    bytes.set([0xff, 0xfe]);
    for (let i = 0; i < text.length; i++) {
      bytes[2 + 2 * i] = text.charCodeAt(i) & 0xff;
      bytes[3 + 2 * i] = text.charCodeAt(i) >> 8;
    }
    expect(decodeCsvBytes(bytes)).toEqual({ text, encoding: "utf-16le", hadBom: true });
    const checked = validateImportRows(parseCsv(bytes), mapping, []);
    expect(checked.rows.map((r) => r.name)).toEqual(["Alphella"]);
    expect(checked.problems).toEqual([{ row: 3, column: "notes", message: "The cell holds a lone UTF-16 surrogate (U+D800), half of a character that is not valid text; retype the character" }]);
  });

  it("UTF-8 that encodes a lone surrogate (ED A0 80) is read as UTF-8 with it kept, not as windows-1252, and refused by row and column", () => {
    const head = new TextEncoder().encode("name,clade,first,notes\nAlphella\u00E9,Inventidae,70,x");
    const bytes = new Uint8Array([...head, 0xed, 0xa0, 0x80, 0x0a]);
    expect(decodeCsvBytes(bytes)).toEqual({ text: "name,clade,first,notes\nAlphella\u00E9,Inventidae,70,x\uD800\n", encoding: "utf-8", hadBom: false });
    expect(validateImportRows(parseCsv(bytes), mapping, []).problems).toEqual([
      { row: 2, column: "notes", message: "The cell holds a lone UTF-16 surrogate (U+D800), half of a character that is not valid text; retype the character" },
    ]);
  });

  it("refuses a name or higher taxon cell holding a line break, and an age older than the Earth, by row and column", () => {
    const csv = 'name,clade,first,notes\nAlphella,Inventidae,70,"notes may\nspan lines"\n"Bet\nella",Inventidae,70,\nGammella,"Inven\ntidae",70,\nDeltella,Inventidae,1e300,\n';
    const checked = validateImportRows(parseCsv(csv), mapping, []);
    expect(checked.rows.map((r) => r.name)).toEqual(["Alphella"]);
    expect(checked.problems).toEqual([
      { row: 3, column: "name", message: "Name must be one line of text: it holds a line break" },
      { row: 4, column: "clade", message: "Higher taxon must be one line of text: it holds a line break" },
      { row: 5, column: "first", message: "First appearance: 1e300 is not an age: age must be at most 4,567 Ma: nothing is older than the Earth" },
    ]);
  });
});

describe("the request-wide surrogate check on deeply nested input", () => {
  it("walks 200,000 levels of nesting without overflowing the call stack, and names the path (cut after 12 parts)", () => {
    let deep: unknown = "x\uD800";
    for (let i = 0; i < 200_000; i++) deep = [deep];
    const found = findLoneSurrogate({ a: deep });
    expect(found?.codePoint).toBe("U+D800");
    expect(found?.path).toBe(["a", ...Array(11).fill(0), "…"].join("."));
    let clean: unknown = "x";
    for (let i = 0; i < 200_000; i++) clean = { k: clean };
    expect(findLoneSurrogate(clean)).toBeNull();
  });
});
