import { sampleRankCorrelation } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { compareWithThreatList, readSpeciesTraits, type ComparisonSpecies } from "@shared/comparison";
import { readIucnCategory } from "@shared/iucn";
import { analyzeSelectivity } from "@shared/selectivity";
import { logisticRegression } from "@shared/stats";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, numericTrait, taxon } from "../selectivity/helpers";
import { HABIT_CROSSWALK, HABIT_TRAIT, habitModel, habitPast, INVENTED_LIST } from "./helpers";

const OPTIONS = { level: 0.95, worthALookMin: 0.5 };
const Z = 1.959963984540054;
const ATTACHED = 1 / (1 + Math.E); // logit -1
const BURROWING = Math.E / (1 + Math.E); // logit +1

function inventedSpecies(): ComparisonSpecies[] {
  return INVENTED_LIST.map((s) => ({
    name: s.name,
    higherTaxon: "Invented clade",
    category: readIucnCategory(s.category)!,
    ...readSpeciesTraits({ position: s.position }, HABIT_CROSSWALK, [HABIT_TRAIT], { decimalComma: false }),
  }));
}

describe("compareWithThreatList on an invented list worked by hand", () => {
  const result = compareWithThreatList({ species: inventedSpecies(), model: habitModel(), past: habitPast(), options: OPTIONS });

  it("gives the area under the ROC curve as the Mann-Whitney statistic over n1 n0 (Hanley & McNeil 1982)", () => {
    // Worked by hand: threatened scores T1 .731, T2 .731, T3 .5, T4 .269; not threatened N1 .5,
    // N2 .269, N3 .269, N4 .731 (the LC species with "unknown" is not scored). Pairs with the
    // threatened species higher count 1, ties 1/2:
    //   T1: N1 1 + N2 1 + N3 1 + N4 1/2 = 3.5;  T2: 3.5;  T3: N1 1/2 + N2 1 + N3 1 + N4 0 = 2.5;
    //   T4: N1 0 + N2 1/2 + N3 1/2 + N4 0 = 1.   U = 10.5, AUC = 10.5 / (4 x 4) = 0.65625.
    expect(result.roc).not.toBeNull();
    const roc = result.roc!;
    expect(roc.cases).toBe(4);
    expect(roc.controls).toBe(4);
    expect(roc.mannWhitneyU).toBe(10.5);
    expect(roc.auc).toBe(10.5 / 16);
    // DeLong et al. (1988), worked by hand: V10 = (.875, .875, .625, .25), V01 = (.625, .875, .875, .25);
    // both have sample variance 0.26171875 / 3, so Var = 2 x (0.26171875 / 3) / 4 = 0.043619792.
    expectRelativeClose(roc.se, Math.sqrt((2 * (0.26171875 / 3)) / 4), 1e-12);
    // The interval is the score interval of the Hanley-McNeil variance (rocAuc's own tests), inside
    // [0, 1] without clipping: it holds the area and includes 0.5 here.
    expect(roc.ci[0]).toBeLessThan(0.5);
    expect(roc.ci[1]).toBeLessThan(1);
    expect(roc.ci[1]).toBeGreaterThan(0.65625);
    expect(roc.ciMethod).toMatch(/score interval/);
    // 4 and 4 species: too few for a verdict (at least 10 of each; common practice, no source).
    expect(roc.smallSample).toBe(true);
    expect(roc.verdict).toBe("no-verdict");
    expect(result.notes.join(" ")).toMatch(/too uncertain for a verdict/);
    // The curve, worked by hand: calling >= .731 threatened catches 2 of 4 and 1 of 4; >= .5, 3 and 2; all, 4 and 4.
    expect(roc.points.map((p) => [p.falsePositiveRate, p.truePositiveRate])).toEqual([
      [0, 0],
      [0.25, 0.5],
      [0.5, 0.75],
      [1, 1],
    ]);
    expect(roc.points[0].threshold).toBeNull();
  });

  it("keeps DD, NE, EX and EW out of the comparison and counts them", () => {
    expect(result.counts).toEqual({
      species: 13,
      byCategory: { EX: 1, EW: 1, CR: 1, EN: 1, VU: 2, NT: 1, LC: 4, DD: 1, NE: 1 },
      threatened: 4,
      notThreatened: 5,
      excluded: { EX: 1, EW: 1, DD: 1, NE: 1 },
      excludedTotal: 4,
      scored: { threatened: 4, notThreatened: 4, excluded: 4 },
      unscored: { threatened: 0, notThreatened: 1, excluded: 0 },
    });
    expect(result.notes.join(" ")).toContain("1 EX, 1 EW, 1 DD, 1 NE kept out");
  });

  it("reports the species the crosswalk leaves without a state, with the value, instead of dropping it silently", () => {
    expect(result.unscoredReasons).toEqual([{ reason: '"unknown" has no state of Habit in the crosswalk', count: 1, examples: ["Zephyra obscura (invented)"] }]);
    const unknown = result.species.find((s) => s.name === "Zephyra obscura (invented)")!;
    expect(unknown).toMatchObject({ probability: null, ci: null, group: "notThreatened" });
  });

  it("scores each species with the model's probability and interval", () => {
    const score = (name: string) => result.species.find((s) => s.name === name)!;
    expectRelativeClose(score("Quenna vitrea (invented)").probability!, ATTACHED, 1e-12);
    expect(score("Morvia lenta (invented)").probability).toBe(0.5);
    // Burrowing: eta = -1 + 2 = 1, se = sqrt(0.04 + 0.04) (diagonal covariance), interval logistic(1 +- z se).
    const se = Math.sqrt(0.08);
    const [low, high] = score("Tarsella alta (invented)").ci!;
    expectRelativeClose(low, 1 / (1 + Math.exp(-(1 - Z * se))), 1e-9);
    expectRelativeClose(high, 1 / (1 + Math.exp(-(1 + Z * se))), 1e-9);
  });

  it("ranks the score against the ordinal category LC 0 ... CR 4 (Spearman), as simple-statistics does", () => {
    // Scored species listed LC..CR: (score, category) = T1 (.731, 4), T2 (.731, 3), T3 (.5, 2), T4 (.269, 2),
    // N1 (.5, 1), N2 (.269, 0), N3 (.269, 0), N4 (.731, 0).
    const scores = [BURROWING, BURROWING, 0.5, ATTACHED, 0.5, ATTACHED, ATTACHED, BURROWING];
    const ordinal = [4, 3, 2, 2, 1, 0, 0, 0];
    expect(result.spearman!.n).toBe(8);
    expectRelativeClose(result.spearman!.rho, sampleRankCorrelation(scores, ordinal), 1e-12); // reference library simple-statistics
  });

  it("sets each contrast's odds of being threatened today beside the same contrast in the past crisis", () => {
    const [habit] = result.traits;
    expect(habit.key).toBe("habit");
    const free = habit.contrasts.find((c) => c.state === "free")!;
    const burrowing = habit.contrasts.find((c) => c.state === "burrowing")!;
    // Worked by hand from the list (species with a usable habit, threatened or not):
    //   free: threatened 1 (T3), not 1 (N1); attached: 1 (T4), 2 (N2, N3); burrowing: 2 (T1, T2), 1 (N4).
    //   Free vs attached [[1, 1], [1, 2]]: OR = 1*2/(1*1) = 2, SE = sqrt(1 + 1 + 1 + 1/2) (Woolf 1955).
    //   Burrowing vs attached [[2, 1], [1, 2]]: OR = 4, SE = sqrt(1/2 + 1 + 1 + 1/2).
    expect(free.today!.table).toEqual([
      [1, 1],
      [1, 2],
    ]);
    expect(free.today!.estimate).toBeCloseTo(2, 12);
    expectRelativeClose(free.today!.ci[0], Math.exp(Math.log(2) - Z * Math.sqrt(3.5)), 1e-9);
    expectRelativeClose(free.today!.ci[1], Math.exp(Math.log(2) + Z * Math.sqrt(3.5)), 1e-9);
    expect(burrowing.today!.estimate).toBeCloseTo(4, 12);
    expectRelativeClose(burrowing.today!.ci[1], Math.exp(Math.log(4) + Z * Math.sqrt(3)), 1e-9);
    // The past crisis's odds ratios come through as the run stored them.
    expect(free.contrast).toBe("Free vs Attached");
    expect(free.pastCrude).toEqual({ estimate: 3, ci: [1.5, 6], method: "sample odds ratio, Woolf interval" });
    expect(free.pastModelAdjusted).toEqual({ estimate: 2.7, ci: [1.35, 5.4] });
    expect(burrowing.pastCrude!.estimate).toBe(9);
  });

  it("lists LC and DD species predicted at least as likely as the threshold to have died out, highest first", () => {
    // LC or DD with a score >= 0.5: N4 Zephyra lata (LC, .731) and Aulora minuta (DD, .731); tied, so by name.
    // Morvia lenta scores 0.5 but is NT; the LC species scoring .269 fall below.
    expect(result.worthALook.map((s) => [s.rank, s.name, s.category])).toEqual([
      [1, "Aulora minuta (invented)", "DD"],
      [2, "Zephyra lata (invented)", "LC"],
    ]);
    const stricter = compareWithThreatList({ species: inventedSpecies(), model: habitModel(), past: habitPast(), options: { ...OPTIONS, worthALookMin: 0.8 } });
    expect(stricter.worthALook).toEqual([]);
  });
});

