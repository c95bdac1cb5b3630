import { describe, expect, it } from "vitest";
import { confoundingCheck, type ConfoundingContext } from "@shared/selectivity";
import type { ConfoundingJudgement, ContrastResult } from "@shared/selectivity/types";
import { stateTrait } from "./helpers";

// The wording of the confounding note: a reading shared by several flagged contrasts of one trait
// is said once, after every contrast's numbers. The odds ratios below are invented inputs for the
// wording (no published twin); which way a move reads follows the change-in-estimate rule (common
// practice, no source): toward 1 on adjustment = the crude association may be a shared cause.

const habit = stateTrait("life_habit", "Life habit", ["epifaunal", "infaunal", "semi_infaunal"], { reference: "epifaunal" });
habit.states[2].label = "Semi-infaunal";

function judgement(crude: number, standardised: number): ConfoundingJudgement {
  return {
    crude,
    standardised,
    change: Math.abs(standardised / crude - 1),
    seLogDifference: 0.1,
    z: Math.log(standardised / crude) / 0.1,
    pValue: 0.001,
    informativeClades: 6,
    thin: false,
    flagged: true,
    replicates: 200,
    seed: 1,
    method: "invented for the wording",
  };
}

function contrast(state: string, clade: [number, number, number] | null, model: [number, number] | null = null): ContrastResult {
  const interval = { estimate: 1, ci: [0.5, 2] as [number, number], se: 0.3, pValue: 0.5, pAdjusted: 0.5 };
  return {
    contrast: `${state} vs epifaunal`,
    state,
    reference: "epifaunal",
    crude: { ...interval, estimate: clade?.[0] ?? model?.[0] ?? 1, method: "Fisher" },
    cladeAdjusted: clade ? { ...interval, estimate: clade[2], method: "Mantel-Haenszel" } : null,
    modelAdjusted: null,
    changeOnCladeAdjustment: null,
    changeOnModelAdjustment: null,
    cladeCheck: clade ? judgement(clade[0], clade[1]) : null,
    modelCheck: model ? judgement(model[0], model[1]) : null,
    flagged: false,
    notes: [],
  } as ContrastResult;
}

const context: ConfoundingContext = { spec: habit, threshold: 0.1, otherTraits: ["Shell size"], traitTaxa: 120, modelTaxa: 100 };
const count = (text: string, part: string) => text.split(part).length - 1;

describe("confoundingCheck: the note of a trait with two flagged contrasts", () => {
  it("says the shared reading once, after both contrasts' numbers", () => {
    const { note, contrasts } = confoundingCheck([contrast("infaunal", [2.8, 1.1, 1.05]), contrast("semi_infaunal", [3.1, 1.2, 1.15])], context);
    expect(contrasts.map((c) => c.flagged)).toEqual([true, true]);
    expect(note).toBe(
      "The odds ratio of Life habit: Infaunal (against Epifaunal) moves from 2.80 to 1.10 (standardised over clades; within clades 1.05) " +
        "and that of Semi-infaunal (against Epifaunal) from 3.10 to 1.20 (standardised over clades; within clades 1.15) once clade is taken into account: " +
        "they may track extinction only because Infaunal and Semi-infaunal taxa are concentrated in hard-hit clades — a shared cause, not necessarily an effect of the trait.",
    );
    expect(count(note!, "a shared cause, not necessarily an effect of the trait")).toBe(1);
  });

  it("keeps one sentence per contrast when they read differently, each reading said once", () => {
    // Infaunal moves toward 1 (shared cause); semi-infaunal crosses 1 (the association turns around within clades).
    const { note } = confoundingCheck([contrast("infaunal", [2.8, 1.1, 1.05]), contrast("semi_infaunal", [1.6, 0.7, 0.65])], context);
    expect(note).toContain("The odds ratio of Life habit: Infaunal (against Epifaunal) moves from 2.80 to 1.10");
    expect(note).toContain("it may track extinction only because Infaunal taxa are concentrated in hard-hit clades");
    expect(note).toContain("The odds ratio of Life habit: Semi-infaunal (against Epifaunal) moves from 1.60 to 0.700");
    expect(note).toContain("within clades the association runs the other way");
    expect(count(note!, "once clade is taken into account")).toBe(2);
  });

  it("says a shared reading of the model adjustment and the smaller model's taxa once", () => {
    const { note } = confoundingCheck([contrast("infaunal", null, [2.5, 1.4]), contrast("semi_infaunal", null, [2.2, 1.3])], context);
    expect(note).toBe(
      "The odds ratio of Life habit: Infaunal (against Epifaunal) moves from 2.50 to 1.40 and that of Semi-infaunal (against Epifaunal) from 2.20 to 1.30, " +
        "each standardised over the other traits (Shell size), once they are taken into account: " +
        "part of their association may be carried by those traits, or by a cause they share with them. " +
        "The model uses the 100 taxa with every chosen trait known, fewer than the 120 here.",
    );
  });

  it("reads a single flagged contrast as before", () => {
    const { note } = confoundingCheck([contrast("infaunal", [2.8, 1.1, 1.05]), contrast("semi_infaunal", null)], context);
    expect(note).toBe(
      "The odds ratio of Life habit: Infaunal (against Epifaunal) moves from 2.80 to 1.10 (standardised over clades; within clades 1.05) once clade is taken into account: " +
        "it may track extinction only because Infaunal taxa are concentrated in hard-hit clades — a shared cause, not necessarily an effect of the trait.",
    );
  });
});
