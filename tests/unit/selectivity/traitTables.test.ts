import { describe, expect, it } from "vitest";
import { analyzeSelectivity, type SelectivityResult } from "@shared/selectivity";
import { adjustPValues, fisherExact, logisticRegression, mantelHaenszel, wilsonInterval } from "@shared/stats";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, expectPlainJson, numericTrait, stateTrait, taxon } from "./helpers";

// A hand-built invented data set: nine genera of two invented clades. Setting is built so that its
// table is Fisher's tea-tasting table [[3, 1], [1, 3]] (reef: 3 victims, 1 survivor; lagoon: 1, 3).
// The ninth genus has no setting, a feeding code outside the codebook and a shell size of 0.
const TAXA = [
  taxon("Arvenia", "Olmidae", 1, { setting: "reef", feeding: "filter", shell: 2, water: "marine" }),
  taxon("Brosca", "Pentidae", 1, { setting: "reef", feeding: "filter", shell: 3, water: "marine" }),
  taxon("Calvinella", "Pentidae", 1, { setting: "reef", feeding: "graze", shell: 5, water: "marine" }),
  taxon("Dornia", "Olmidae", 0, { setting: "reef", feeding: "graze", shell: 8, water: "marine" }),
  taxon("Essaria", "Olmidae", 1, { setting: "lagoon", feeding: "hunt", shell: 13, water: "marine" }),
  taxon("Fennopsis", "Olmidae", 0, { setting: "lagoon", feeding: "filter", shell: 21, water: "marine" }),
  taxon("Gavrella", "Pentidae", 0, { setting: "lagoon", feeding: "graze", shell: 34, water: "marine" }),
  taxon("Hollina", "Pentidae", 0, { setting: "lagoon", feeding: "hunt", shell: 55, water: "marine" }),
  taxon("Iskaria", "Olmidae", 1, { setting: null, feeding: "mystery", shell: 0, water: "marine" }),
];
const SETTING = stateTrait("setting", "Setting", ["reef", "lagoon"]);
const FEEDING = stateTrait("feeding", "Feeding", ["filter", "graze", "hunt", "scavenge"]);
const SHELL = numericTrait("shell", "Shell length", { unit: "mm" });
const WATER = stateTrait("water", "Water", ["marine", "brackish"]);

function analyse(overrides: Partial<typeof DEFAULT_OPTIONS> = {}, traits = [SETTING, FEEDING, SHELL, WATER]): SelectivityResult {
  return analyzeSelectivity({ taxa: TAXA, traits, options: { ...DEFAULT_OPTIONS, ...overrides } });
}

