// An invented past crisis and an invented modern list whose comparison is worked by hand.
import type { ModelResult, TraitResult } from "@shared/selectivity";
import type { Crosswalk, CrosswalkTrait } from "@shared/comparison";

/**
 * The crisis's model, written out: logit p = -1 + 1 [habit = free] + 2 [habit = burrowing], with
 * "attached" the reference. So an attached species scores 1/(1+e) = 0.2689, a free one 1/2 and a
 * burrowing one e/(1+e) = 0.7311.
 */
export function habitModel(): ModelResult {
  const coefficient = (name: string, label: string, estimate: number) => ({
    name,
    label,
    estimate,
    se: 0.2,
    z: estimate / 0.2,
    pValue: 0.5,
    ci: [estimate - 0.392, estimate + 0.392] as [number, number],
    oddsRatio: Math.exp(estimate),
    oddsRatioCi: [Math.exp(estimate - 0.392), Math.exp(estimate + 0.392)] as [number, number],
  });
  return {
    n: 120,
    victims: 60,
    droppedIncomplete: 0,
    method: "invented",
    coefficients: [
      coefficient("(Intercept)", "(Intercept)", -1),
      coefficient("habit=free", "Habit: free (vs attached)", 1),
      coefficient("habit=burrowing", "Habit: burrowing (vs attached)", 2),
    ],
    terms: [],
    deviance: 1,
    nullDeviance: 2,
    aic: 3,
    converged: true,
    firth: false,
    firthReason: null,
    separatedPredictors: [],
    encoding: {
      traits: [{ key: "habit", label: "Habit", kind: "states", reference: "attached", states: ["attached", "free", "burrowing"] }],
      columns: [
        { name: "habit=free", trait: "habit", kind: "state", state: "free" },
        { name: "habit=burrowing", trait: "habit", kind: "state", state: "burrowing" },
      ],
    },
    covariance: [
      [0.04, 0, 0],
      [0, 0.04, 0],
      [0, 0, 0.04],
    ],
    notes: [],
  };
}

/** The crisis's own per-trait result for habit (invented numbers, passed through unchanged). */
export function habitPast(): TraitResult[] {
  const contrast = (state: string, label: string, crude: number, adjusted: number) => ({
    contrast: `${label} vs Attached`,
    state,
    reference: "attached",
    crude: { estimate: crude, ci: [crude / 2, crude * 2] as [number, number], method: "sample odds ratio, Woolf interval" },
    cladeAdjusted: null,
    modelAdjusted: { estimate: adjusted, ci: [adjusted / 2, adjusted * 2] as [number, number] },
    changeOnCladeAdjustment: null,
    changeOnModelAdjustment: null,
    flagged: false,
    notes: [],
  });
  return [
    {
      key: "habit",
      label: "Habit",
      kind: "categorical",
      used: 120,
      droppedMissing: 0,
      droppedInvalid: 0,
      table: [
        { state: "attached", label: "Attached", victims: 10, survivors: 30, proportion: 0.25, ci: [0.14, 0.4] },
        { state: "free", label: "Free", victims: 20, survivors: 20, proportion: 0.5, ci: [0.35, 0.65] },
        { state: "burrowing", label: "Burrowing", victims: 30, survivors: 10, proportion: 0.75, ci: [0.6, 0.86] },
      ],
      test: { method: "invented", pValue: 0.01, adjustedPValue: 0.01 },
      contrasts: [contrast("free", "Free", 3, 2.7), contrast("burrowing", "Burrowing", 9, 7.4)],
      confoundingNote: null,
      reference: "attached",
      notes: [],
    },
  ];
}

export const HABIT_TRAIT: CrosswalkTrait = {
  id: "00000000-0000-4000-8000-000000000001",
  key: "habit",
  label: "Habit",
  kind: "categorical",
  states: [
    { code: "attached", label: "Attached" },
    { code: "free", label: "Free" },
    { code: "burrowing", label: "Burrowing" },
  ],
  unit: null,
};

/** The list says "clinging", "roaming" and "digging"; "unknown" is left without a state on purpose. */
export const HABIT_CROSSWALK: Crosswalk = {
  pairs: [{ traitId: HABIT_TRAIT.id, column: "position", states: { clinging: "attached", roaming: "free", digging: "burrowing" }, multiplier: 1 }],
};

/**
 * The invented modern list (all names invented). Scores through the model: digging 0.7311,
 * roaming 0.5, clinging 0.2689.
 */
export const INVENTED_LIST: Array<{ name: string; category: string; position: string }> = [
  { name: "Tarsella alta (invented)", category: "CR", position: "digging" }, // T1 0.7311
  { name: "Tarsella brevis (invented)", category: "EN", position: "digging" }, // T2 0.7311
  { name: "Quenna rubra (invented)", category: "VU", position: "roaming" }, // T3 0.5
  { name: "Quenna vitrea (invented)", category: "VU", position: "clinging" }, // T4 0.2689
  { name: "Morvia lenta (invented)", category: "NT", position: "roaming" }, // N1 0.5
  { name: "Morvia plana (invented)", category: "LC", position: "clinging" }, // N2 0.2689
  { name: "Morvia tenuis (invented)", category: "LC", position: "clinging" }, // N3 0.2689
  { name: "Zephyra lata (invented)", category: "LC", position: "digging" }, // N4 0.7311
  { name: "Zephyra obscura (invented)", category: "LC", position: "unknown" }, // not threatened, unscored
  { name: "Aulora minuta (invented)", category: "DD", position: "digging" }, // kept out, 0.7311
  { name: "Aulora nova (invented)", category: "NE", position: "roaming" }, // kept out
  { name: "Perdita ultima (invented)", category: "EX", position: "digging" }, // kept out
  { name: "Perdita hortensis (invented)", category: "EW", position: "clinging" }, // kept out
];
