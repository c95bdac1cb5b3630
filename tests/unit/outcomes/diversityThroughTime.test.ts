import { describe, expect, it } from "vitest";
import { boundaryCrosserRates, diversityThroughTime } from "@shared/outcomes";

// Invented ranges and intervals, counted by hand with the boundary-crosser rules (Foote 2000, Paleobiology
// 26(4) suppl.: 74-102; the class definitions are FROM MEMORY per docs/sources.md section 7): a range crosses an
// age t when fad > t > lad.
const intervals = [
  { name: "C (invented)", base: 15, top: 10 },
  { name: "B (invented)", base: 10, top: 5 },
  { name: "A (invented)", base: 5, top: 0 },
];
const taxa = [
  { fad: 12, lad: 3, group: "infaunal" }, // C: crosses top (first seen in C); B: crosses both; A: crosses base, last seen in A
  { fad: 12, lad: 7, group: "epifaunal" }, // C: crosses top; B: crosses base, last seen in B
  { fad: 8, lad: 3, group: "infaunal" }, // B: first seen, crosses top; A: crosses base, last seen in A
  { fad: 9, lad: 6, group: null }, // B only (single stage)
  { fad: 20, lad: 16 }, // before every interval: counted nowhere
];

describe("diversityThroughTime", () => {
  const result = diversityThroughTime(taxa, intervals);
  const [c, b, a] = result.overall;

  it("counts range-through richness and the crossers at each stage's base and top", () => {
    // C: taxa 1 and 2 reach in (both first seen in C, both cross the top at 10): 2 present, 0 at base, 2 at top
    expect(c).toEqual({ name: "C (invented)", base: 15, top: 10, rangeThrough: 2, crossingBase: 0, crossingTop: 2, firstSeen: 2, lastSeen: 0, singleStage: 0 });
    // B: taxa 1 (nbt), 2 (nbL), 3 (nFt), 4 (nFL): 4 present; base crossers 1 + 2 = 2; top crossers 1 + 3 = 2
    expect(b).toEqual({ name: "B (invented)", base: 10, top: 5, rangeThrough: 4, crossingBase: 2, crossingTop: 2, firstSeen: 2, lastSeen: 2, singleStage: 1 });
    // A: taxa 1 and 3 cross the base at 5 and are last seen in A
    expect(a).toEqual({ name: "A (invented)", base: 5, top: 0, rangeThrough: 2, crossingBase: 2, crossingTop: 0, firstSeen: 0, lastSeen: 2, singleStage: 0 });
  });

  it("agrees with boundaryCrosserRates' counts for every stage", () => {
    for (const stage of result.overall) {
      const rates = boundaryCrosserRates(taxa, stage.base, stage.top);
      expect(stage.rangeThrough).toBe(rates.taxonCount);
      expect(stage.crossingBase).toBe(rates.nb);
      expect(stage.crossingTop).toBe(rates.nt);
    }
  });

  it("splits by group, taxa without a group in a group of their own (null), in order of first appearance", () => {
    expect(result.groups.map((g) => g.group)).toEqual(["infaunal", "epifaunal", null]);
    const [infaunal, epifaunal, none] = result.groups;
    // infaunal: taxa 1 and 3. C: taxon 1 only; B: both; A: both
    expect(infaunal.taxa).toBe(2);
    expect(infaunal.stages.map((s) => s.rangeThrough)).toEqual([1, 2, 2]);
    expect(epifaunal.stages.map((s) => s.rangeThrough)).toEqual([1, 1, 0]);
    // null: taxon 4 (B only) and taxon 5 (no group given, reaches no interval: not counted in `taxa`)
    expect(none.taxa).toBe(1);
    expect(none.stages.map((s) => s.rangeThrough)).toEqual([0, 1, 0]);
  });

  it("adds the groups' counts up to the overall count in every stage", () => {
    for (let k = 0; k < intervals.length; k++) {
      const sum = result.groups.reduce((total, g) => total + g.stages[k].rangeThrough, 0);
      expect(sum).toBe(result.overall[k].rangeThrough);
    }
  });

  it("gives no groups when no taxon carries one", () => {
    expect(diversityThroughTime([{ fad: 12, lad: 3 }], intervals).groups).toEqual([]);
  });

  it("does not count a range that only touches a stage's base (lad = base)", () => {
    // fad 12, lad 10: last seen exactly at the base of B. It crosses no age of B strictly and does not lie within B.
    const [, touching] = diversityThroughTime([{ fad: 12, lad: 10 }], intervals).overall;
    expect(touching.rangeThrough).toBe(0);
  });

  it("throws naming the taxon with an inverted range", () => {
    expect(() => diversityThroughTime([{ fad: 1, lad: 2 }], intervals)).toThrow(/index 0: inverted range/);
  });
});