describe("a trait whose table is the tea-tasting table", () => {
  const setting = analyse().traits[0];

  it("counts states by outcome and leaves the genus without a value out", () => {
    expect(setting.table.map((row) => [row.state, row.victims, row.survivors])).toEqual([
      ["reef", 3, 1],
      ["lagoon", 1, 3],
    ]);
    expect(setting.used).toBe(8);
    expect(setting.droppedMissing).toBe(1);
    expect(setting.droppedInvalid).toBe(0);
  });

  it("gives the published two-sided Fisher p-value", () => {
    // Tea tasting, R fisher.test help example (Agresti 2002 p. 91): two-sided p = 34/70 = 0.4857
    // (docs/sources.md section 1: null probabilities 1/70, 16/70, 36/70, 16/70, 1/70; the tables no more
    // likely than the observed one sum to 1 + 16 + 16 + 1 = 34 out of 70).
    expectRelativeClose(setting.test.pValue!, 34 / 70, 1e-12);
    expectAbsoluteClose(setting.test.pValue!, 0.4857, 5e-5);
    expect(setting.test.method).toMatch(/^Fisher exact test, 2 states x 2 outcomes, two-sided/);
  });

  it("gives extinction proportions with Wilson intervals", () => {
    // Worked by hand, Wilson (1927) at 95% (z = 1.959964, z^2 = 3.841459), 3 of 4:
    // centre (0.75 + z^2/8) / (1 + z^2/4) = 1.230182 / 1.960365 = 0.627527;
    // half-width z sqrt(0.75 * 0.25 / 4 + z^2/64) / 1.960365 = 1.959964 * 0.326952 / 1.960365 = 0.326885.
    const reef = setting.table[0];
    expect(reef.proportion).toBe(0.75);
    expectAbsoluteClose(reef.ci![0], 0.627527 - 0.326885, 2e-6);
    expectAbsoluteClose(reef.ci![1], 0.627527 + 0.326885, 2e-6);
    // 1 of 4 is the mirror image.
    expectAbsoluteClose(setting.table[1].ci![0], 1 - reef.ci![1], 1e-12);
    expect(setting.table[1].ci).toEqual(wilsonInterval(1, 4));
  });

  it("takes the first state in codebook order as reference when two are equally common", () => {
    // reef and lagoon both hold 4 genera; reef is listed first.
    expect(setting.reference).toBe("reef");
    expect(setting.contrasts.map((c) => c.contrast)).toEqual(["Lagoon vs Reef"]);
  });

  it("gives the sample odds ratio with Woolf's interval against a chosen reference", () => {
    const chosen = analyse({}, [{ ...SETTING, reference: "lagoon" }]).traits[0];
    const reef = chosen.contrasts[0];
    expect(reef.contrast).toBe("Reef vs Lagoon");
    // docs/sources.md section 2 (COMPUTED there): tea table, sample OR 9.0, Woolf 95% interval 0.3666 - 220.93.
    expectRelativeClose(reef.crude.estimate, 9, 1e-12);
    expectRelativeClose(reef.crude.ci[0], 0.3666, 1e-3);
    expectRelativeClose(reef.crude.ci[1], 220.93, 1e-4);
    expect(reef.crude.method).toBe("sample odds ratio, Woolf interval");
  });

  it("pools the clades by Mantel-Haenszel", () => {
    const chosen = analyse({}, [{ ...SETTING, reference: "lagoon" }]).traits[0];
    const adjusted = chosen.contrasts[0].cladeAdjusted!;
    // Worked by hand: Olmidae [[1, 1], [1, 1]], Pentidae [[2, 0], [0, 2]];
    // sum(ad/n) / sum(bc/n) = (1/4 + 4/4) / (1/4 + 0/4) = 5.
    expectRelativeClose(adjusted.estimate, 5, 1e-12);
    const engine = mantelHaenszel([
      [
        [1, 1],
        [1, 1],
      ],
      [
        [2, 0],
        [0, 2],
      ],
    ]);
    expect(adjusted.ci).toEqual(engine.ci);
    expect(adjusted.method).toMatch(/^Mantel-Haenszel over 2 clades/);
    expect(adjusted.breslowDay).toEqual({ chiSquare: engine.breslowDay.chiSquare, df: 1, pValue: engine.breslowDay.pValue });
  });
});

describe("a trait with more than two states", () => {
  const feeding = analyse().traits[1];

  it("lists every codebook state in order, the empty one with zero counts and no proportion", () => {
    expect(feeding.table.map((row) => [row.state, row.label, row.victims, row.survivors])).toEqual([
      ["filter", "Filter", 2, 1],
      ["graze", "Graze", 1, 2],
      ["hunt", "Hunt", 1, 1],
      ["scavenge", "Scavenge", 0, 0],
    ]);
    expect(feeding.table[3].proportion).toBeNull();
    expect(feeding.table[3].ci).toBeNull();
  });

  it("reports a code outside the codebook as dropped, with the reason and the genus", () => {
    expect(feeding.droppedInvalid).toBe(1);
    expect(feeding.droppedMissing).toBe(0);
    expect(feeding.notes.join(" ")).toMatch(/1 taxon is left out of Feeding for a value that is a code that is not a state of Feeding \(Iskaria\)/);
  });

  it("tests the states that hold taxa by the Freeman-Halton extension of Fisher's test", () => {
    // The engine's fisherExact is itself checked against R's fisher.test examples (tests/unit/stats).
    const engine = fisherExact([
      [2, 1],
      [1, 2],
      [1, 1],
    ]);
    expect(feeding.test.pValue).toBe(engine.pValue);
    expect(feeding.test.method).toMatch(/^Fisher-Freeman-Halton exact test, 3 states x 2 outcomes, two-sided/);
  });

  it("gives odds ratios against the most common state, and none for the empty state", () => {
    // filter and graze hold 3 genera each; filter comes first in the codebook.
    expect(feeding.reference).toBe("filter");
    expect(feeding.contrasts.map((c) => c.state)).toEqual(["graze", "hunt"]);
    // Worked by hand: graze [[1, 2], [2, 1]] -> 1 * 1 / (2 * 2) = 0.25; hunt [[1, 1], [2, 1]] -> 1 / 2.
    expectRelativeClose(feeding.contrasts[0].crude.estimate, 0.25, 1e-12);
    expectRelativeClose(feeding.contrasts[1].crude.estimate, 0.5, 1e-12);
  });
});

