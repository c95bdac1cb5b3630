import { sampleRankCorrelation } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { createUniformSource } from "@shared/stats/random";
import { spearman } from "@shared/stats/spearman";
import { expectAbsoluteClose } from "./helpers";

describe("R cor.test help example (Hollander & Wolfe 1973 p. 185)", () => {
  // Data and R's result S = 48, rho = 0.6, exact one-sided p = 0.0484 are FROM MEMORY (R's
  // cor.test(x, y, method = "spearman", alternative = "g")). With 9 pairs the p-value is exact here
  // too (every permutation enumerated), so it reproduces R's; two-sided it is twice that.
  const x = [44.4, 45.9, 41.9, 53.3, 44.7, 44.1, 50.7, 45.2, 60.1];
  const y = [2.6, 3.1, 2.5, 5.0, 3.6, 4.0, 5.2, 2.8, 3.8];
  it("rho = 0.6 = 1 - 6 S / (n^3 - n) with S = 48, and R's exact p-value", () => {
    const result = spearman(x, y);
    expectAbsoluteClose(result.rho, 1 - (6 * 48) / (9 * 9 * 9 - 9), 1e-14);
    expect(result.method).toBe("exact-permutation");
    expect(result.df).toBe(7);
    expectAbsoluteClose(spearman(x, y, { alternative: "greater" }).pValue, 0.0484, 5e-5); // R: p-value = 0.0484 (from memory)
    expectAbsoluteClose(result.pValue, 2 * spearman(x, y, { alternative: "greater" }).pValue, 1e-12);
    expect(spearman(x, y, { alternative: "less" }).pValue).toBeGreaterThan(0.9);
  });
});

describe("t approximation above the exact size", () => {
  // 12 pairs: scipy 1.17 spearmanr gives the t-approximation p-value (COMPUTED with the same
  // formula t = rho sqrt(df / (1 - rho^2)) on 10 df; rho cross-checked against simple-statistics below).
  it("says it uses the t approximation and gives rho's t statistic", () => {
    const x = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
    const y = [2, 1, 4, 3, 6, 5, 8, 7, 10, 9, 12, 11];
    const result = spearman(x, y);
    expect(result.method).toBe("t-approximation");
    expectAbsoluteClose(result.statistic, result.rho * Math.sqrt(10 / (1 - result.rho ** 2)), 1e-12);
  });
});

describe("small samples: the exact permutation p-value", () => {
  it("7 perfectly ranked pairs: p = 2/7! two-sided (only the identity and its reverse are as extreme), not 0", () => {
    const result = spearman([1, 2, 3, 4, 5, 6, 7], [10, 20, 25, 80, 81, 90, 99]);
    expect(result.rho).toBe(1);
    expectAbsoluteClose(result.pValue, 2 / 5040, 1e-15); // 7! = 5040 equally likely orderings under no association
  });

  it("with ties, counts every permutation of the tied mid-ranks (4 threatened, 3 not, perfectly ranked)", () => {
    // Categories 1 (threatened) and 0, scores ranked perfectly: the permutation distribution of the
    // 0/1 mid-ranks is that of the Mann-Whitney U; only the C(7,3) = 35 splits matter, 1 of them as
    // extreme on each side, so p = 2/35 two-sided.
    const result = spearman([0.9, 0.8, 0.75, 0.7, 0.3, 0.2, 0.1], [1, 1, 1, 1, 0, 0, 0]);
    expectAbsoluteClose(result.pValue, 2 / 35, 1e-12);
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

  it("perfect monotone association gives rho = 1 and the exact p = 2/5! for 5 pairs", () => {
    const result = spearman([1, 2, 3, 4, 5], [10, 20, 25, 80, 81]);
    expect(result.rho).toBe(1);
    expectAbsoluteClose(result.pValue, 2 / 120, 1e-15);
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
