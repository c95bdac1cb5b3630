import { describe, expect, it } from "vitest";
import { deriveRanges } from "@shared/occurrences";

// All taxa, collections and ages here are invented. The rule checked is the one in shared/occurrences/deriveRanges.ts
// (first appearance = oldest find, last appearance = youngest find: the usual definition of a stratigraphic
// range, common practice, no source); every expected value is worked by hand in the comment beside it.

describe("deriveRanges: bounds (the widest range the dates allow)", () => {
  const finds = [
    { taxon: "Brachyops", higherTaxon: "Ventrida", maxMa: 260, minMa: 255, collection: "K1" },
    { taxon: "Brachyops", higherTaxon: "Ventrida", maxMa: 254, minMa: 252.5, collection: "K2" },
    { taxon: "Brachyops", higherTaxon: "Dorsida", maxMa: 258, minMa: 251, collection: "K1" },
    { taxon: "Acrotheca", higherTaxon: null, maxMa: 253, minMa: 253, collection: null },
  ];
  const { ranges, dropped } = deriveRanges(finds);

  it("takes the oldest maxMa and the youngest minMa", () => {
    // Brachyops: fad = max(260, 254, 258) = 260; lad = min(255, 252.5, 251) = 251.
    expect(ranges.find((r) => r.taxon === "Brachyops")).toEqual({
      taxon: "Brachyops",
      higherTaxon: "Ventrida", // Ventrida 2 finds, Dorsida 1
      fadMa: 260,
      ladMa: 251,
      occurrences: 3,
      collections: 2, // K1, K2 (K1 twice)
    });
    // Acrotheca: a single find dated to exactly 253 Ma gives a zero-length range; no higher taxon, no collection.
    expect(ranges.find((r) => r.taxon === "Acrotheca")).toEqual({
      taxon: "Acrotheca", higherTaxon: null, fadMa: 253, ladMa: 253, occurrences: 1, collections: 0,
    });
    expect(dropped).toEqual([]);
  });

  it("sorts ranges by taxon name in code-unit order (upper case before lower case, not locale order)", () => {
    const { ranges: sorted } = deriveRanges([
      { taxon: "beta", maxMa: 2, minMa: 1 },
      { taxon: "Zeta", maxMa: 2, minMa: 1 },
      { taxon: "alpha", maxMa: 2, minMa: 1 },
      { taxon: "Éta", maxMa: 2, minMa: 1 },
      { taxon: "Alpha", maxMa: 2, minMa: 1 },
    ]);
    // Code units: "A" 65 < "Z" 90 < "a" 97 < "b" 98 < "É" 201. localeCompare would put alpha next to Alpha.
    expect(sorted.map((r) => r.taxon)).toEqual(["Alpha", "Zeta", "alpha", "beta", "Éta"]);
  });

  it("matches names exactly after trimming (case and inner spaces still count)", () => {
    const { ranges: matched } = deriveRanges([
      { taxon: "  Idiocrista", maxMa: 10, minMa: 9 },
      { taxon: "Idiocrista\t", maxMa: 8, minMa: 7 },
      { taxon: "idiocrista", maxMa: 6, minMa: 5 },
      { taxon: "Idio crista", maxMa: 6, minMa: 5 },
    ]);
    // "  Idiocrista" and "Idiocrista\t" are one taxon (fad 10, lad 7); "idiocrista" and "Idio crista" are others.
    expect(matched).toEqual([
      { taxon: "Idio crista", higherTaxon: null, fadMa: 6, ladMa: 5, occurrences: 1, collections: 0 },
      { taxon: "Idiocrista", higherTaxon: null, fadMa: 10, ladMa: 7, occurrences: 2, collections: 0 },
      { taxon: "idiocrista", higherTaxon: null, fadMa: 6, ladMa: 5, occurrences: 1, collections: 0 },
    ]);
  });
});

describe("deriveRanges: midpoint", () => {
  it("places each find at the middle of its dates", () => {
    const { ranges } = deriveRanges(
      [
        { taxon: "Cyrtella", maxMa: 260, minMa: 250 }, // midpoint 255
        { taxon: "Cyrtella", maxMa: 252, minMa: 248 }, // midpoint 250
        { taxon: "Cyrtella", maxMa: 257, minMa: 256 }, // midpoint 256.5
      ],
      { ageMode: "midpoint" },
    );
    // fad = max(255, 250, 256.5) = 256.5; lad = min(255, 250, 256.5) = 250. Bounds would give 260 and 248.
    expect(ranges).toEqual([{ taxon: "Cyrtella", higherTaxon: null, fadMa: 256.5, ladMa: 250, occurrences: 3, collections: 0 }]);
  });
});