describe("a numeric trait", () => {
  const shell = analyse().traits[2];

  it("drops a value of 0 under log10 with the reason", () => {
    expect(shell.used).toBe(8);
    expect(shell.droppedInvalid).toBe(1);
    expect(shell.notes[0]).toBe("1 taxon is left out of Shell length for a value that is zero or below, where log10 is undefined (Iskaria).");
  });

  it("shows extinction proportions in quartile bins labelled with their ranges", () => {
    // Eight sizes 2, 3, 5, 8, 13, 21, 34, 55 mm: two per quarter.
    expect(shell.table.map((row) => [row.state, row.label, row.victims, row.survivors])).toEqual([
      ["Q1", "2–3 mm", 2, 0],
      ["Q2", "5–8 mm", 1, 1],
      ["Q3", "13–21 mm", 1, 1],
      ["Q4", "34–55 mm", 0, 2],
    ]);
  });

  it("is tested by the likelihood ratio test of a univariate logistic regression per SD of log10 size", () => {
    const logs = [2, 3, 5, 8, 13, 21, 34, 55].map(Math.log10);
    const mean = logs.reduce((a, b) => a + b) / 8;
    const sd = Math.sqrt(logs.reduce((a, v) => a + (v - mean) ** 2, 0) / 7);
    const fit = logisticRegression(
      logs.map((v) => [(v - mean) / sd]),
      [1, 1, 1, 0, 1, 0, 0, 0],
    );
    // The likelihood ratio statistic of one predictor is the null deviance minus the deviance.
    expectRelativeClose(shell.test.statistic!, fit.nullDeviance - fit.deviance, 1e-8);
    expect(shell.test.df).toBe(1);
    expect(shell.test.method).toBe("Likelihood ratio test in a logistic regression of extinction on Shell length (log10, per SD)");
    const contrast = shell.contrasts[0];
    expect(contrast.contrast).toBe("per SD");
    expectRelativeClose(contrast.crude.estimate, Math.exp(fit.coefficients[1].estimate), 1e-8);
    expect(contrast.crude.estimate).toBeLessThan(1); // larger shells died out less often here
  });
});

describe("a trait with a single state among the taxa", () => {
  const result = analyse();
  const water = result.traits[3];

  it("is not tested, says why, and has null p-values", () => {
    expect(water.test.pValue).toBeNull();
    expect(water.test.adjustedPValue).toBeNull();
    expect(water.test.method).toBe("No test: every taxon with a value of Water is Marine; a comparison needs taxa in at least two states.");
    expect(water.contrasts).toEqual([]);
    expect(water.table[1]).toMatchObject({ state: "brackish", victims: 0, survivors: 0, proportion: null, ci: null });
  });

  it("stays out of the multiple regression with a note", () => {
    expect(result.model!.encoding.traits.map((t) => t.key)).toEqual(["setting", "feeding", "shell"]);
    expect(result.model!.notes).toContain("Water is left out of the model: its own test was not possible.");
  });
});

describe("multiple-testing correction and the design summary", () => {
  it("adjusts across the tests that could be done, not the impossible one", () => {
    const result = analyse({ correction: "holm" });
    const tested = result.traits.filter((t) => t.test.pValue !== null);
    expect(tested.map((t) => t.key)).toEqual(["setting", "feeding", "shell"]);
    const p = tested.map((t) => t.test.pValue!);
    expect(tested.map((t) => t.test.adjustedPValue)).toEqual(adjustPValues(p, "holm"));
    // Worked by hand (Holm 1979): the smallest of three p-values is multiplied by 3.
    const smallest = Math.min(...p);
    const adjustedSmallest = tested.find((t) => t.test.pValue === smallest)!.test.adjustedPValue!;
    expectRelativeClose(adjustedSmallest, Math.min(1, 3 * smallest), 1e-12);
  });

  it("uses Benjamini-Hochberg when asked", () => {
    const result = analyse({ correction: "bh" });
    const p = result.traits.filter((t) => t.test.pValue !== null).map((t) => t.test.pValue!);
    expect(result.traits.filter((t) => t.test.pValue !== null).map((t) => t.test.adjustedPValue)).toEqual(adjustPValues(p, "bh"));
  });

  it("counts victims, survivors, dropped values and complete cases", () => {
    const result = analyse();
    expect(result.design).toEqual({
      victims: 5,
      survivors: 4,
      droppedByTrait: { setting: 1, feeding: 1, shell: 1, water: 0 },
      completeCases: 8,
      withoutClade: 0,
      withQualifiedClade: 0,
    });
    expect(result.model!.n).toBe(8);
    expect(result.model!.droppedIncomplete).toBe(1);
  });

  it("returns plain JSON", () => {
    expectPlainJson(analyse());
  });
});
