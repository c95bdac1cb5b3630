import { describe, expect, it } from "vitest";
import { logPrefixSums } from "@shared/stats/logPrefixSums";

describe("logPrefixSums", () => {
  it("gives ln of the running sums of count * weight (derived check, arithmetic)", () => {
    const sums = logPrefixSums([0, Math.log(2), Math.log(0.5)], [1, 3, 4]);
    // 1; 1 + 3 x 2 = 7; 7 + 4 x 0.5 = 9.
    expect(Array.from(sums, Math.exp).map((v) => Number(v.toFixed(12)))).toEqual([1, 7, 9]);
  });

  it("keeps the digits of weights far below the largest, where plain sums would underflow", () => {
    const sums = logPrefixSums([-800, -800, 0], [1, 1, 1]);
    expect(sums[1]).toBeCloseTo(-800 + Math.log(2), 12); // exp(-800) is 0 in floating point; its log is not
    expect(sums[2]).toBeCloseTo(0, 12);
  });
});