describe("deriveRanges: maxSpanMyr", () => {
  const finds = [
    { taxon: "Dorella", maxMa: 270, minMa: 250 }, // span 20: kept at limit 20 (only spans > limit go)
    { taxon: "Dorella", maxMa: 300, minMa: 252 }, // span 48: dropped
    { taxon: "Eolina", maxMa: 280, minMa: 259.9 }, // span 20.1: dropped; Eolina has no other find
    { taxon: "Dorella", maxMa: 253, minMa: 253 }, // span 0: kept
  ];
  it("leaves out finds dated more coarsely than the limit, with a reason, and drops taxa left with none", () => {
    const { ranges, dropped } = deriveRanges(finds, { maxSpanMyr: 20 });
    // Dorella from finds 0 and 3: fad = max(270, 253) = 270, lad = min(250, 253) = 250.
    expect(ranges).toEqual([{ taxon: "Dorella", higherTaxon: null, fadMa: 270, ladMa: 250, occurrences: 2, collections: 0 }]);
    expect(dropped.map((d) => d.index)).toEqual([1, 2]);
    expect(dropped[0]!.reason).toMatch(/48/);
    expect(dropped[0]!.reason).toMatch(/20 Myr/);
  });
  it("has no limit unless given", () => {
    const { ranges, dropped } = deriveRanges(finds);
    // Dorella: fad = max(270, 300, 253) = 300, lad = min(250, 252, 253) = 250.
    expect(ranges.map((r) => [r.taxon, r.fadMa, r.ladMa, r.occurrences])).toEqual([["Dorella", 300, 250, 3], ["Eolina", 280, 259.9, 1]]);
    expect(dropped).toEqual([]);
  });
  it("keeps a decimal span equal to the limit despite floating-point rounding", () => {
    // 252.17 - 251.902 is 0.268000000000001 in binary floating point; the limit 0.268 must still keep it.
    const { ranges } = deriveRanges([{ taxon: "Fenestra", maxMa: 252.17, minMa: 251.902 }], { maxSpanMyr: 0.268 });
    expect(ranges).toHaveLength(1);
  });
});

describe("deriveRanges: higher taxon and collections", () => {
  it("takes the most frequent non-empty higher taxon, ties to the first in code-unit order", () => {
    const { ranges } = deriveRanges([
      { taxon: "Gyra", higherTaxon: "Rhoviida", maxMa: 2, minMa: 1 },
      { taxon: "Gyra", higherTaxon: "Ortevida", maxMa: 2, minMa: 1 },
      { taxon: "Gyra", higherTaxon: "", maxMa: 2, minMa: 1 },
      { taxon: "Gyra", higherTaxon: "  ", maxMa: 2, minMa: 1 },
      { taxon: "Gyra", higherTaxon: null, maxMa: 2, minMa: 1 },
      { taxon: "Gyra", maxMa: 2, minMa: 1 },
      { taxon: "Hexa", higherTaxon: "ortevida", maxMa: 2, minMa: 1 },
      { taxon: "Hexa", higherTaxon: "Pentida", maxMa: 2, minMa: 1 },
      { taxon: "Hexa", higherTaxon: "Pentida", maxMa: 2, minMa: 1 },
    ]);
    // Gyra: Rhoviida 1, Ortevida 1 (blank, spaces, null and missing do not count): a tie, "O" (79) < "R" (82).
    expect(ranges[0]!.higherTaxon).toBe("Ortevida");
    // Hexa: Pentida 2 beats ortevida 1, even though "ortevida" would not win a tie against it anyway.
    expect(ranges[1]!.higherTaxon).toBe("Pentida");
  });
  it("ties between an upper- and a lower-case spelling go to the upper-case one (code-unit order)", () => {
    const { ranges } = deriveRanges([
      { taxon: "Ira", higherTaxon: "spivelida", maxMa: 2, minMa: 1 },
      { taxon: "Ira", higherTaxon: "Spivelida", maxMa: 2, minMa: 1 },
    ]);
    expect(ranges[0]!.higherTaxon).toBe("Spivelida"); // "S" 83 < "s" 115
  });
  it("counts distinct non-empty collection ids (trimmed)", () => {
    const { ranges } = deriveRanges([
      { taxon: "Juga", maxMa: 2, minMa: 1, collection: "C-7" },
      { taxon: "Juga", maxMa: 2, minMa: 1, collection: " C-7 " },
      { taxon: "Juga", maxMa: 2, minMa: 1, collection: "C-8" },
      { taxon: "Juga", maxMa: 2, minMa: 1, collection: "" },
      { taxon: "Juga", maxMa: 2, minMa: 1, collection: null },
    ]);
    expect(ranges[0]).toMatchObject({ occurrences: 5, collections: 2 }); // C-7, C-8
  });
});

describe("deriveRanges: bad input", () => {
  it("throws for maxMa < minMa, naming the occurrence's index", () => {
    const finds = [
      { taxon: "Kona", maxMa: 10, minMa: 5 },
      { taxon: "Kona", maxMa: 10, minMa: 5 },
      { taxon: "Kona", maxMa: 4, minMa: 5 },
    ];
    expect(() => deriveRanges(finds)).toThrow(Error);
    expect(() => deriveRanges(finds)).toThrow(/occurrence 2\b/);
  });
  it("throws for a missing or non-finite age, naming the index", () => {
    expect(() => deriveRanges([{ taxon: "Lema", maxMa: Number.NaN, minMa: 1 }])).toThrow(/occurrence 0\b/);
    expect(() => deriveRanges([{ taxon: "Lema", maxMa: 3, minMa: 1 }, { taxon: "Lema", maxMa: Infinity, minMa: 1 }])).toThrow(/occurrence 1\b/);
  });
  it("checks every occurrence's dates even when it would be dropped for its span", () => {
    expect(() => deriveRanges([{ taxon: "Mora", maxMa: 1, minMa: 100 }], { maxSpanMyr: 5 })).toThrow(/occurrence 0\b/);
  });
  it("leaves out an empty taxon name, with a reason", () => {
    const { ranges, dropped } = deriveRanges([{ taxon: "   ", maxMa: 2, minMa: 1 }, { taxon: "Nula", maxMa: 2, minMa: 1 }]);
    expect(ranges.map((r) => r.taxon)).toEqual(["Nula"]);
    expect(dropped).toEqual([{ index: 0, reason: "empty taxon name" }]);
  });
  it("gives nothing for no occurrences", () => {
    expect(deriveRanges([])).toEqual({ ranges: [], dropped: [] });
  });
});
