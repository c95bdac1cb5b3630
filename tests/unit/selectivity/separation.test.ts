import { describe, expect, it } from "vitest";
import { analyzeSelectivity, type SelectivityTaxon } from "@shared/selectivity";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, expectPlainJson, numericTrait, stateTrait, taxon } from "./helpers";

// Invented genera whose setting table is [[10, 0], [5, 5]]: all ten reef genera died out.
function reefTaxa(): SelectivityTaxon[] {
  const taxa: SelectivityTaxon[] = [];
  for (let i = 0; i < 10; i++) taxa.push(taxon(`Reef genus ${i}`, "Olmidae", 1, { setting: "reef" }));
  for (let i = 0; i < 10; i++) taxa.push(taxon(`Lagoon genus ${i}`, "Olmidae", i < 5 ? 1 : 0, { setting: "lagoon" }));
  return taxa;
}
const SETTING = stateTrait("setting", "Setting", ["reef", "lagoon"], { reference: "lagoon" });

describe("a state with only victims", () => {
  const result = analyzeSelectivity({ taxa: reefTaxa(), traits: [SETTING], options: DEFAULT_OPTIONS });
  const setting = result.traits[0];
  const reef = setting.contrasts[0];

  it("gives a Fisher p-value and a Haldane-corrected crude odds ratio, and says so", () => {
    expectAbsoluteClose(setting.test.pValue!, 0.032508, 5e-7); // docs/sources.md section 2, zero-cell table [[10,0],[5,5]] (COMPUTED)
    // docs/sources.md section 2 (COMPUTED): Haldane + Woolf 21.0, 95% interval 0.9716 - 453.91;
    // worked by hand: (10.5 * 5.5) / (0.5 * 5.5) = 21.
    expectRelativeClose(reef.crude.estimate, 21, 1e-12);
    expectRelativeClose(reef.crude.ci[0], 0.9716, 1e-3);
    expectRelativeClose(reef.crude.ci[1], 453.91, 1e-4);
    expect(reef.crude.method).toMatch(/0\.5 added to every cell because one is zero \(Haldane-Anscombe\)/);
  });

  it("switches the model to Firth's regression by itself and names the separating state", () => {
    const model = result.model!;
    expect(model.firth).toBe(true);
    expect(model.firthReason).toBe("separation");
    expect(model.separatedPredictors).toEqual(["setting=reef"]);
    expect(model.notes[0]).toBe(
      "Firth's bias-reduced logistic regression (Firth 1993) was used because the data separate the outcomes: all 10 taxa with Setting: Reef died out (quasi-complete separation, found before fitting by linear programming; Konis 2007). An ordinary fit would give an infinite odds ratio there; Firth's stays finite but remains uncertain.",
    );
    expect(model.method).toMatch(/^Firth's bias-reduced multiple logistic regression/);
    // docs/sources.md section 5 (COMPUTED there; that it is a known result is from memory): with one binary
    // predictor, Firth's log odds ratio equals the Haldane-corrected one, ln 21 = 3.044522.
    expectAbsoluteClose(model.coefficients[1].estimate, 3.044522, 1e-5);
    expect(model.coefficients[1].label).toBe("Setting: Reef (vs Lagoon)");
  });

  it("gives no clade-adjusted odds ratio when it is infinite within clades, with the reason", () => {
    expect(reef.cladeAdjusted).toBeNull();
    expect(reef.notes[0]).toBe(
      "Within clades the odds ratio of Reef against Lagoon is infinite: every clade holding both has an empty cell on the same side, so no clade-adjusted value is given.",
    );
    expect(reef.changeOnCladeAdjustment).toBeNull();
  });

  it("returns plain JSON", () => {
    expectPlainJson(result);
  });
});

describe("separation beside other traits", () => {
  // Invented genera in four clades: every burrowing genus died out; size and feeding are noise.
  const random = createUniformSource(77);
  const taxa: SelectivityTaxon[] = [];
  for (let i = 0; i < 120; i++) {
    const habit = i % 6 === 0 ? "burrowing" : i % 2 === 0 ? "attached" : "free";
    const outcome = habit === "burrowing" ? 1 : random() < 0.35 ? 1 : 0;
    const feeding = random() < 0.5 ? "filter" : "graze";
    taxa.push(taxon(`Genus ${i}`, ["Amberidae", "Borlidae", "Cestidae", "Drumidae"][i % 4], outcome, { habit, feeding, size: 1 + 30 * random() }));
  }
  const traits = [stateTrait("habit", "Habit", ["attached", "free", "burrowing"]), stateTrait("feeding", "Feeding", ["filter", "graze"]), numericTrait("size", "Size")];
  const result = analyzeSelectivity({ taxa, traits, options: DEFAULT_OPTIONS });

  it("uses Firth automatically and the note names the predictor", () => {
    expect(result.model!.firthReason).toBe("separation");
    expect(result.model!.separatedPredictors).toEqual(["habit=burrowing"]);
    expect(result.model!.notes[0]).toMatch(/because the data separate the outcomes: all 20 taxa with Habit: Burrowing died out \(quasi-complete separation, found before fitting by linear programming; Konis 2007\)\./);
    const burrowing = result.model!.coefficients.find((c) => c.name === "habit=burrowing")!;
    expect(burrowing.estimate).toBeGreaterThan(1);
    expect(burrowing.ci[1]).toBeLessThan(20); // finite and of a sensible size
  });

  it("keeps every output finite and JSON-serialisable", () => {
    expectPlainJson(result);
    for (const row of result.model!.covariance) for (const v of row) expect(Number.isFinite(v)).toBe(true);
  });

  it("fits Firth's regression on request, and says so", () => {
    const forced = analyzeSelectivity({
      taxa: taxa.filter((t) => t.values.habit !== "burrowing"),
      traits,
      options: { ...DEFAULT_OPTIONS, forceFirth: true },
    });
    expect(forced.model!.firth).toBe(true);
    expect(forced.model!.firthReason).toBe("requested");
    expect(forced.model!.separatedPredictors).toEqual([]);
    expect(forced.model!.notes[0]).toBe("Firth's bias-reduced logistic regression (Firth 1993) was used, as requested in the options.");
  });
});

describe("degenerate inputs give null results with reasons, never NaN or an exception", () => {
  it("when every taxon died out", () => {
    const taxa = [taxon("Axa", "Olmidae", 1, { setting: "reef", size: 3 }), taxon("Bexa", "Olmidae", 1, { setting: "lagoon", size: 5 })];
    const result = analyzeSelectivity({ taxa, traits: [SETTING, numericTrait("size", "Size")], options: DEFAULT_OPTIONS });
    expect(result.traits[0].test).toEqual({
      method: "No test: all 2 taxa with a value died out; a comparison needs both victims and survivors.",
      pValue: null,
      adjustedPValue: null,
    });
    expect(result.traits[1].test.pValue).toBeNull();
    expect(result.model).toBeNull();
    expect(result.modelNote).toMatch(/^No trait can enter the multiple regression/);
    expectPlainJson(result);
  });

  it("when there are no taxa at all", () => {
    const result = analyzeSelectivity({ taxa: [], traits: [SETTING, numericTrait("size", "Size")], options: DEFAULT_OPTIONS });
    expect(result.traits[0].test.method).toBe("No test: no taxon has a usable value of Setting.");
    expect(result.traits[1].table).toEqual([]);
    expect(result.design).toEqual({ victims: 0, survivors: 0, droppedByTrait: { setting: 0, size: 0 }, completeCases: 0, withoutClade: 0, withQualifiedClade: 0 });
    expectPlainJson(result);
  });

  it("when a numeric trait has a single value", () => {
    const taxa = [taxon("Axa", "Olmidae", 1, { size: 4 }), taxon("Bexa", "Olmidae", 0, { size: 4 })];
    const result = analyzeSelectivity({ taxa, traits: [numericTrait("size", "Size")], options: DEFAULT_OPTIONS });
    expect(result.traits[0].test.method).toBe("No test: every taxon with a value of Size has the same value; a slope needs at least two.");
    expect(result.traits[0].table).toEqual([expect.objectContaining({ state: "Q1", label: "4", victims: 1, survivors: 1 })]);
    expectPlainJson(result);
  });

  it("rejects an outcome other than 0 or 1, naming the taxon", () => {
    const bad = [{ ...taxon("Axa", "Olmidae", 1, {}), outcome: 2 as unknown as 1 }];
    expect(() => analyzeSelectivity({ taxa: bad, traits: [], options: DEFAULT_OPTIONS })).toThrow(/taxon 0 \(Axa\) has outcome 2/);
  });
});
