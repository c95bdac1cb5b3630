import { describe, expect, it } from "vitest";
import { mergedName, nameKey, similarNames } from "../../../shared/imports/nameHygiene";
import { nameMergesSchema } from "../../../shared/schemas/importChecks";

describe("nameKey", () => {
  it("drops case, spaces and punctuation, and folds compatibility forms (NFKC)", () => {
    expect(nameKey("Idiospira")).toBe("idiospira");
    expect(nameKey(" idio-spira. ")).toBe("idiospira");
    expect(nameKey("Idio spira")).toBe("idiospira");
    // U+FF29 FULLWIDTH LATIN CAPITAL LETTER I folds to "I" under NFKC (Unicode Standard Annex #15).
    expect(nameKey("\uFF29diospira")).toBe("idiospira");
    expect(nameKey("Idiospira")).not.toBe(nameKey("Idiospiro"));
  });
});

describe("similarNames", () => {
  it("finds spellings within the file and against the study's taxa, study names first", () => {
    const file = [
      { row: 2, name: "idiospira" },
      { row: 3, name: "Plicatella" },
      { row: 4, name: "Idio spira" },
      { row: 5, name: "idiospira" },
      { row: 6, name: "plicatella" },
      { row: 7, name: "Orthis" },
    ];
    const groups = similarNames(file, ["Idiospira", "Orthis", "Strophomena", "STROPHOMENA"]);
    expect(groups).toEqual([
      {
        key: "idiospira",
        spellings: [
          { name: "Idiospira", fileRows: 0, firstRows: [], inStudy: true },
          { name: "idiospira", fileRows: 2, firstRows: [2, 5], inStudy: false },
          { name: "Idio spira", fileRows: 1, firstRows: [4], inStudy: false },
        ],
        mergedInto: null,
      },
      {
        key: "plicatella",
        spellings: [
          { name: "Plicatella", fileRows: 1, firstRows: [3], inStudy: false },
          { name: "plicatella", fileRows: 1, firstRows: [6], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    // "Orthis" is spelt one way; the two Strophomena spellings are the study's alone: not listed.
  });

  it("says a group is merged when every spelling reads as one", () => {
    const file = [
      { row: 2, name: "idiospira" },
      { row: 3, name: "Idiospira" },
    ];
    expect(similarNames(file, [], { idiospira: "Idiospira" })[0]!.mergedInto).toBe("Idiospira");
    expect(similarNames(file, [], {})[0]!.mergedInto).toBeNull();
  });

  it("reads a name through the merges", () => {
    expect(mergedName("idiospira", { idiospira: "Idiospira" })).toBe("Idiospira");
    expect(mergedName("Orthis", { idiospira: "Idiospira" })).toBe("Orthis");
    expect(mergedName("constructor", {})).toBe("constructor");
  });
});

describe("nameMergesSchema", () => {
  it("refuses merging names that differ by more than case, spaces or punctuation, and chains", () => {
    expect(nameMergesSchema.parse({ idiospira: "Idiospira" })).toEqual({ idiospira: "Idiospira" });
    const far = nameMergesSchema.safeParse({ Idiospira: "Orthis" });
    expect(far.error!.issues[0]!.message).toBe('"Idiospira" and "Orthis" differ by more than case, spaces or punctuation');
    const chain = nameMergesSchema.safeParse({ "idio spira": "idiospira", idiospira: "Idiospira" });
    expect(chain.success).toBe(false);
  });
});
