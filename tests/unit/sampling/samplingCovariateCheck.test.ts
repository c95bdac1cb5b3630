// Sampling as a covariate: simulated, deterministic invented taxa where sampling explains an apparent
// trait effect, and where the trait's effect is its own.
//
// Check values, worked by hand:
// - A logistic regression with one binary predictor reproduces the sample odds ratio ad/bc of its 2x2
//   table (Agresti 2002, Categorical Data Analysis, 2nd ed., section 5.1; from memory).
// - When the extinction proportion in every group of equally sampled taxa is the same for both states,
//   and its logit is a straight line in log10(finds) (logit 0.8 = 1.386, logit 0.5 = 0, logit 0.2 = -1.386
//   at 1, 10 and 100 finds), the model with log10(finds) fits every group exactly with a trait coefficient
//   of 0: odds ratio 1 (maximum likelihood reproduces the proportions of a saturated pattern; common practice, no source).
import { describe, expect, it } from "vitest";
import { samplingCovariateCheck, type SamplingCounts } from "@shared/sampling";
import type { SelectivityTaxon, SelectivityTraitSpec } from "@shared/selectivity/types";

const HABITAT: SelectivityTraitSpec = {
  key: "habitat",
  label: "Habitat",
  kind: "binary",
  states: [
    { code: "level", label: "Level bottom" },
    { code: "reef", label: "Reef" },
  ],
  reference: "level",
  transform: "none",
  standardise: false,
};

/** Invented taxa: per group of finds, how many of each habitat and how many of them are victims. */
function simulate(groups: Array<{ finds: number; reef: [number, number]; level: [number, number] }>, withoutFinds = 0) {
  const taxa: SelectivityTaxon[] = [];
  const counts: SamplingCounts = {};
  let k = 0;
  const add = (habitat: string, finds: number, outcome: 0 | 1) => {
    const id = `t${String(k++).padStart(4, "0")}`;
    taxa.push({ id, name: `Inventella ${id}`, clade: "Inventidae", outcome, values: { habitat } });
    counts[id] = { occurrences: finds, collections: Math.max(finds > 0 ? 1 : 0, Math.round(finds / 2)) };
  };
  for (const g of groups) {
    for (const [habitat, [n, victims]] of [["reef", g.reef], ["level", g.level]] as const) {
      for (let i = 0; i < n; i++) add(habitat, g.finds, i < victims ? 1 : 0);
    }
  }
  // Taxa of the trait table without any find: left out of both fits, and counted.
  for (let i = 0; i < withoutFinds; i++) add(i % 2 ? "reef" : "level", 0, (i % 3 === 0 ? 1 : 0) as 0 | 1);
  return { taxa, counts };
}

describe("samplingCovariateCheck", () => {
  it("says the odds ratio does not hold when sampling explains the apparent effect", () => {
    // Reef taxa are mostly found once, level-bottom taxa mostly 100 times; within each group the
    // extinction proportion is the same for both habitats (0.8, 0.5, 0.2).
    const { taxa, counts } = simulate(
      [
        { finds: 1, reef: [50, 40], level: [10, 8] },
        { finds: 10, reef: [20, 10], level: [20, 10] },
        { finds: 100, reef: [10, 2], level: [50, 10] },
      ],
      6,
    );
    const check = samplingCovariateCheck({ taxa, traits: [HABITAT], counts, covariates: ["occurrences"], options: { forceFirth: false, level: 0.95 } });
    expect(check.note).toBeNull();
    expect(check.taxa).toBe(160);
    expect(check.withoutOccurrences).toBe(6);
    const [reef] = check.contrasts;
    // Reef: 52 victims and 28 survivors; level bottom: 28 and 52, so ad/bc = 52*52/(28*28) = 3.4490.
    expect(reef.withoutSampling!.estimate).toBeCloseTo((52 * 52) / (28 * 28), 4);
    expect(reef.withoutSampling!.ci[0]).toBeGreaterThan(1);
    // Once log10(finds) is in the model the habitat's odds ratio is 1 (see the header).
    expect(reef.withSampling!.estimate).toBeCloseTo(1, 5);
    expect(reef.withSampling!.ci[0]).toBeLessThan(1);
    expect(reef.withSampling!.ci[1]).toBeGreaterThan(1);
    expect(reef.verdict).toBe("does_not_hold");
    expect(reef.contrast).toBe("Habitat: Reef vs Level bottom");
    expect(reef.words).toMatch(/does not hold once sampling is allowed for: the interval now includes 1/);
    // The covariate's own odds ratio per tenfold more finds: logit falls by 1.386 per step, exp(-1.386) = 0.25.
    expect(check.covariateTerms[0]!.oddsRatio!.estimate).toBeCloseTo(0.25, 3);
    expect(check.method).toMatch(/left out of both fits/);
    expect(check.caution).toMatch(/rarely found taxon is more likely to look extinct/);
  });

  it("says the odds ratio holds when the trait's effect is its own", () => {
    // Both habitats are sampled alike; reef taxa die out more at every level of sampling.
    const { taxa, counts } = simulate([
      { finds: 1, reef: [30, 24], level: [30, 12] },
      { finds: 10, reef: [30, 18], level: [30, 6] },
      { finds: 100, reef: [30, 12], level: [30, 3] },
    ]);
    const check = samplingCovariateCheck({ taxa, traits: [HABITAT], counts, covariates: ["occurrences", "collections"], options: { forceFirth: false, level: 0.95 } });
    const [reef] = check.contrasts;
    // Same sampling in both habitats: without sampling, the 2x2 table is 54/36 against 21/69: ad/bc = 54*69/(36*21) = 4.9286.
    expect(reef.withoutSampling!.estimate).toBeCloseTo((54 * 69) / (36 * 21), 4);
    expect(reef.withSampling!.ci[0]).toBeGreaterThan(1);
    expect(reef.verdict).toBe("holds");
    expect(reef.words).toMatch(/holds once sampling is allowed for/);
    expect(check.covariateTerms.map((t) => t.covariate)).toEqual(["occurrences", "collections"]);
  });

  it("leaves out a covariate with a single value among the taxa and says so beside its name", () => {
    const { taxa, counts } = simulate([
      { finds: 1, reef: [30, 24], level: [30, 12] },
      { finds: 10, reef: [30, 18], level: [30, 6] },
    ]);
    for (const id of Object.keys(counts)) counts[id]!.collections = 0; // uploads without collection ids
    const check = samplingCovariateCheck({ taxa, traits: [HABITAT], counts, covariates: ["occurrences", "collections"], options: { forceFirth: false, level: 0.95 } });
    const collections = check.covariateTerms.find((t) => t.covariate === "collections")!;
    expect(collections.oddsRatio).toBeNull();
    expect(collections.label).toMatch(/^Number of collections \(Number of collections is left out of the model: .*single value\)$/);
    expect(check.contrasts[0]!.verdict).toBe("holds");
  });

  it("says there is nothing to compare without occurrences", () => {
    const { taxa } = simulate([{ finds: 1, reef: [10, 5], level: [10, 2] }]);
    const check = samplingCovariateCheck({ taxa, traits: [HABITAT], counts: {}, covariates: ["occurrences"], options: { forceFirth: false, level: 0.95 } });
    expect(check.taxa).toBe(0);
    expect(check.withoutOccurrences).toBe(20);
    expect(check.contrasts).toEqual([]);
    expect(check.note).toMatch(/No victim or survivor has an occurrence/);
  });
});
