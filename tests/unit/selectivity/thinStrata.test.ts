import { describe, expect, it } from "vitest";
import { analyzeSelectivity, type SelectivityTaxon } from "@shared/selectivity";
import { mantelHaenszel } from "@shared/stats";
import { expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, expectPlainJson, stateTrait, taxon } from "./helpers";

// Invented genera. Two clades hold both life habits; in both the habit makes no difference, but
// infaunal genera sit mostly in the hard-hit clade, so the crude odds ratio is far from 1.
function confoundedTwoClades(withoutClade: number): SelectivityTaxon[] {
  const taxa: SelectivityTaxon[] = [];
  const add = (clade: string, habit: string, victims: number, survivors: number): void => {
    for (let k = 0; k < victims; k++) taxa.push(taxon(`${clade}-${habit}-v${k}`, clade, 1, { habit }));
    for (let k = 0; k < survivors; k++) taxa.push(taxon(`${clade}-${habit}-s${k}`, clade, 0, { habit }));
  };
  add("Harnidae", "infaunal", 40, 10);
  add("Harnidae", "epifaunal", 8, 2);
  add("Lepridae", "infaunal", 2, 8);
  add("Lepridae", "epifaunal", 10, 40);
  for (let k = 0; k < withoutClade; k++) taxa.push(taxon(`loose-${k}`, "", k % 2 === 0 ? 1 : 0, { habit: k % 3 === 0 ? "infaunal" : "epifaunal" }));
  return taxa;
}
const HABIT = stateTrait("habit", "Life habit", ["epifaunal", "infaunal"], { reference: "epifaunal" });

describe("thin clade-adjusted estimates", () => {
  it("marks an estimate from fewer informative clades than the minimum as thin and does not flag it", () => {
    const result = analyzeSelectivity({ taxa: confoundedTwoClades(0), traits: [HABIT], options: DEFAULT_OPTIONS });
    const contrast = result.traits[0].contrasts[0];
    expect(contrast.cladeAdjusted!.informativeClades).toBe(2);
    expect(contrast.cladeAdjusted!.thin).toBe(true);
    expect(contrast.cladeCheck!.thin).toBe(true);
    expect(contrast.cladeCheck!.change).toBeGreaterThan(0.5);
    expect(contrast.flagged).toBe(false);
    expect(contrast.notes.join(" ")).toMatch(/^Thin: the clade-adjusted odds ratio rests on 2 informative clades, fewer than the 3 the run asks for/);
    expectPlainJson(result);
  });

  it("flags the same move once the analyst lowers the minimum to 2", () => {
    const result = analyzeSelectivity({ taxa: confoundedTwoClades(0), traits: [HABIT], options: { ...DEFAULT_OPTIONS, minInformativeClades: 2 } });
    const contrast = result.traits[0].contrasts[0];
    expect(contrast.cladeAdjusted!.thin).toBe(false);
    expect(contrast.flagged).toBe(true);
    expect(result.confoundingMethod).toMatch(/fewer than 2 informative clades are marked thin/);
  });
});

describe("taxa without a clade", () => {
  it("are left out of the clade-adjusted odds ratio, counted, and never form a clade of their own", () => {
    const result = analyzeSelectivity({ taxa: confoundedTwoClades(9), traits: [HABIT], options: { ...DEFAULT_OPTIONS, minInformativeClades: 2 } });
    expect(result.design.withoutClade).toBe(9);
    const contrast = result.traits[0].contrasts[0];
    // The Mantel-Haenszel odds ratio over the two real clades only (the engine's mantelHaenszel,
    // checked against R's mantelhaen.test in mantelHaenszel.test.ts).
    const expected = mantelHaenszel([
      [[40, 10], [8, 2]],
      [[2, 8], [10, 40]],
    ]);
    expectRelativeClose(contrast.cladeAdjusted!.estimate, expected.oddsRatio, 1e-12);
    expect(contrast.cladeAdjusted!.informativeClades).toBe(2);
    expect(result.traits[0].notes).toContain("9 taxa have no higher taxon and are left out of the clade-adjusted odds ratios.");
    // The crude odds ratio still uses every taxon: 109 + 9.
    expect(result.traits[0].used).toBe(129);
  });
});
