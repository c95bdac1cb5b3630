import { describe, expect, it } from "vitest";
import { median as referenceMedian, medianAbsoluteDeviation as referenceMad } from "simple-statistics";
import { backgroundContrast } from "@shared/outcomes";

// The robust z: (x - median) / (1.4826 * MAD) of the other values. 1.4826 = 1 / Phi^-1(0.75) (Rousseeuw &
// Croux 1993, J. Am. Stat. Assoc. 88: 1273-1283); Phi^-1(0.75) = 0.674490 (standard normal table), and
// 1 / 0.674490 = 1.482602. The arithmetic of every case below is worked by hand in its comment.

describe("backgroundContrast: hand-worked cases", () => {
  it("scores a crisis value far above five background values (the doc comment's example)", () => {
    // others (index 5 left out): 0.1, 0.2, 0.3, 0.2, 0.4 -> sorted 0.1, 0.2, 0.2, 0.3, 0.4 -> median 0.2
    // |x - 0.2|: 0.1, 0, 0.1, 0, 0.2 -> sorted 0, 0, 0.1, 0.1, 0.2 -> mad 0.1
    // z = (1.5 - 0.2) / (1.4826 * 0.1) = 1.3 / 0.14826 = 8.76838
    const result = backgroundContrast([0.1, 0.2, 0.3, 0.2, 0.4, 1.5], 5);
    expect(result.n).toBe(5);
    expect(result.median).toBeCloseTo(0.2, 12);
    expect(result.mad).toBeCloseTo(0.1, 12);
    expect(result.z).toBeCloseTo(8.76838, 4);
  });

  it("takes the value out of its own background wherever it sits, and gives a negative z below the median", () => {
    // values 4, 1, 2, 3, 5, 6, index 1 (value 1); others 4, 2, 3, 5, 6 -> sorted 2, 3, 4, 5, 6 -> median 4
    // |x - 4|: 0, 2, 1, 1, 2 -> sorted 0, 1, 1, 2, 2 -> mad 1
    // z = (1 - 4) / (1.4826 * 1) = -3 / 1.4826 = -2.02347
    const result = backgroundContrast([4, 1, 2, 3, 5, 6], 1);
    expect(result).toMatchObject({ median: 4, mad: 1, n: 5 });
    expect(result.z).toBeCloseTo(-2.02347, 4);
  });

  it("averages the two middle values for an even number of others", () => {
    // values 10, 1, 2, 3, 4, 5, 6, index 0; others 1..6 -> median (3 + 4) / 2 = 3.5
    // |x - 3.5|: 2.5, 1.5, 0.5, 0.5, 1.5, 2.5 -> sorted 0.5, 0.5, 1.5, 1.5, 2.5, 2.5 -> mad (1.5 + 1.5) / 2 = 1.5
    // z = (10 - 3.5) / (1.4826 * 1.5) = 6.5 / 2.2239 = 2.92279
    const result = backgroundContrast([10, 1, 2, 3, 4, 5, 6], 0);
    expect(result).toMatchObject({ median: 3.5, mad: 1.5, n: 6 });
    expect(result.z).toBeCloseTo(2.92279, 4);
  });

  it("gives z = 0 for a value at the median of its background", () => {
    // others 1, 2, 4, 5, 6 -> median 4; |x - 4|: 3, 2, 0, 1, 2 -> sorted 0, 1, 2, 2, 3 -> mad 2; z = (4 - 4) / 2.9652 = 0
    const result = backgroundContrast([1, 2, 4, 5, 6, 4], 5);
    expect(result).toMatchObject({ median: 4, mad: 2, n: 5, z: 0 });
  });
});

