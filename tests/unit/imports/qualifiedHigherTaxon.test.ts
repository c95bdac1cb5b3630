import { describe, expect, it } from "vitest";
import { qualifiedHigherTaxaIn, qualifiedHigherTaxon } from "../../../shared/imports/qualifiedHigherTaxon";

// Qualifiers of open nomenclature: "?" for doubtful placement, "cf." (confer, compare with) and
// "aff." (affinis, related to); International Code of Zoological Nomenclature, 4th edition (1999),
// Glossary, and Bengtson (1988, Palaeontology 31: 223-227) on open nomenclature.
describe("qualifiedHigherTaxon", () => {
  it("recognises a question mark before or after the name, and cf. and aff.", () => {
    expect(qualifiedHigherTaxon("Anazygidae?")).toEqual({ base: "Anazygidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("Anazygidae ?")).toEqual({ base: "Anazygidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("?Anazygidae")).toEqual({ base: "Anazygidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("Anazygidae (?)")).toEqual({ base: "Anazygidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("cf. Anazygidae")).toEqual({ base: "Anazygidae", qualifier: "cf." });
    expect(qualifiedHigherTaxon("CF Anazygidae")).toEqual({ base: "Anazygidae", qualifier: "cf." });
    expect(qualifiedHigherTaxon("aff. Anazygidae")).toEqual({ base: "Anazygidae", qualifier: "aff." });
    expect(qualifiedHigherTaxon("Anazygidae aff.")).toEqual({ base: "Anazygidae", qualifier: "aff." });
  });

  it("leaves plain names alone, including names that merely contain the letters", () => {
    expect(qualifiedHigherTaxon("Anazygidae")).toBeNull();
    expect(qualifiedHigherTaxon("Cfaffidae")).toBeNull();
    expect(qualifiedHigherTaxon("Affinidae")).toBeNull();
    expect(qualifiedHigherTaxon("?")).toBeNull();
    expect(qualifiedHigherTaxon("cf.")).toBeNull();
    expect(qualifiedHigherTaxon("")).toBeNull();
    expect(qualifiedHigherTaxon(null)).toBeNull();
  });

  it("lists a file's qualified higher taxa with their row counts, by first row", () => {
    const rows = [
      { row: 2, higherTaxon: "Anazygidae" },
      { row: 3, higherTaxon: "Anazygidae?" },
      { row: 4, higherTaxon: "cf. Orthidae" },
      { row: 5, higherTaxon: "Anazygidae?" },
      { row: 6, higherTaxon: null },
    ];
    expect(qualifiedHigherTaxaIn(rows)).toEqual([
      { name: "Anazygidae?", base: "Anazygidae", qualifier: "?", rows: 2, firstRow: 3 },
      { name: "cf. Orthidae", base: "Orthidae", qualifier: "cf.", rows: 1, firstRow: 4 },
    ]);
  });
});