describe("compareWithThreatList where the data do not allow a test", () => {
  it("names why there is no ROC curve when a group has fewer than two scored species", () => {
    const species = inventedSpecies().filter((s) => !["CR", "EN", "VU"].includes(s.category) || s.name === "Quenna rubra (invented)");
    const result = compareWithThreatList({ species, model: habitModel(), past: habitPast(), options: OPTIONS });
    expect(result.roc).toBeNull();
    expect(result.rocNote).toBe("The ROC curve needs at least 2 scored species in each group; there are 1 threatened and 4 not threatened.");
  });

  it("names the missing trait when a species has no value at all", () => {
    const species: ComparisonSpecies[] = [{ name: "Vacua nulla (invented)", higherTaxon: "", category: "LC", values: {}, problems: {} }];
    const result = compareWithThreatList({ species, model: habitModel(), past: habitPast(), options: OPTIONS });
    expect(result.species[0].reason).toBe("No value of Habit; the model needs every one of its traits.");
    expect(result.spearmanNote).toMatch(/needs at least 3 scored species/);
  });

  it("refuses a threshold outside (0, 1)", () => {
    expect(() => compareWithThreatList({ species: [], model: habitModel(), past: habitPast(), options: { level: 0.95, worthALookMin: 1 } })).toThrow(/worthALookMin/);
  });
});

