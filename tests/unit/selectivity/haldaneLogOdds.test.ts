import { describe, expect, it } from "vitest";
import { haldaneLogOdds } from "@shared/selectivity/haldaneLogOdds";

describe("haldaneLogOdds", () => {
  it("adds 0.5 to every cell only when one is empty", () => {
    // docs/sources.md section 2 (CHECK-SOURCES: zero cell [[10,0],[5,5]], Haldane + Woolf estimate 21.0, COMPUTED).
    expect(Math.exp(haldaneLogOdds(10, 0, 5, 5))).toBeCloseTo(21, 10);
    // Convictions [[2,15],[10,3]]: sample odds ratio 0.0400 without any correction (docs/sources.md section 2).
    expect(Math.exp(haldaneLogOdds(2, 15, 10, 3))).toBeCloseTo(0.04, 12);
  });
});
