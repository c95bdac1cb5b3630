import { describe, expect, it } from "vitest";
import { twoSidedCriticalValue } from "@shared/stats/distributions";
import { createUniformSource } from "@shared/stats/random";
import { wilsonInterval } from "@shared/stats/wilsonInterval";
import { expectAbsoluteClose } from "./helpers";

describe("Newcombe (1998) examples, Wilson score method", () => {
  // Newcombe, R.G. (1998) Two-sided confidence intervals for the single proportion: comparison of
  // seven methods. Statistics in Medicine 17: 857-872, worked examples table (FROM MEMORY; the
  // closed form reproduces every value to 4 decimals).
  const cases: Array<[number, number, number, number]> = [
    [81, 263, 0.2553, 0.3662],
    [15, 148, 0.0624, 0.1605],
    [0, 20, 0, 0.1611],
    [1, 29, 0.0061, 0.1718],
  ];
  it.each(cases)("%i of %i", (x, n, lower, upper) => {
    const [lo, hi] = wilsonInterval(x, n);
    expectAbsoluteClose(lo, lower, 5e-5);
    expectAbsoluteClose(hi, upper, 5e-5);
  });
});

describe("independent check: the limits solve the score equation", () => {
  it("|x/n - p| = z sqrt(p(1 - p)/n) at both limits (Wilson 1927 definition; seeded random inputs)", () => {
    const random = createUniformSource(5);
    for (let i = 0; i < 200; i++) {
      const n = 1 + Math.floor(random() * 500);
      const x = Math.floor(random() * (n + 1));
      const level = 0.8 + random() * 0.19;
      const z = twoSidedCriticalValue(level);
      for (const p of wilsonInterval(x, n, { level })) {
        if (p === 0 || p === 1) continue; // boundary limits at x = 0 or x = n
        expectAbsoluteClose(Math.abs(x / n - p), z * Math.sqrt((p * (1 - p)) / n), 1e-12);
      }
    }
  });

  it("reaches exactly 0 and 1 at the ends", () => {
    expect(wilsonInterval(0, 10)[0]).toBe(0);
    expect(wilsonInterval(10, 10)[1]).toBe(1);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => wilsonInterval(-1, 10)).toThrow("wilsonInterval: successes is -1; counts must be non-negative integers");
    expect(() => wilsonInterval(2.5, 10)).toThrow("successes is 2.5");
    expect(() => wilsonInterval(11, 10)).toThrow("successes (11) exceed n (10)");
    expect(() => wilsonInterval(0, 0)).toThrow("n is 0");
    expect(() => wilsonInterval(1, NaN)).toThrow("n is NaN");
    expect(() => wilsonInterval(1, 10, { level: 95 })).toThrow("level is 95");
  });
});