describe("numeric traits", () => {
  it("fits today's slope on the model's own scaling, so its odds ratio has the past one's step", () => {
    // A crisis fitted on invented genera with shell size (log10, per SD).
    const random = createUniformSource(7);
    const taxa = Array.from({ length: 160 }, (_, i) => {
      const size = 10 ** (0.4 + 1.6 * random());
      const p = 1 / (1 + Math.exp(-(-0.2 - 1.1 * (Math.log10(size) - 1.2))));
      return taxon(`Genus ${i}`, "Invented clade", random() < p ? 1 : 0, { size });
    });
    const fitted = analyzeSelectivity({ taxa, traits: [numericTrait("size", "Shell size", { unit: "mm" })], options: DEFAULT_OPTIONS });
    const model = fitted.model!;
    const scaling = model.encoding.traits[0] as { center: number; scale: number };
    const list: ComparisonSpecies[] = Array.from({ length: 60 }, (_, i) => {
      const size = 10 ** (0.3 + (1.8 * ((i * 37) % 60)) / 60);
      return { name: `Species ${i} (invented)`, higherTaxon: "", category: i % 3 === 0 ? "EN" : i % 3 === 1 ? "LC" : size < 10 ? "VU" : "NT", values: { size }, problems: {} };
    });
    const result = compareWithThreatList({ species: list, model, past: fitted.traits, options: OPTIONS });
    const contrast = result.traits[0].contrasts[0];
    expect(contrast.contrast).toBe("per SD");
    expect(contrast.pastCrude!.estimate).toBe(fitted.traits[0].contrasts[0].crude.estimate);
    // A derived check (no published twin): the same univariate regression run by hand on the
    // model's scaling, x = (log10 size - centre) / scale.
    const x = list.map((s) => [(Math.log10(s.values.size as number) - scaling.center) / scaling.scale]);
    const y = list.map((s) => (["CR", "EN", "VU"].includes(s.category) ? 1 : 0));
    const byHand = logisticRegression(x, y).coefficients[1];
    expectRelativeClose(contrast.today!.estimate, byHand.oddsRatio, 1e-9);
    expectAbsoluteClose(contrast.today!.ci[0], byHand.oddsRatioCi[0], 1e-9);
    expect(contrast.today!.n).toBe(60);
  });
});
