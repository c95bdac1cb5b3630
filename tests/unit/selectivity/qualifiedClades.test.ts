import { describe, expect, it } from "vitest";
import { analyzeSelectivity, type SelectivityTaxon } from "@shared/selectivity";
import { expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, stateTrait } from "./helpers";

// Published worked example: R's UCBAdmissions data, docs/sources.md section 3 (as in
// cladeAdjustment.test.ts): Mantel-Haenszel common odds ratio 0.9046968 over the six departments.
// Here department F is written "A?" (a qualified higher taxon naming A). By the stated rule it is a
// clade of its own, not pooled into A, so the six strata and the published estimate stand.
const UCB: Array<[string, number, number, number, number]> = [
  ["A", 512, 313, 89, 19],
  ["B", 353, 207, 17, 8],
  ["C", 120, 205, 202, 391],
  ["D", 138, 279, 131, 244],
  ["E", 53, 138, 94, 299],
  ["A?", 22, 351, 24, 317],
];

function rows(): SelectivityTaxon[] {
  const out: SelectivityTaxon[] = [];
  const push = (dept: string, gender: string, outcome: 0 | 1, count: number) => {
    for (let k = 0; k < count; k++) out.push({ id: `${out.length}`, name: `row ${out.length}`, clade: dept, outcome, values: { gender } });
  };
  for (const [dept, ma, mr, fa, fr] of UCB) {
    push(dept, "male", 1, ma);
    push(dept, "male", 0, mr);
    push(dept, "female", 1, fa);
    push(dept, "female", 0, fr);
  }
  return out;
}

describe("qualified higher taxa in clade-adjusted estimates", () => {
  const result = analyzeSelectivity({ taxa: rows(), traits: [stateTrait("gender", "Gender", ["male", "female"], { reference: "female" })], options: DEFAULT_OPTIONS });

  it("keeps a qualified higher taxon as a clade of its own (the published six-stratum estimate stands)", () => {
    const adjusted = result.traits[0]!.contrasts[0]!.cladeAdjusted!;
    expectRelativeClose(adjusted.estimate, 0.9046968, 1e-6); // R mantelhaen.test(UCBAdmissions), docs/sources.md section 3
    expect(adjusted.method).toMatch(/^Mantel-Haenszel over 6 clades/);
  });

  it("counts the taxa with a qualified higher taxon and says how they were counted", () => {
    // Department "A?": 22 + 351 + 24 + 317 = 714 applicants.
    expect(result.design.withQualifiedClade).toBe(714);
    expect(result.traits[0]!.notes.some((n) => n.startsWith("714 taxa have a qualified higher taxon (?, cf., aff.)."))).toBe(true);
  });
});
