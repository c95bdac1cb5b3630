import { describe, expect, it } from "vitest";
import { oddsRatio } from "@shared/stats/oddsRatio";
import { createUniformSource } from "@shared/stats/random";
import type { Table2x2 } from "@shared/stats/types";
import { expectRelativeClose } from "./helpers";

describe("Woolf interval, published example", () => {
  it("2/14 against 1/11 (ORCI Woolf.CI(2, 14, 1, 11) help example; Woolf 1955)", () => {
    // The ORCI call takes (x1, n1, x2, n2), so the table is [[2, 12], [1, 10]].
    const result = oddsRatio([
      [2, 12],
      [1, 10],
    ]);
    expectRelativeClose(result.estimate, 1.6667, 1e-4); // docs/sources.md section 2
    expectRelativeClose(result.ci[0], 0.1310604, 1e-6); // ORCI help page output (docs/sources.md section 2, VERIFIED secondary)
    expectRelativeClose(result.ci[1], 21.1946394, 1e-6); // same
    expect(result.corrected).toBe(false);
  });
});

describe("values from docs/sources.md section 2 (COMPUTED there)", () => {
  it("tea tasting, Woolf and Haldane-Anscombe", () => {
    const tea: Table2x2 = [
      [3, 1],
      [1, 3],
    ];
    const plain = oddsRatio(tea);
    expectRelativeClose(plain.estimate, 9, 1e-12); // sample OR 9.0 (docs/sources.md section 1)
    expectRelativeClose(plain.se, 1.63299, 1e-5);
    expectRelativeClose(plain.ci[0], 0.3666, 1e-3);
    expectRelativeClose(plain.ci[1], 220.93, 1e-4);
    const haldane = oddsRatio(tea, { correction: "always" });
    expect(haldane.corrected).toBe(true);
    expectRelativeClose(haldane.estimate, 5.4444, 1e-4);
    expectRelativeClose(haldane.se, 1.38013, 1e-5);
    expectRelativeClose(haldane.ci[0], 0.3641, 1e-3);
    expectRelativeClose(haldane.ci[1], 81.42, 1e-3);
  });

  it("convictions, Woolf (SE exactly 1) and Haldane-Anscombe", () => {
    const convictions: Table2x2 = [
      [2, 15],
      [10, 3],
    ];
    const plain = oddsRatio(convictions);
    expectRelativeClose(plain.estimate, 0.04, 1e-12);
    expectRelativeClose(plain.se, 1, 1e-14);
    expectRelativeClose(plain.ci[0], 0.005635, 1e-3);
    expectRelativeClose(plain.ci[1], 0.28396, 1e-4);
    const haldane = oddsRatio(convictions, { correction: "always" });
    expectRelativeClose(haldane.estimate, 0.053763, 1e-4);
    expectRelativeClose(haldane.se, 0.919494, 1e-6);
    expectRelativeClose(haldane.ci[0], 0.008868, 1e-3);
    expectRelativeClose(haldane.ci[1], 0.32596, 1e-4);
  });

  it("a zero cell triggers the correction automatically", () => {
    const result = oddsRatio([
      [10, 0],
      [5, 5],
    ]);
    expect(result.corrected).toBe(true);
    expectRelativeClose(result.estimate, 21, 1e-12);
    expectRelativeClose(result.ci[0], 0.9716, 1e-4);
    expectRelativeClose(result.ci[1], 453.91, 1e-5);
  });
});

describe("properties", () => {
  it("swapping rows inverts the odds ratio and mirrors the interval (seeded random tables)", () => {
    const random = createUniformSource(99);
    for (let i = 0; i < 200; i++) {
      const table: Table2x2 = [
        [Math.floor(random() * 50), Math.floor(random() * 50)],
        [Math.floor(random() * 50), Math.floor(random() * 50)],
      ];
      if (table.flat().every((v) => v === 0)) continue;
      const original = oddsRatio(table);
      const swapped = oddsRatio([table[1], table[0]]);
      expectRelativeClose(swapped.estimate, 1 / original.estimate, 1e-12);
      expectRelativeClose(swapped.ci[0], 1 / original.ci[1], 1e-12);
      expectRelativeClose(swapped.se, original.se, 1e-12);
    }
  });

  it("a higher level widens the interval", () => {
    const table: Table2x2 = [
      [12, 5],
      [7, 15],
    ];
    const narrow = oddsRatio(table, { level: 0.9 });
    const wide = oddsRatio(table, { level: 0.99 });
    expect(wide.ci[0]).toBeLessThan(narrow.ci[0]);
    expect(wide.ci[1]).toBeGreaterThan(narrow.ci[1]);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => oddsRatio([[1, -1], [2, 3]])).toThrow("oddsRatio: cell [0][1] is -1; counts must be non-negative integers");
    expect(() => oddsRatio([[1, 0.5], [2, 3]])).toThrow("cell [0][1] is 0.5");
    expect(() => oddsRatio([[0, 0], [0, 0]])).toThrow("all counts are 0");
    expect(() => oddsRatio([[1, 2, 3], [1, 2, 3]] as unknown as Table2x2)).toThrow("must be 2x2");
    expect(() => oddsRatio([[1, 2], [3, 4]], { level: 0 })).toThrow("level is 0");
  });
});
