import { describe, expect, it } from "vitest";
import { haldaneLogOdds } from "@shared/selectivity/haldaneLogOdds";

describe("haldaneLogOdds", () => {
  it("adds 0.5 to every cell only when one is empty", () => {
    // docs/sources.md section 2: the zero-cell table [[10,0],[5,5]], Haldane's corrected estimate 21.0 (COMPUTED).
    expect(Math.exp(haldaneLogOdds(10, 0, 5, 5))).toBeCloseTo(21, 10);
    // Fisher's convictions table [[2,15],[10,3]] (docs/sources.md section 1): no empty cell, so the plain
    // sample odds ratio (2 x 3) / (15 x 10) = 0.04, by arithmetic.
    expect(Math.exp(haldaneLogOdds(2, 15, 10, 3))).toBeCloseTo(0.04, 12);
  });
});
