import { describe, expect, it } from "vitest";
import { analyzeSelectivity, scoreWithModel, type ModelResult, type SelectivityTaxon } from "@shared/selectivity";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, numericTrait, stateTrait, taxon } from "./helpers";

// A model fitted on invented genera: habit with three states (plus a codebook state no genus has)
// and shell size on the log10 scale, per SD.
function fittedModel(): ModelResult {
  const random = createUniformSource(31);
  const taxa: SelectivityTaxon[] = [];
  for (let i = 0; i < 150; i++) {
    const habit = ["attached", "free", "swimming"][i % 3];
    const size = 10 ** (0.5 + 1.5 * random());
    const logOdds = -0.4 + (habit === "free" ? 0.9 : habit === "swimming" ? -0.6 : 0) + 0.7 * (Math.log10(size) - 1.25);
    taxa.push(taxon(`Genus ${i}`, "Olmidae", random() < 1 / (1 + Math.exp(-logOdds)) ? 1 : 0, { habit, size }));
  }
  const result = analyzeSelectivity({
    taxa,
    traits: [stateTrait("habit", "Habit", ["attached", "free", "swimming", "burrowing"], { reference: "attached" }), numericTrait("size", "Size")],
    options: DEFAULT_OPTIONS,
  });
  return result.model!;
}

const model = fittedModel();
const coefficient = (name: string) => model.coefficients.find((c) => c.name === name)!;

/** Worked by hand from the model's parts: x, eta = x'b, se = sqrt(x'Vx), logistic of each. */
function byHand(habitColumn: string | null, size: number, z = 1.959964) {
  const sizeEncoding = model.encoding.traits.find((t) => t.key === "size")!;
  if (sizeEncoding.kind !== "numeric") throw new Error("size is numeric");
  const x: number[] = model.coefficients.map((c) => (c.name === "(Intercept)" || c.name === habitColumn ? 1 : 0));
  x[model.coefficients.findIndex((c) => c.name === "size")] = (Math.log10(size) - sizeEncoding.center) / sizeEncoding.scale;
  const eta = x.reduce((sum, xj, j) => sum + xj * model.coefficients[j].estimate, 0);
  let variance = 0;
  x.forEach((xa, a) => x.forEach((xb, b) => (variance += xa * model.covariance[a][b] * xb)));
  const logistic = (v: number) => 1 / (1 + Math.exp(-v));
  return { eta, probability: logistic(eta), ci: [logistic(eta - z * Math.sqrt(variance)), logistic(eta + z * Math.sqrt(variance))] };
}

describe("scoreWithModel", () => {
  it("gives the logistic function of the linear predictor, with an interval around it", () => {
    const score = scoreWithModel(model, { habit: "free", size: 12 });
    const expected = byHand("habit=free", 12);
    expect(score.reason).toBeNull();
    expectRelativeClose(score.linearPredictor!, expected.eta, 1e-12);
    // eta written out: intercept + free + size slope * (log10 12 - centre) / scale
    const size = model.encoding.traits[1] as { center: number; scale: number };
    const eta = coefficient("(Intercept)").estimate + coefficient("habit=free").estimate + (coefficient("size").estimate * (Math.log10(12) - size.center)) / size.scale;
    expectRelativeClose(score.linearPredictor!, eta, 1e-12);
    expectRelativeClose(score.probability!, 1 / (1 + Math.exp(-eta)), 1e-12);
    expectRelativeClose(score.ci![0], expected.ci[0], 1e-6);
    expectRelativeClose(score.ci![1], expected.ci[1], 1e-6);
    expect(score.ci![0]).toBeLessThan(score.probability!);
    expect(score.ci![1]).toBeGreaterThan(score.probability!);
  });

  it("codes the reference state as no dummy at all", () => {
    const score = scoreWithModel(model, { habit: "attached", size: 30 });
    expectRelativeClose(score.probability!, byHand(null, 30).probability, 1e-12);
  });

  it("narrows the interval at a lower level", () => {
    const wide = scoreWithModel(model, { habit: "swimming", size: 5 });
    const narrow = scoreWithModel(model, { habit: "swimming", size: 5 }, 0.8);
    expect(narrow.probability).toBe(wide.probability);
    expect(narrow.ci![0]).toBeGreaterThan(wide.ci![0]);
    expect(narrow.ci![1]).toBeLessThan(wide.ci![1]);
  });

  it("scores the same from a model that went through JSON, as a stored run is read back", () => {
    const stored = JSON.parse(JSON.stringify(model)) as ModelResult;
    expect(scoreWithModel(stored, { habit: "free", size: 12 })).toEqual(scoreWithModel(model, { habit: "free", size: 12 }));
  });

  it("gives no score, and says why, for an unknown state, a state without taxa, a missing value or a size of 0", () => {
    expect(scoreWithModel(model, { habit: "floating", size: 12 })).toEqual({
      probability: null,
      ci: null,
      linearPredictor: null,
      se: null,
      reason: '"floating" is not a state the model has an estimate for in Habit (it knows attached, free, swimming).',
    });
    expect(scoreWithModel(model, { habit: "burrowing", size: 12 }).reason).toMatch(/^"burrowing" is not a state the model has an estimate for/);
    expect(scoreWithModel(model, { habit: null, size: 12 }).reason).toBe("No value of Habit; the model needs every one of its traits.");
    expect(scoreWithModel(model, { habit: "free" }).reason).toBe("No value of Size; the model needs every one of its traits.");
    expect(scoreWithModel(model, { habit: "free", size: 0 }).reason).toBe("The value of Size, 0, is zero or below, where log10 is undefined.");
    expect(scoreWithModel(model, { habit: "free", size: "large" }).reason).toBe('The value of Size, "large", is not a number.');
  });
});