describe("backgroundContrast: missing and degenerate values", () => {
  it("drops null, NaN and infinite others, and counts only those used", () => {
    // others kept: 0.1, 0.2, 0.3, 0.2, 0.4 (null, NaN, Infinity, -Infinity dropped) -> as in the first case
    const result = backgroundContrast([0.1, null, 0.2, Number.NaN, 0.3, Infinity, 0.2, -Infinity, 0.4, 1.5], 9);
    expect(result.n).toBe(5);
    expect(result.median).toBeCloseTo(0.2, 12);
    expect(result.mad).toBeCloseTo(0.1, 12);
    expect(result.z).toBeCloseTo(8.76838, 4);
  });

  it("gives z null for a null, NaN or infinite value of its own, but still the background's median and mad", () => {
    for (const own of [null, Number.NaN, Infinity, -Infinity]) {
      // others 1, 2, 3, 4, 5 -> median 3; |x - 3|: 2, 1, 0, 1, 2 -> mad 1
      const result = backgroundContrast([1, 2, 3, 4, 5, own], 5);
      expect(result).toEqual({ z: null, median: 3, mad: 1, n: 5 });
    }
  });

  it("gives z null with fewer than 5 others, and a z from exactly 5", () => {
    // four others 1, 2, 3, 4 -> median 2.5; |x - 2.5|: 1.5, 0.5, 0.5, 1.5 -> mad (0.5 + 1.5) / 2 = 1
    expect(backgroundContrast([1, 2, 3, 4, 9], 4)).toEqual({ z: null, median: 2.5, mad: 1, n: 4 });
    // a null among six values leaves four others: still too few
    expect(backgroundContrast([1, 2, null, 3, 4, 9], 5)).toMatchObject({ z: null, n: 4 });
    // five others 1, 2, 3, 4, 5 -> median 3, mad 1; z = (9 - 3) / 1.4826 = 4.04694
    expect(backgroundContrast([1, 2, 3, 4, 5, 9], 5).z).toBeCloseTo(4.04694, 4);
  });

  it("gives z null when the mad is 0 (half or more of the others equal)", () => {
    // others 0.2, 0.2, 0.2, 0.5, 0.9 -> median 0.2; |x - 0.2|: 0, 0, 0, 0.3, 0.7 -> mad 0
    expect(backgroundContrast([0.2, 0.2, 0.2, 0.5, 0.9, 3], 5)).toEqual({ z: null, median: 0.2, mad: 0, n: 5 });
    // all others 0 (no loss in any background stage)
    expect(backgroundContrast([0, 0, 0, 0, 0, 0, 1], 6)).toEqual({ z: null, median: 0, mad: 0, n: 6 });
  });

  it("gives median and mad null when no other value remains", () => {
    expect(backgroundContrast([0.7], 0)).toEqual({ z: null, median: null, mad: null, n: 0 });
    expect(backgroundContrast([null, Number.NaN, 0.7], 2)).toEqual({ z: null, median: null, mad: null, n: 0 });
    expect(backgroundContrast([], 0)).toEqual({ z: null, median: null, mad: null, n: 0 });
  });

  it("gives one other value as its own median with mad 0 and no z", () => {
    expect(backgroundContrast([0.3, 0.9], 1)).toEqual({ z: null, median: 0.3, mad: 0, n: 1 });
  });

  it("treats an index outside the array as a missing value of its own: all values are background", () => {
    // others 1, 2, 3, 4, 5 -> median 3, mad 1
    expect(backgroundContrast([1, 2, 3, 4, 5], 7)).toEqual({ z: null, median: 3, mad: 1, n: 5 });
  });

  it("does not reorder the caller's array", () => {
    const values = [5, 1, 4, 2, 3, 9];
    backgroundContrast(values, 5);
    expect(values).toEqual([5, 1, 4, 2, 3, 9]);
  });
});

describe("backgroundContrast: against simple-statistics (reference library on npm)", () => {
  // simple-statistics' median and medianAbsoluteDeviation (unscaled, as in the contract) on the same others.
  const values = [0.31, 0.12, 0.47, 0.22, 0.05, 0.39, 0.18, 1.24, 0.27, 0.33, 0.09];
  const index = 7;
  const others = values.filter((_, position) => position !== index);

  it("matches the reference median and MAD, and z follows from them", () => {
    const result = backgroundContrast(values, index);
    const median = referenceMedian(others);
    const mad = referenceMad(others);
    expect(result.n).toBe(10);
    expect(result.median).toBeCloseTo(median, 12);
    expect(result.mad).toBeCloseTo(mad, 12);
    expect(result.z).toBeCloseTo((values[index] - median) / (1.4826 * mad), 10);
  });
});
