import { describe, expect, it } from "vitest";
import { threeTimerRates } from "@shared/occurrences";

// The formulas are Alroy's three-timer method (Alroy 2008, Dynamics of origination and extinction in the
// marine fossil record, PNAS 105 suppl. 1: 11536-11542; docs/sources.md section 7), as written in shared/occurrences/threeTimerRates.ts:
//   samplingCompleteness = t3 / (t3 + pt); extinction = ln(t2Below / t3) + ln(Ps); origination = ln(t2Above / t3) + ln(Ps).
// FROM MEMORY: Alroy writes the three-timer extinction rate as log(2t_i / 3t_i) + log(Ps); the module's form
// is the same. The paper's own numbers were not read, so the checks are hand-worked from invented finds.

const BINS = [
  { name: "A", baseMa: 40, topMa: 30 },
  { name: "B", baseMa: 30, topMa: 20 },
  { name: "C", baseMa: 20, topMa: 10 },
  { name: "D", baseMa: 10, topMa: 0 },
];
// A find at the middle of a bin, by bin letter.
const MID: Record<string, number> = { A: 35, B: 25, C: 15, D: 5 };
function sampledIn(taxon: string, letters: string): Array<{ taxon: string; maxMa: number; minMa: number }> {
  return [...letters].map((letter) => ({ taxon, maxMa: MID[letter]!, minMa: MID[letter]! }));
}

describe("threeTimerRates: hand-worked counts and rates", () => {
  // Sampling patterns over A B C D (x = sampled):
  //   t1 ABCD  t2 ABC  t3 AB.D  t4 A.C  t5 .BCD  t6 ..CD  t7 A.CD  t8 .B..
  const finds = [
    ...sampledIn("t1", "ABCD"),
    ...sampledIn("t2", "ABC"),
    ...sampledIn("t3", "ABD"),
    ...sampledIn("t4", "AC"),
    ...sampledIn("t5", "BCD"),
    ...sampledIn("t6", "CD"),
    ...sampledIn("t7", "ACD"),
    ...sampledIn("t8", "B"),
  ];
  const rows = threeTimerRates(finds, BINS);

  it("returns one row per bin, in order", () => {
    expect(rows.map((r) => r.bin)).toEqual(["A", "B", "C", "D"]);
  });

  it("gives zero counts and null rates in the first and last bins (a neighbour is missing)", () => {
    // A has no bin before it: t3 = pt = t2Below = 0. t2Above(A) = sampled in A and B = t1, t2, t3 = 3.
    expect(rows[0]).toMatchObject({ t3: 0, partTimers: 0, t2Below: 0, t2Above: 3, samplingCompleteness: null, extinction: null, origination: null });
    // D has no bin after it: t2Below(D) = sampled in C and D = t1, t5, t6, t7 = 4.
    expect(rows[3]).toMatchObject({ t3: 0, partTimers: 0, t2Below: 4, t2Above: 0, samplingCompleteness: null, extinction: null, origination: null });
  });

  it("counts bin B", () => {
    // B: three-timers (A, B, C) = t1, t2 -> 2; part-timers (A and C, not B) = t4, t7 -> 2;
    // t2Below (A and B) = t1, t2, t3 -> 3; t2Above (B and C) = t1, t2, t5 -> 3; sampled in B = t1 t2 t3 t5 t8 -> 5.
    expect(rows[1]).toMatchObject({ t3: 2, partTimers: 2, t2Below: 3, t2Above: 3, sampled: 5 });
    // Ps = 2 / (2 + 2) = 0.5; extinction = ln(3/2) + ln(0.5) = ln(0.75) = -0.287682; origination the same.
    expect(rows[1]!.samplingCompleteness).toBeCloseTo(0.5, 12);
    expect(rows[1]!.extinction).toBeCloseTo(Math.log(0.75), 12);
    expect(rows[1]!.extinction).toBeCloseTo(-0.287682, 6);
    expect(rows[1]!.origination).toBeCloseTo(-0.287682, 6);
  });

  it("counts bin C", () => {
    // C: three-timers (B, C, D) = t1, t5 -> 2; part-timers (B and D, not C) = t3 -> 1;
    // t2Below (B and C) = t1, t2, t5 -> 3; t2Above (C and D) = t1, t5, t6, t7 -> 4.
    expect(rows[2]).toMatchObject({ t3: 2, partTimers: 1, t2Below: 3, t2Above: 4 });
    // Ps = 2/3 = 0.666667; extinction = ln(3/2) + ln(2/3) = 0; origination = ln(4/2) + ln(2/3) = ln(4/3) = 0.287682.
    expect(rows[2]!.samplingCompleteness).toBeCloseTo(2 / 3, 12);
    expect(rows[2]!.extinction).toBeCloseTo(0, 12);
    expect(rows[2]!.origination).toBeCloseTo(0.287682, 6);
  });

  it("agrees with the formulas written out from the counts (a check of the rate formulas)", () => {
    for (const row of rows.slice(1, 3)) {
      const ps = row.t3 / (row.t3 + row.partTimers);
      expect(row.samplingCompleteness).toBeCloseTo(ps, 12);
      expect(row.extinction).toBeCloseTo(Math.log(row.t2Below / row.t3) + Math.log(ps), 12);
      expect(row.origination).toBeCloseTo(Math.log(row.t2Above / row.t3) + Math.log(ps), 12);
      // Equivalent closed form: ln(t2 / (t3 + pt)), since ln(t2/t3) + ln(t3/(t3+pt)) = ln(t2/(t3+pt)).
      expect(row.extinction).toBeCloseTo(Math.log(row.t2Below / (row.t3 + row.partTimers)), 12);
    }
  });
});

