import { describe, expect, it } from "vitest";
import { crosswalkCoverage, crosswalkProblems, listColumns, readSpeciesTraits, statesWithSameName, suggestCrosswalk, type CrosswalkTrait } from "@shared/comparison";
import { MODERN_CROSSWALK, generateDemoStudy } from "../../../scripts/seed/demo/generator";
import { HABIT_CROSSWALK, HABIT_TRAIT } from "./helpers";

const SIZE_TRAIT: CrosswalkTrait = { id: "00000000-0000-4000-8000-000000000002", key: "body_size", label: "Body size", kind: "numeric", states: [], unit: "mm" };

describe("listColumns", () => {
  it("counts each distinct value and the species with no value (empty or NA)", () => {
    const columns = listColumns([{ position: "digging" }, { position: " digging " }, { position: "roaming" }, { position: "NA" }, {}], ["position"]);
    expect(columns).toEqual([{ name: "position", values: [{ value: "digging", count: 2 }, { value: "roaming", count: 1 }], missing: 2 }]);
  });
});

describe("crosswalkCoverage", () => {
  it("lists every value without a state with the species holding it, and never counts it as usable", () => {
    const columns = listColumns(
      [{ position: "digging" }, { position: "unknown" }, { position: "unknown" }, { position: "sessile filter feeder" }, { position: "" }, { length_cm: "3" }],
      ["position", "length_cm"],
    );
    const crosswalk = { pairs: [{ ...HABIT_CROSSWALK.pairs[0], states: { ...HABIT_CROSSWALK.pairs[0].states, "sessile filter feeder": null } }] };
    const coverage = crosswalkCoverage(columns, crosswalk, [HABIT_TRAIT, SIZE_TRAIT], { decimalComma: false });
    expect(coverage.pairs).toEqual([
      {
        traitId: HABIT_TRAIT.id,
        traitKey: "habit",
        traitLabel: "Habit",
        kind: "categorical",
        column: "position",
        usable: 1,
        missing: 2,
        unusable: [
          { value: "unknown", count: 2, message: '"unknown" has no state of Habit in the crosswalk' },
          { value: "sessile filter feeder", count: 1, message: '"sessile filter feeder" is marked as matching no state of Habit' },
        ],
        unusableSpecies: 3,
      },
    ]);
    expect(coverage.unpairedColumns).toEqual(["length_cm"]);
    expect(coverage.unpairedTraits).toEqual([{ traitId: SIZE_TRAIT.id, key: "body_size", label: "Body size" }]);
  });

  it("reads numbers in the trait's unit through the multiplier, decimal comma when the file allows it, and lists what is not a number", () => {
    const pair = { traitId: SIZE_TRAIT.id, column: "length_cm", states: {}, multiplier: 10 };
    const read = (text: string, decimalComma: boolean) => readSpeciesTraits({ length_cm: text }, { pairs: [pair] }, [SIZE_TRAIT], { decimalComma });
    expect(read("2.5", false)).toEqual({ values: { body_size: 25 }, problems: {} }); // 2.5 cm = 25 mm
    expect(read("2,5", true).values.body_size).toBeCloseTo(25, 12);
    expect(read("2,5", false)).toEqual({
      values: { body_size: null },
      problems: { body_size: 'Body size: "2,5" is not a number: a decimal comma is ambiguous in a comma-separated file (write 12.5)' },
    });
    expect(read("NA", false)).toEqual({ values: { body_size: null }, problems: {} });
  });
});

