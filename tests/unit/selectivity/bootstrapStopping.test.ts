import { describe, expect, it } from "vitest";
import { answerIsClear } from "@shared/selectivity/bootstrapStopping";

// Ten draws -0.09, -0.07, ..., 0.09 (step 0.02): mean 0, sample SD sqrt(0.033 / 9) = 0.060553 (worked by hand:
// sum of squares 2 x (0.01^2 + 0.03^2 + 0.05^2 + 0.07^2 + 0.09^2) = 0.033). Critical value at 95%: 1.959964 (normal table).
const draws = Array.from({ length: 10 }, (_, k) => -0.09 + 0.02 * k);
const options = { threshold: 0.1, level: 0.95 };

describe("answerIsClear: early stop of a large study's confounding bootstrap", () => {
  it("needs a first batch of ten replicates", () => {
    expect(answerIsClear(draws.slice(0, 9), 1, 0.5, options)).toBe(false);
  });

  it("stops when the change is within the threshold: no uncertainty can make it flag", () => {
    expect(answerIsClear(draws, 0.05, 0.05, options)).toBe(true);
  });

  it("stops when the difference is far beyond (z > 2 x 1.96) or well within (z < 1.96 / 2) its noise", () => {
    expect(answerIsClear(draws, 0.3, 0.35, options)).toBe(true); // z = 0.3 / 0.060553 = 4.95 > 3.92
    expect(answerIsClear(draws, 0.05, 0.2, options)).toBe(true); // z = 0.83 < 0.98
  });

  it("goes on when the answer sits near the critical value", () => {
    expect(answerIsClear(draws, 0.12, 0.13, options)).toBe(false); // z = 1.98, near 1.96
  });
});
