import { describe, expect, it } from "vitest";
import { qualifiedHigherTaxaIn, qualifiedHigherTaxon } from "../../../shared/imports/qualifiedHigherTaxon";

// Qualifiers of open nomenclature: "?" for doubtful placement, "cf." (confer, compare with) and
// "aff." (affinis, related to); International Code of Zoological Nomenclature, 4th edition (1999),
// Glossary, and Bengtson (1988, Palaeontology 31: 223-227) on open nomenclature.
describe("qualifiedHigherTaxon", () => {
  it("recognises a question mark before or after the name, and cf. and aff.", () => {
    expect(qualifiedHigherTaxon("Anavelidae?")).toEqual({ base: "Anavelidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("Anavelidae ?")).toEqual({ base: "Anavelidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("?Anavelidae")).toEqual({ base: "Anavelidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("Anavelidae (?)")).toEqual({ base: "Anavelidae", qualifier: "?" });
    expect(qualifiedHigherTaxon("cf. Anavelidae")).toEqual({ base: "Anavelidae", qualifier: "cf." });
    expect(qualifiedHigherTaxon("CF Anavelidae")).toEqual({ base: "Anavelidae", qualifier: "cf." });
    expect(qualifiedHigherTaxon("aff. Anavelidae")).toEqual({ base: "Anavelidae", qualifier: "aff." });
    expect(qualifiedHigherTaxon("Anavelidae aff.")).toEqual({ base: "Anavelidae", qualifier: "aff." });
  });

  it("leaves plain names alone, including names that merely contain the letters", () => {
    expect(qualifiedHigherTaxon("Anavelidae")).toBeNull();
    expect(qualifiedHigherTaxon("Cfaffidae")).toBeNull();
    expect(qualifiedHigherTaxon("Affinidae")).toBeNull();
    expect(qualifiedHigherTaxon("?")).toBeNull();
    expect(qualifiedHigherTaxon("cf.")).toBeNull();
    expect(qualifiedHigherTaxon("")).toBeNull();
    expect(qualifiedHigherTaxon(null)).toBeNull();
  });

  it("lists a file's qualified higher taxa with their row counts, by first row", () => {
    const rows = [
      { row: 2, higherTaxon: "Anavelidae" },
      { row: 3, higherTaxon: "Anavelidae?" },
      { row: 4, higherTaxon: "cf. Ortevidae" },
      { row: 5, higherTaxon: "Anavelidae?" },
      { row: 6, higherTaxon: null },
    ];
    expect(qualifiedHigherTaxaIn(rows)).toEqual([
      { name: "Anavelidae?", base: "Anavelidae", qualifier: "?", rows: 2, firstRow: 3 },
      { name: "cf. Ortevidae", base: "Ortevidae", qualifier: "cf.", rows: 1, firstRow: 4 },
    ]);
  });
});
