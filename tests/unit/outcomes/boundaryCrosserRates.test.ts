import { describe, expect, it } from "vitest";
import { boundaryCrosserRates } from "@shared/outcomes";

// Invented ranges, repeated `count` times, to build taxa with chosen boundary-crosser counts.
function repeat(count: number, range: { fad: number; lad: number }) {
  return Array.from({ length: count }, () => ({ ...range }));
}

// An invented interval from 10 Ma (base) to 5 Ma (top), 5 Myr long.
const BASE = 10;
const TOP = 5;

describe("boundaryCrosserRates: Foote (2000) synthetic example", () => {
  // Check values: docs/sources.md section 7, "Illustrative numbers (COMPUTED, synthetic)": Nbt = 60, NbL = 40,
  // NFt = 15, NFL = 10 give q = -ln 0.6 = 0.5108, p = -ln 0.8 = 0.2231, proportional extinction 50/125 = 0.40.
  // The formulas behind them (Foote 2000, Paleobiology 26(4) suppl.: 74-102) are FROM MEMORY per that file:
  // Foote's Table 1 was not read. So this checks the computation against a derived, not a published, value.
  const taxa = [
    ...repeat(60, { fad: 12, lad: 3 }), // cross base and top
    ...repeat(40, { fad: 12, lad: 7 }), // cross the base, last seen inside
    ...repeat(15, { fad: 8, lad: 3 }), // first seen inside, cross the top
    ...repeat(10, { fad: 9, lad: 6 }), // first and last seen inside
  ];
  const rates = boundaryCrosserRates(taxa, BASE, TOP);

  it("counts the four classes", () => {
    expect(rates).toMatchObject({ nbt: 60, nbL: 40, nFt: 15, nFL: 10, nb: 100, nt: 75, taxonCount: 125, duration: 5 });
  });
  it("gives q = 0.5108 and p = 0.2231 per interval", () => {
    expect(rates.q).toBeCloseTo(0.5108, 4); // docs/sources.md section 7, -ln 0.6 (formula FROM MEMORY)
    expect(rates.p).toBeCloseTo(0.2231, 4); // docs/sources.md section 7, -ln 0.8 (formula FROM MEMORY)
  });
  it("divides by the interval's length for rates per Myr", () => {
    // docs/sources.md section 7: q-hat = -ln(Nbt/Nb) / Δt with Nbt/Nb = 0.6, p-hat with Nbt/Nt = 0.8 (formulas FROM MEMORY); Δt = 5 Myr.
    expect(rates.qPerMyr).toBeCloseTo(-Math.log(0.6) / 5, 12);
    expect(rates.pPerMyr).toBeCloseTo(-Math.log(0.8) / 5, 12);
  });
  it("gives proportional extinction 0.40", () => {
    expect(rates.proportionalExtinction).toBeCloseTo(0.4, 12); // docs/sources.md section 7, 50/125
    expect(rates.proportionalOrigination).toBeCloseTo(25 / 125, 12); // docs/sources.md section 7: (NFt + NFL)/Ntot
  });
});

describe("boundaryCrosserRates: edges of the classes (hand-worked, invented ranges)", () => {
  it("treats a range ending exactly at the top as not crossing it (nbL), and one starting exactly at the base as not crossing it", () => {
    // fad == base: does not cross the base (crossing is strict); lad == top: does not cross the top.
    expect(boundaryCrosserRates([{ fad: 12, lad: 5 }], BASE, TOP)).toMatchObject({ nbt: 0, nbL: 1, nFt: 0, nFL: 0 });
    expect(boundaryCrosserRates([{ fad: 10, lad: 3 }], BASE, TOP)).toMatchObject({ nbt: 0, nbL: 0, nFt: 1, nFL: 0 });
    expect(boundaryCrosserRates([{ fad: 10, lad: 5 }], BASE, TOP)).toMatchObject({ nbt: 0, nbL: 0, nFt: 0, nFL: 1 });
  });
  it("counts nothing for ranges outside the interval or only touching it", () => {
    const outside = [
      { fad: 20, lad: 15 }, // wholly older
      { fad: 4, lad: 1 }, // wholly younger
      { fad: 12, lad: 10 }, // ends at the base
      { fad: 5, lad: 2 }, // starts at the top
    ];
    expect(boundaryCrosserRates(outside, BASE, TOP)).toMatchObject({ nbt: 0, nbL: 0, nFt: 0, nFL: 0, taxonCount: 0 });
  });
  it("gives NaN rates with no crossers and Infinity when every crosser is lost, as the formulas do", () => {
    const noCrossers = boundaryCrosserRates([{ fad: 9, lad: 6 }], BASE, TOP);
    expect(noCrossers.q).toBeNaN(); // -ln(0/0)
    expect(noCrossers.p).toBeNaN();
    expect(noCrossers.proportionalExtinction).toBe(1);
    const allLost = boundaryCrosserRates([{ fad: 12, lad: 7 }], BASE, TOP);
    expect(allLost.q).toBe(Infinity); // -ln(0/1)
    expect(boundaryCrosserRates([], BASE, TOP).proportionalExtinction).toBeNaN();
  });
  it("gives zero rates when every crosser crosses both limits", () => {
    const rates = boundaryCrosserRates(repeat(3, { fad: 12, lad: 3 }), BASE, TOP);
    expect(rates.q).toBe(0);
    expect(rates.p).toBe(0);
    expect(rates.proportionalExtinction).toBe(0);
  });
  it("matches its documented example", () => {
    // Hand-worked: nbt 2, nbL 1, nFt 1, nFL 1; q = p = -ln(2/3) = ln 1.5 = 0.405465.
    const rates = boundaryCrosserRates(
      [{ fad: 12, lad: 3 }, { fad: 12, lad: 3 }, { fad: 12, lad: 7 }, { fad: 8, lad: 3 }, { fad: 9, lad: 6 }],
      BASE,
      TOP,
    );
    expect(rates).toMatchObject({ nbt: 2, nbL: 1, nFt: 1, nFL: 1 });
    expect(rates.q).toBeCloseTo(0.405465, 6);
    expect(rates.qPerMyr).toBeCloseTo(0.081093, 6);
  });
  it("throws on an inverted range naming its index, and on base <= top", () => {
    expect(() => boundaryCrosserRates([{ fad: 12, lad: 3 }, { fad: 3, lad: 12 }], BASE, TOP)).toThrow(/index 1: inverted range/);
    expect(() => boundaryCrosserRates([], 5, 10)).toThrow(/older \(larger\) than top/);
    expect(() => boundaryCrosserRates([], 5, 5)).toThrow(/older \(larger\) than top/);
  });
});
