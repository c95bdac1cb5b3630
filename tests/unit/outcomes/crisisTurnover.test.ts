import { describe, expect, it } from "vitest";
import { crisisTurnover, DEPARTURE_Z } from "@shared/outcomes";

// Robust z = (x - median) / (1.4826 * MAD) of the other stages (Rousseeuw & Croux 1993, J. Am. Stat. Assoc. 88:
// 1273-1283); departure at |z| >= 3.5 (Iglewicz & Hoaglin 1993, How to detect and handle outliers). Invented rates,
// worked by hand in the comments.
describe("crisisTurnover", () => {
  const stages = [
    { q: 0.1, p: 0.9 },
    { q: 0.15, p: 0.7 },
    { q: 0.2, p: 0.7 },
    { q: 0.64, p: 0.72 }, // the crisis stage
    { q: 0.19, p: 0.35 },
    { q: 0.16, p: 0.23 },
    { q: 0.15, p: 0.4 },
  ];

  it("finds extinction, not origination, departing from its background", () => {
    const result = crisisTurnover(stages, 3);
    // q others sorted 0.1, 0.15, 0.15, 0.16, 0.19, 0.2 -> median (0.15 + 0.16) / 2 = 0.155
    // |q - 0.155| sorted 0.005, 0.005, 0.005, 0.035, 0.045, 0.055 -> mad (0.005 + 0.035) / 2 = 0.02
    // z = (0.64 - 0.155) / (1.4826 * 0.02) = 0.485 / 0.029652 = 16.3564
    expect(result.extinction.value).toBe(0.64);
    expect(result.extinction.median).toBeCloseTo(0.155, 12);
    expect(result.extinction.mad).toBeCloseTo(0.02, 12);
    expect(result.extinction.z).toBeCloseTo(16.3564, 3);
    expect(result.extinction.departs).toBe(true);
    // p others sorted 0.23, 0.35, 0.4, 0.7, 0.7, 0.9 -> median (0.4 + 0.7) / 2 = 0.55
    // |p - 0.55| sorted 0.15, 0.15, 0.15, 0.2, 0.32, 0.35 -> mad (0.15 + 0.2) / 2 = 0.175
    // z = (0.72 - 0.55) / (1.4826 * 0.175) = 0.17 / 0.259455 = 0.65522
    expect(result.origination.z).toBeCloseTo(0.65522, 4);
    expect(result.origination.departs).toBe(false);
    expect(result.departing).toBe("extinction");
    expect(result.sentence).toMatch(/extinction departs from its background \(z = 16\.4, above the median of 6 other stages\)/);
    expect(result.sentence).toMatch(/origination stays within its background \(z = 0\.7, against 6 other stages\)/);
  });

  it("reads a depressed origination as departing too (|z|), and says it lies below", () => {
    // p others 0.5, 0.6, 0.7, 0.8, 0.9, 0.6 -> sorted 0.5, 0.6, 0.6, 0.7, 0.8, 0.9 -> median 0.65
    // |p - 0.65| sorted 0.05, 0.05, 0.05, 0.15, 0.15, 0.25 -> mad (0.05 + 0.15) / 2 = 0.1
    // z = (0.05 - 0.65) / 0.14826 = -4.04694 -> |z| >= 3.5
    const depressed = [0.5, 0.6, 0.7, 0.05, 0.8, 0.9, 0.6].map((p) => ({ q: 0.2, p }));
    const result = crisisTurnover(depressed, 3);
    expect(result.origination.z).toBeCloseTo(-4.04694, 4);
    expect(result.origination.departs).toBe(true);
    // every q is 0.2: mad 0, no z
    expect(result.extinction.z).toBeNull();
    expect(result.departing).toBe("origination");
    expect(result.sentence).toMatch(/origination departs from its background \(z = -4\.0, below/);
    expect(result.sentence).toMatch(/extinction cannot be compared with its background \(the other stages' rates do not vary/);
  });

  it("says plainly when there are too few stages, or the crisis rate is undefined", () => {
    const few = crisisTurnover([{ q: 0.1, p: 0.2 }, { q: 0.2, p: 0.3 }, { q: 0.9, p: 0.1 }, { q: 0.15, p: 0.25 }], 2);
    expect(few.departing).toBe("not assessable");
    expect(few.extinction).toMatchObject({ z: null, n: 3, departs: null });
    expect(few.sentence).toMatch(/only 3 other stages have a rate \(5 are needed\)/);
    const undefinedRate = crisisTurnover([{ q: 0.1, p: 0.2 }, { q: null, p: null }, { q: 0.2, p: 0.3 }], 1);
    expect(undefinedRate.extinction.value).toBeNull();
    expect(undefinedRate.sentence).toMatch(/its rate is undefined in this stage/);
  });

  it("uses the 3.5 cut-off of Iglewicz & Hoaglin (1993)", () => {
    expect(DEPARTURE_Z).toBe(3.5); // Iglewicz & Hoaglin 1993, recommended cut-off for the modified z-score (from memory)
  });
});
