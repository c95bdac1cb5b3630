import { sampleRankCorrelation } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { createUniformSource } from "@shared/stats/random";
import { spearman } from "@shared/stats/spearman";
import { expectAbsoluteClose } from "./helpers";

describe("R cor.test help example (Hollander & Wolfe 1973 p. 185)", () => {
  // Data and R's result S = 48, rho = 0.6 are FROM MEMORY (R prints an exact one-sided p = 0.0484,
  // which this t approximation does not reproduce). p-values below: scipy 1.17 spearmanr, which
  // uses the same t approximation (COMPUTED).
  const x = [44.4, 45.9, 41.9, 53.3, 44.7, 44.1, 50.7, 45.2, 60.1];
  const y = [2.6, 3.1, 2.5, 5.0, 3.6, 4.0, 5.2, 2.8, 3.8];
  it("rho = 0.6 = 1 - 6 S / (n^3 - n) with S = 48", () => {
    const result = spearman(x, y);
    expectAbsoluteClose(result.rho, 1 - (6 * 48) / (9 * 9 * 9 - 9), 1e-14);
    expectAbsoluteClose(result.pValue, 0.08762282904140249, 1e-12);
    expect(result.method).toBe("t-approximation");
    expect(result.df).toBe(7);
    expectAbsoluteClose(spearman(x, y, { alternative: "greater" }).pValue, 0.043811414520701246, 1e-12);
    expectAbsoluteClose(spearman(x, y, { alternative: "less" }).pValue, 1 - 0.043811414520701246, 1e-12);
  });
});

describe("cross-check with simple-statistics' sampleRankCorrelation (seeded random data with ties)", () => {
  it("gives the same rho", () => {
    const random = createUniformSource(1904);
    let compared = 0;
    for (let trial = 0; trial < 100; trial++) {
      const n = 3 + Math.floor(random() * 50);
      const x = Array.from({ length: n }, () => Math.floor(random() * 10));
      const y = x.map((v) => Math.floor(v * random() * 3 + random() * 5));
      if (new Set(x).size < 2 || new Set(y).size < 2) continue;
      const result = spearman(x, y);
      expectAbsoluteClose(result.rho, sampleRankCorrelation(x, y), 1e-12);
      expect(result.pValue).toBeGreaterThanOrEqual(0);
      expect(result.pValue).toBeLessThanOrEqual(1);
      compared++;
    }
    expect(compared).toBeGreaterThanOrEqual(80);
  });

  it("perfect monotone association gives rho = 1 and p = 0", () => {
    const result = spearman([1, 2, 3, 4, 5], [10, 20, 25, 80, 81]);
    expect(result.rho).toBe(1);
    expect(result.pValue).toBe(0);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => spearman([1, 2, 3], [1, 2])).toThrow("spearman: y has 2 values but 3 were expected");
    expect(() => spearman([1, 2], [1, 2])).toThrow("2 pairs; at least 3 are needed");
    expect(() => spearman([1, Infinity, 3], [1, 2, 3])).toThrow("x[1] is Infinity");
    expect(() => spearman([4, 4, 4], [1, 2, 3])).toThrow("x is constant");
  });
});