describe("suggestCrosswalk", () => {
  it("pairs columns named like a trait and matches values to states by code or label, leaving the rest for a decision", () => {
    const columns = listColumns([{ Habit: "Burrowing" }, { Habit: "free" }, { Habit: "sessile filter feeder" }], ["Habit"]);
    expect(suggestCrosswalk(columns, [HABIT_TRAIT])).toEqual({ pairs: [{ traitId: HABIT_TRAIT.id, column: "Habit", states: { Burrowing: "burrowing", free: "free" }, multiplier: 1 }] });
  });

  it("reuses an earlier crosswalk of the study for a column of the same name, with its value choices", () => {
    const columns = listColumns([{ position: "digging" }, { position: "unknown" }, { position: "gliding" }], ["position"]);
    const earlier = { pairs: [{ ...HABIT_CROSSWALK.pairs[0], states: { ...HABIT_CROSSWALK.pairs[0].states, unknown: null } }] };
    expect(suggestCrosswalk(columns, [HABIT_TRAIT], [earlier]).pairs[0].states).toEqual({ digging: "burrowing", unknown: null });
  });

  it("pairs only equal names (case, spaces and punctuation ignored), never a name that merely starts like a trait's", () => {
    const columns = listColumns([{ "HABIT ": "free", habitat: "reef", habit_notes: "x" }], ["HABIT ", "habitat", "habit_notes"]);
    expect(suggestCrosswalk(columns, [HABIT_TRAIT]).pairs.map((p) => p.column)).toEqual(["HABIT "]);
    expect(suggestCrosswalk(listColumns([{ habitat: "reef" }], ["habitat"]), [HABIT_TRAIT])).toEqual({ pairs: [] });
    const lifeHabit = { ...HABIT_TRAIT, key: "life_habit", label: "Life habit" };
    expect(suggestCrosswalk(listColumns([{ habit: "free" }], ["habit"]), [lifeHabit])).toEqual({ pairs: [] });
    expect(suggestCrosswalk(listColumns([{ "Life Habit": "free" }], ["Life Habit"]), [lifeHabit]).pairs[0].column).toBe("Life Habit");
  });

  it("matches values with a state's code or label once a column is paired, keeping choices already made", () => {
    expect(statesWithSameName(HABIT_TRAIT, ["Burrowing", "free", "sessile filter feeder"])).toEqual({ Burrowing: "burrowing", free: "free" });
    expect(statesWithSameName(HABIT_TRAIT, ["free", "digging"], { free: null })).toEqual({ free: null });
    expect(statesWithSameName(SIZE_TRAIT, ["12"])).toEqual({});
  });

  it("does not pair retired traits", () => {
    const columns = listColumns([{ habit: "free" }], ["habit"]);
    expect(suggestCrosswalk(columns, [{ ...HABIT_TRAIT, retired: true }])).toEqual({ pairs: [] });
  });
});

describe("crosswalkProblems", () => {
  it("names the field at fault", () => {
    const problems = crosswalkProblems(
      {
        pairs: [
          { traitId: HABIT_TRAIT.id, column: "position", states: { digging: "tunnelling" }, multiplier: 2 },
          { traitId: SIZE_TRAIT.id, column: "mass", states: { big: "large" }, multiplier: 1 },
        ],
      },
      [HABIT_TRAIT, SIZE_TRAIT],
      ["position"],
    );
    expect(problems).toEqual({
      "pairs.0.multiplier": "Habit has states; only numeric traits take a multiplier",
      "pairs.0.states.digging": '"tunnelling" is not a state of Habit (allowed: attached, free, burrowing)',
      "pairs.1.column": 'The list has no column "mass"',
      "pairs.1.states": "Body size is numeric: its values are read as numbers and have no states to map",
    });
  });
});

describe("the demo study's invented modern list", () => {
  it("is read through the crosswalk it was written with, leaving exactly its planted odd values unusable", () => {
    const demo = generateDemoStudy();
    const traits: CrosswalkTrait[] = demo.traits.map((t, i) => ({ id: `00000000-0000-4000-8000-00000000010${i}`, key: t.key, label: t.label, kind: t.kind, states: t.states, unit: t.unit }));
    const idOf = (key: string) => traits.find((t) => t.key === key)!.id;
    const pairs = Object.entries(MODERN_CROSSWALK).map(([column, spec]) => ({
      traitId: idOf(spec.trait),
      column,
      states: "states" in spec ? { ...spec.states } : {},
      multiplier: 1,
    }));
    const species = demo.modernList.species;
    const columns = listColumns(
      species.map((s) => s.traits),
      Object.keys(MODERN_CROSSWALK),
    );
    const coverage = crosswalkCoverage(columns, { pairs }, traits, { decimalComma: false });
    const unusable = coverage.pairs.flatMap((p) => p.unusable.map((u) => u.value)).sort();
    expect(unusable).toEqual(["parasite of fishes", "unknown"]);
    const held = (value: string) => species.filter((s) => Object.values(s.traits).includes(value)).length;
    expect(coverage.pairs.find((p) => p.column === "position")!.unusableSpecies).toBe(held("unknown"));
    expect(coverage.pairs.find((p) => p.column === "diet")!.unusableSpecies).toBe(held("parasite of fishes"));
  });
});
