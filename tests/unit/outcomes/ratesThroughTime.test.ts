import { describe, expect, it } from "vitest";
import { ratesThroughTime } from "@shared/outcomes";

// Invented ranges and intervals, worked by hand with the boundary-crosser rules (Foote 2000, Paleobiology
// 26(4) suppl.: 74-102; the formulas are FROM MEMORY per docs/sources.md section 7).
const taxa = [
  { fad: 12, lad: 3 }, // crosses 10 and 5; in A, crosses the base only
  { fad: 12, lad: 7 }, // crosses 10, last seen in B
  { fad: 8, lad: 3 }, // first seen in B, crosses 5; in A, crosses the base only
];
const intervals = [
  { name: "B (invented)", base: 10, top: 5 },
  { name: "A (invented)", base: 5, top: 0 },
];

describe("ratesThroughTime", () => {
  const [b, a] = ratesThroughTime(taxa, intervals);

  it("returns one row per interval, in the order given, with its limits", () => {
    expect(b).toMatchObject({ name: "B (invented)", base: 10, top: 5, duration: 5 });
    expect(a).toMatchObject({ name: "A (invented)", base: 5, top: 0, duration: 5 });
  });

  it("counts the classes and taxa of each interval", () => {
    expect(b).toMatchObject({ nbt: 1, nbL: 1, nFt: 1, nFL: 0, nb: 2, nt: 2, taxonCount: 3 });
    expect(a).toMatchObject({ nbt: 0, nbL: 2, nFt: 0, nFL: 0, nb: 2, nt: 0, taxonCount: 2 });
  });

  it("gives q = p = ln 2 where one of two crossers is lost or gained", () => {
    expect(b.q).toBeCloseTo(Math.log(2), 12); // -ln(1/2), hand-worked
    expect(b.p).toBeCloseTo(Math.log(2), 12);
    expect(b.qPerMyr).toBeCloseTo(Math.log(2) / 5, 12);
    expect(b.pPerMyr).toBeCloseTo(Math.log(2) / 5, 12);
    expect(b.proportionalExtinction).toBeCloseTo(1 / 3, 12); // (nbL + nFL) / total = 1/3
    expect(b.proportionalOrigination).toBeCloseTo(1 / 3, 12);
  });

  it("reports null, not NaN or Infinity, for rates the counts cannot give", () => {
    // q: nbt = 0 < nbL = 2 would be -ln 0 = Infinity; p: no top crossers, 0/0.
    expect(a.q).toBeNull();
    expect(a.qPerMyr).toBeNull();
    expect(a.p).toBeNull();
    expect(a.pPerMyr).toBeNull();
    expect(a.proportionalExtinction).toBe(1); // both taxa present are last seen in A
  });

  it("reports null proportions for an interval with no taxa", () => {
    const [empty] = ratesThroughTime(taxa, [{ name: "older (invented)", base: 30, top: 20 }]);
    expect(empty).toMatchObject({ taxonCount: 0, q: null, p: null, proportionalExtinction: null, proportionalOrigination: null });
  });

  it("survives a JSON round trip unchanged (no NaN or Infinity)", () => {
    const rows = ratesThroughTime(taxa, intervals);
    expect(JSON.parse(JSON.stringify(rows))).toEqual(rows);
  });

  it("throws naming the interval whose base is not older than its top, and the taxon with an inverted range", () => {
    expect(() => ratesThroughTime(taxa, [intervals[0], { name: "flipped", base: 1, top: 2 }])).toThrow(/index 1 \(flipped\)/);
    expect(() => ratesThroughTime([{ fad: 1, lad: 2 }], intervals)).toThrow(/index 0: inverted range/);
  });
});
