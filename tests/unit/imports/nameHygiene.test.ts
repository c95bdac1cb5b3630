import { describe, expect, it } from "vitest";
import { mergedName, nameKey, similarNames } from "../../../shared/imports/nameHygiene";
import { nameMergesSchema } from "../../../shared/schemas/importChecks";

describe("nameKey", () => {
  it("drops case, spaces and punctuation, and folds compatibility forms (NFKC)", () => {
    expect(nameKey("Idiocrista")).toBe("idiocrista");
    expect(nameKey(" idio-crista. ")).toBe("idiocrista");
    expect(nameKey("Idio crista")).toBe("idiocrista");
    // U+FF29 FULLWIDTH LATIN CAPITAL LETTER I folds to "I" under NFKC (Unicode Standard Annex #15).
    expect(nameKey("\uFF29diocrista")).toBe("idiocrista");
    expect(nameKey("Idiocrista")).not.toBe(nameKey("Idiocristo"));
  });
});

describe("similarNames", () => {
  it("finds spellings within the file and against the study's taxa, study names first", () => {
    const file = [
      { row: 2, name: "idiocrista" },
      { row: 3, name: "Plicavella" },
      { row: 4, name: "Idio crista" },
      { row: 5, name: "idiocrista" },
      { row: 6, name: "plicavella" },
      { row: 7, name: "Ortevis" },
    ];
    const groups = similarNames(file, ["Idiocrista", "Ortevis", "Strovela", "STROVELA"]);
    expect(groups).toEqual([
      {
        key: "idiocrista",
        spellings: [
          { name: "Idiocrista", fileRows: 0, firstRows: [], inStudy: true },
          { name: "idiocrista", fileRows: 2, firstRows: [2, 5], inStudy: false },
          { name: "Idio crista", fileRows: 1, firstRows: [4], inStudy: false },
        ],
        mergedInto: null,
      },
      {
        key: "plicavella",
        spellings: [
          { name: "Plicavella", fileRows: 1, firstRows: [3], inStudy: false },
          { name: "plicavella", fileRows: 1, firstRows: [6], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    // "Ortevis" is spelt one way; the two Strovela spellings are the study's alone: not listed.
  });

  it("says a group is merged when every spelling reads as one", () => {
    const file = [
      { row: 2, name: "idiocrista" },
      { row: 3, name: "Idiocrista" },
    ];
    expect(similarNames(file, [], { idiocrista: "Idiocrista" })[0]!.mergedInto).toBe("Idiocrista");
    expect(similarNames(file, [], {})[0]!.mergedInto).toBeNull();
  });

  it("reads a name through the merges", () => {
    expect(mergedName("idiocrista", { idiocrista: "Idiocrista" })).toBe("Idiocrista");
    expect(mergedName("Ortevis", { idiocrista: "Idiocrista" })).toBe("Ortevis");
    expect(mergedName("constructor", {})).toBe("constructor");
  });
});

describe("nameMergesSchema", () => {
  it("refuses merging names that differ by more than case, spaces or punctuation, and chains", () => {
    expect(nameMergesSchema.parse({ idiocrista: "Idiocrista" })).toEqual({ idiocrista: "Idiocrista" });
    const far = nameMergesSchema.safeParse({ Idiocrista: "Ortevis" });
    expect(far.error!.issues[0]!.message).toBe('"Idiocrista" and "Ortevis" differ by more than case, spaces or punctuation');
    const chain = nameMergesSchema.safeParse({ "idio crista": "idiocrista", idiocrista: "Idiocrista" });
    expect(chain.success).toBe(false);
  });
});
