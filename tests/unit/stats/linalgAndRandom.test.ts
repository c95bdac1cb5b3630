import { describe, expect, it } from "vitest";
import { chiSquareUpperTail } from "@shared/stats/distributions";
import { choleskyDecompose, choleskyInverse, choleskyLogDeterminant, choleskySolve } from "@shared/stats/linalg";
import { createUniformSource } from "@shared/stats/random";
import { brentRoot, increasingRoot } from "@shared/stats/roots";
import { expectAbsoluteClose } from "./helpers";

describe("Cholesky factorisation", () => {
  // The textbook 3x3 example A = [[4, 12, -16], [12, 37, -43], [-16, -43, 98]] with
  // L = [[2, 0, 0], [6, 1, 0], [-8, 5, 3]] (from memory; the product L L' = A is checked below).
  const a = Float64Array.from([4, 12, -16, 12, 37, -43, -16, -43, 98]);
  const lower = new Float64Array(9);

  it("factors, solves, inverts and gives the log-determinant", () => {
    expect(choleskyDecompose(a, 3, lower)).toBe(-1);
    expect(Array.from(lower)).toEqual([2, 0, 0, 6, 1, 0, -8, 5, 3]);
    // L L' reproduces A.
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        let sum = 0;
        for (let k = 0; k < 3; k++) sum += lower[i * 3 + k] * lower[j * 3 + k];
        expect(sum).toBe(a[i * 3 + j]);
      }
    }
    expectAbsoluteClose(choleskyLogDeterminant(lower, 3), Math.log(36), 1e-14); // det = (2 * 1 * 3)^2
    const inverse = choleskyInverse(lower, 3);
    for (let i = 0; i < 3; i++) {
      for (let j = 0; j < 3; j++) {
        let sum = 0;
        for (let k = 0; k < 3; k++) sum += a[i * 3 + k] * inverse[k * 3 + j];
        expectAbsoluteClose(sum, i === j ? 1 : 0, 1e-12);
      }
    }
    const x = choleskySolve(lower, 3, [1, 2, 3], new Float64Array(3));
    for (let i = 0; i < 3; i++) expectAbsoluteClose(a[i * 3] * x[0] + a[i * 3 + 1] * x[1] + a[i * 3 + 2] * x[2], i + 1, 1e-11);
  });

  it("reports the first dependent column", () => {
    // Column 2 = column 0 + column 1 (invented).
    const singular = Float64Array.from([2, 1, 3, 1, 2, 3, 3, 3, 6]);
    expect(choleskyDecompose(singular, 3, new Float64Array(9), 1e-10)).toBe(2);
  });
});

describe("seeded uniform stream", () => {
  it("repeats exactly for a seed and differs between seeds", () => {
    const first = createUniformSource(42);
    const second = createUniformSource(42);
    const other = createUniformSource(43);
    const a = Array.from({ length: 100 }, () => first());
    expect(Array.from({ length: 100 }, () => second())).toEqual(a);
    expect(Array.from({ length: 100 }, () => other())).not.toEqual(a);
    expect(a.every((u) => u >= 0 && u < 1)).toBe(true);
  });

  it("passes a chi-square test of uniformity on 20 bins (common practice, no source)", () => {
    const random = createUniformSource(7);
    const bins = new Array(20).fill(0);
    const draws = 100_000;
    for (let i = 0; i < draws; i++) bins[Math.floor(random() * 20)]++;
    const expected = draws / 20;
    const statistic = bins.reduce((s, count) => s + (count - expected) ** 2 / expected, 0);
    expect(chiSquareUpperTail(statistic, 19)).toBeGreaterThan(0.001);
  });
});

describe("root finding", () => {
  it("Brent's method finds a bracketed root", () => {
    expectAbsoluteClose(brentRoot((x) => x * x - 2, 0, 2), Math.SQRT2, 1e-12);
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow("no bracketed root");
  });

  it("expands a bracket for an increasing function and reports a root beyond the limit as infinite", () => {
    expectAbsoluteClose(increasingRoot((x) => x - 300, -1, 1), 300, 1e-9);
    expectAbsoluteClose(increasingRoot((x) => Math.exp(x) - 1e-30, -1, 1), Math.log(1e-30), 1e-9);
    expect(increasingRoot(() => -1, -1, 1)).toBe(Infinity);
  });
});
