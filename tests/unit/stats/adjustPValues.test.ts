import { describe, expect, it } from "vitest";
import { adjustPValues } from "@shared/stats/adjustPValues";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose } from "./helpers";

// Published worked example: Benjamini & Hochberg (1995), the 15 p-values of the Neuhaus et al.
// (1992) thrombolysis trial, as reproduced in scipy's false_discovery_control docstring
// (docs/sources.md section 6).
const NEUHAUS = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.324, 0.4262, 0.5719, 0.6528, 0.759, 1.0];

describe("Benjamini & Hochberg (1995) example", () => {
  it("BH-adjusted p-values and the four rejections at q = 0.05", () => {
    // scipy false_discovery_control output, identical to R p.adjust(, "BH") (docs/sources.md section 6, COMPUTED).
    const expected = [0.0015, 0.003, 0.0095, 0.035625, 0.0603, 0.06385714, 0.06385714, 0.0645, 0.0765, 0.486, 0.58118182, 0.714875, 0.75323077, 0.81321429, 1];
    const adjusted = adjustPValues(NEUHAUS, "bh");
    expected.forEach((value, i) => expectAbsoluteClose(adjusted[i], value, 5e-9));
    expect(adjusted.filter((p) => p <= 0.05).length).toBe(4); // BH 1995: 4 rejections at 0.05
    expect(adjusted.filter((p) => p <= 0.1).length).toBe(9); // docs/sources.md section 6: 9 at q = 0.10 (COMPUTED)
  });

  it("Holm-adjusted p-values (Holm 1979)", () => {
    // docs/sources.md section 6 (COMPUTED): Holm rejects 3 at 0.05.
    const expected = [0.0015, 0.0056, 0.0247, 0.114, 0.2211, 0.278, 0.278, 0.278, 0.3213, 1, 1, 1, 1, 1, 1];
    const adjusted = adjustPValues(NEUHAUS, "holm");
    expected.forEach((value, i) => expectAbsoluteClose(adjusted[i], value, 1e-12));
    expect(adjusted.filter((p) => p <= 0.05).length).toBe(3);
  });

  it("Bonferroni rejects 3 at 0.05 (BH 1995: allergic reaction and two aspects of bleeding)", () => {
    const adjusted = adjustPValues(NEUHAUS, "bonferroni");
    expect(adjusted.filter((p) => p <= 0.05).length).toBe(3);
    expectAbsoluteClose(adjusted[2], 0.0285, 1e-12);
    expect(adjusted[14]).toBe(1);
  });
});

describe("properties on seeded random p-values", () => {
  const random = createUniformSource(1995);

  it("keeps the input order and never lowers a p-value; BH <= Holm <= Bonferroni", () => {
    for (let trial = 0; trial < 50; trial++) {
      const p = Array.from({ length: 1 + Math.floor(random() * 30) }, () => random() ** 3);
      const bh = adjustPValues(p, "bh");
      const holm = adjustPValues(p, "holm");
      const bonferroni = adjustPValues(p, "bonferroni");
      p.forEach((value, i) => {
        expect(bh[i]).toBeGreaterThanOrEqual(value);
        expect(bh[i]).toBeLessThanOrEqual(holm[i] + 1e-15);
        expect(holm[i]).toBeLessThanOrEqual(bonferroni[i] + 1e-15);
        expect(bonferroni[i]).toBeLessThanOrEqual(1);
      });
      // Shuffling the input shuffles the output the same way.
      const permutation = p.map((_, i) => i).sort(() => random() - 0.5);
      const shuffled = adjustPValues(
        permutation.map((i) => p[i]),
        "bh",
      );
      permutation.forEach((i, k) => expect(shuffled[k]).toBe(bh[i]));
    }
  });

  it("returns an empty list for no p-values", () => {
    expect(adjustPValues([], "holm")).toEqual([]);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => adjustPValues([0.1, 1.2], "bh")).toThrow("adjustPValues: p[1] is 1.2; p-values must lie between 0 and 1");
    expect(() => adjustPValues([NaN], "bh")).toThrow("p[0] is NaN");
    expect(() => adjustPValues([-0.1], "holm")).toThrow("p[0] is -0.1");
    expect(() => adjustPValues([0.1], "hochberg" as "bh")).toThrow('method is "hochberg"');
  });
});