describe("threeTimerRates: bin membership", () => {
  it("counts an occurrence only in a bin that holds its whole age range, within 1e-9", () => {
    const rows = threeTimerRates(
      [
        { taxon: "p", maxMa: 30, minMa: 20 }, // exactly bin B: in B
        { taxon: "q", maxMa: 30 + 5e-10, minMa: 20 - 5e-10 }, // overhangs by 5e-10 on both sides: still in B
        { taxon: "r", maxMa: 30 + 1e-6, minMa: 25 }, // overhangs by 1e-6 into A: straddles, in no bin
        { taxon: "s", maxMa: 35, minMa: 15 }, // spans A to C: in no bin
      ],
      BINS,
    );
    expect(rows.map((r) => r.occurrences)).toEqual([0, 2, 0, 0]);
    expect(rows.map((r) => r.sampled)).toEqual([0, 2, 0, 0]);
  });
  it("puts a find dated exactly to a shared limit inside both bins (its whole range lies in each)", () => {
    const rows = threeTimerRates([{ taxon: "u", maxMa: 30, minMa: 30 }], BINS);
    expect(rows.map((r) => r.sampled)).toEqual([1, 1, 0, 0]);
  });
  it("counts a taxon once per bin however many finds it has there, and matches names after trimming", () => {
    const rows = threeTimerRates(
      [
        { taxon: "v", maxMa: 35, minMa: 34 },
        { taxon: " v ", maxMa: 33, minMa: 31 },
        { taxon: "v", maxMa: 25, minMa: 25 },
        { taxon: "", maxMa: 25, minMa: 25 },
      ],
      BINS,
    );
    expect(rows[0]).toMatchObject({ sampled: 1, occurrences: 2, t2Above: 1 });
    expect(rows[1]).toMatchObject({ sampled: 1, t2Below: 1 });
  });
});

describe("threeTimerRates: undefined rates are null", () => {
  it("gives null completeness with neither three- nor part-timers, and null rates with no three-timers", () => {
    // Only part-timers in B: w in A and C. Ps = 0 / (0 + 1) = 0; ln(0) undefined -> rates null.
    const rows = threeTimerRates(sampledIn("w", "AC"), BINS);
    expect(rows[1]).toMatchObject({ t3: 0, partTimers: 1, samplingCompleteness: 0, extinction: null, origination: null });
    // C: w in B? no; t3 = pt = 0: completeness 0/0 -> null.
    expect(rows[2]!.samplingCompleteness).toBeNull();
  });
  it("never gives null for a defined zero rate", () => {
    // Every taxon in A, B, C: t3 = t2Below = t2Above = 2, pt = 0: Ps = 1, rates ln(1) + ln(1) = 0.
    const rows = threeTimerRates([...sampledIn("a", "ABC"), ...sampledIn("b", "ABC")], BINS.slice(0, 3));
    expect(rows[1]).toMatchObject({ t3: 2, partTimers: 0, samplingCompleteness: 1, extinction: 0, origination: 0 });
  });
  it("gives empty rows for no occurrences and nothing for no bins", () => {
    expect(threeTimerRates([], BINS).every((r) => r.t3 === 0 && r.samplingCompleteness === null)).toBe(true);
    expect(threeTimerRates(sampledIn("a", "AB"), [])).toEqual([]);
  });
});

describe("threeTimerRates: bad input", () => {
  it("throws for maxMa < minMa, naming the occurrence's index", () => {
    expect(() => threeTimerRates([{ taxon: "a", maxMa: 5, minMa: 5 }, { taxon: "a", maxMa: 5, minMa: 6 }], BINS)).toThrow(/occurrence 1\b/);
  });
  it("throws for bins given youngest first or with base not older than top", () => {
    expect(() => threeTimerRates([], [...BINS].reverse())).toThrow(/oldest first/);
    expect(() => threeTimerRates([], [{ name: "X", baseMa: 5, topMa: 5 }])).toThrow(/base 5 Ma/);
  });
});
