// The invented demo study: reproducible from its seed, marked as invented, shaped as the codebook
// says, and carrying the planted effects: an analysis must find the narrow-range and deposit-feeding
// effects, and must see that the infaunal habit only looks selective because of its clade.
import { createHash } from "node:crypto";
import { afterEach, describe, expect, it, vi } from "vitest";
import { DEMO_SEED, generateDemoStudy, IUCN_CATEGORIES, MODERN_CROSSWALK, type DemoStudy, type DemoTaxon } from "../../../scripts/seed/demo/generator";
import { SUGGESTED_CODEBOOK } from "../../../shared/codebook";
import { classifyAcrossBoundary, outcomeWarnings, ratesThroughTime } from "../../../shared/outcomes/index";
import { logisticRegression, mantelHaenszel, oddsRatio, type Table2x2 } from "../../../shared/stats/index";
import { findUnit, timescaleStages } from "../../../shared/timescale/index";

/** Serialises with object keys sorted, so equal data always give the same text. */
function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (value && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
  }
  return JSON.stringify(value ?? null);
}

/** SHA-256 (hex) of the data's canonical JSON: a fingerprint that changes when any value changes. */
function hashDemo(data: DemoStudy): string {
  return createHash("sha256").update(canonicalJson(data)).digest("hex");
}

const demo = generateDemoStudy();
const planted = demo.plantedEffects;

afterEach(() => vi.restoreAllMocks());

describe("determinism", () => {
  it("gives the same data and hash for the same seed, without Math.random", () => {
    vi.spyOn(Math, "random").mockImplementation(() => {
      throw new Error("the demo must not use Math.random");
    });
    const again = generateDemoStudy(DEMO_SEED);
    expect(again).toEqual(demo);
    expect(hashDemo(again)).toBe(hashDemo(demo));
    // Recorded from this generator (not an outside value): it fails when a change alters the demo
    // data, on purpose or not. Update it only together with a deliberate change of the scenario.
    expect(hashDemo(demo)).toBe("b114291532ee3941e09681e13c91c3b78cf72b671958fc3ba7dc58a7675fb7a4");
  });

  it("gives different data for a different seed, and the hash notices one changed value", () => {
    expect(hashDemo(generateDemoStudy(DEMO_SEED + 1))).not.toBe(hashDemo(demo));
    const edited = structuredClone(demo);
    edited.taxa[500].values.geographic_range = Number(edited.taxa[500].values.geographic_range) + 1;
    expect(hashDemo(edited)).not.toBe(hashDemo(demo));
  });
});

describe("shape", () => {
  it("has 1,200 uniquely named genera in a dozen higher taxa", () => {
    expect(demo.taxa).toHaveLength(1200);
    expect(new Set(demo.taxa.map((t) => t.name)).size).toBe(1200);
    expect(demo.taxa.every((t) => /^[A-Z][a-z]+$/.test(t.name))).toBe(true);
    expect(new Set(demo.taxa.map((t) => t.higherTaxon)).size).toBe(12);
  });

  it("is marked as invented wherever it appears", () => {
    expect(demo.study.name).toMatch(/invented/);
    expect(demo.study.description).toMatch(/^Invented/);
    expect(demo.taxa.every((t) => t.notes.startsWith("Invented genus"))).toBe(true);
    expect(demo.modernList.name).toMatch(/\(invented\)$/);
    expect(demo.modernList.species.every((s) => s.name.endsWith(" (invented)"))).toBe(true);
  });

  it("codes every value with a state or a non-negative number of the suggested codebook", () => {
    expect(demo.traits.map((t) => t.key)).toEqual(SUGGESTED_CODEBOOK.map((t) => t.key));
    for (const trait of SUGGESTED_CODEBOOK) {
      const codes = new Set(trait.states.map((s) => s.code));
      for (const taxon of demo.taxa) {
        const value = taxon.values[trait.key];
        if (value === undefined) continue;
        if (trait.kind === "numeric") expect(typeof value === "number" && value >= 0, `${taxon.name} ${trait.key}`).toBe(true);
        else expect(codes.has(String(value)), `${taxon.name} ${trait.key}=${value}`).toBe(true);
      }
    }
    // Both environments occur, so the marine / non-marine comparison has two groups.
    expect(new Set(demo.taxa.map((t) => t.values.environment))).toEqual(new Set(["marine", "nonmarine"]));
  });

  it("gives ranges as ages, or as stages resolved to the stage's base and top", () => {
    const intervalCoded = demo.taxa.filter((t) => t.fadInterval);
    expect(intervalCoded.length).toBeGreaterThan(100);
    for (const t of intervalCoded) {
      expect(t.fadMa).toBe(findUnit(t.fadInterval!)!.base);
      expect(t.ladMa).toBe(findUnit(t.ladInterval!)!.top);
    }
    for (const t of demo.taxa) if (t.fadMa !== null && t.ladMa !== null) expect(t.fadMa, t.name).toBeGreaterThan(t.ladMa);
  });

  it("places the crisis at the base of the Turonian with the Cenomanian as window", () => {
    // ICS chart v2024/12: base of the Turonian 93.9 Ma, base of the Cenomanian 100.5 Ma (window 100.5 - 93.9 = 6.6 Myr).
    expect(planted.boundary).toEqual({ stage: "Turonian", ageMa: 93.9, windowMyr: 6.6 });
  });

  it("writes the modern list in words of its own, with IUCN 3.1 categories and values that map to nothing", () => {
    const species = demo.modernList.species;
    expect(species).toHaveLength(180);
    expect(species.every((s) => (IUCN_CATEGORIES as readonly string[]).includes(s.category))).toBe(true);
    const present = new Set(species.map((s) => s.category));
    for (const category of ["CR", "EN", "VU", "NT", "LC", "DD"]) expect(present.has(category as never), category).toBe(true);
    const codebookKeys = new Set(SUGGESTED_CODEBOOK.map((t) => t.key));
    for (const [column, map] of Object.entries(MODERN_CROSSWALK)) {
      expect(codebookKeys.has(column), column).toBe(false);
      expect(codebookKeys.has(map.trait)).toBe(true);
    }
    const unmapped = species.flatMap((s) =>
      (["position", "diet"] as const).filter((column) => !(s.traits[column] in MODERN_CROSSWALK[column].states)).map((column) => s.traits[column]),
    );
    expect(new Set(unmapped)).toEqual(new Set(["unknown", "parasite of fishes"]));
  });
});

describe("planted data problems", () => {
  const intervals = timescaleStages.map((s) => ({ name: s.name, base: s.base, top: s.top }));
  const warnings = outcomeWarnings(
    demo.taxa.map((t) => ({ fad: t.fadMa, lad: t.ladMa })),
    planted.boundary.ageMa,
    planted.boundary.windowMyr,
    intervals,
  );

  it("has genera with missing ranges and genera known from a single stage", () => {
    expect(warnings.missingRange.count).toBe(7); // 4 without first and 3 without last appearance, as planted
    expect(warnings.invalidRange.count).toBe(0);
    expect(warnings.singleInterval.count).toBeGreaterThan(20);
  });

  it("has two genera whose only record after the boundary is reworked, so their data say survivor", () => {
    const reworked = demo.taxa.filter((t) => t.notes.includes("reworked"));
    expect(reworked).toHaveLength(2);
    const outcomes = classifyAcrossBoundary(
      reworked.map((t) => ({ fad: t.fadMa!, lad: t.ladMa! })),
      planted.boundary.ageMa,
      planted.boundary.windowMyr,
    );
    expect(outcomes).toEqual(["survivor", "survivor"]);
    const turonian = findUnit("Turonian")!;
    for (const t of reworked) expect(t.ladMa! >= turonian.top && t.ladMa! < turonian.base).toBe(true);
  });
});

describe("planted structure", () => {
  it("concentrates the confounded life habit in the hard-hit clade", () => {
    const withHabit = demo.taxa.filter((t) => t.values.life_habit === planted.confoundedLifeHabit);
    const inClade = withHabit.filter((t) => t.higherTaxon === planted.hardHitClade);
    expect(inClade.length / withHabit.length).toBeGreaterThan(0.6);
    for (const clade of new Set(demo.taxa.map((t) => t.higherTaxon))) {
      const members = demo.taxa.filter((t) => t.higherTaxon === clade);
      const share = members.filter((t) => t.values.life_habit === planted.confoundedLifeHabit).length / members.length;
      if (clade === planted.hardHitClade) expect(share).toBeGreaterThan(0.6);
      else expect(share, clade).toBeLessThan(0.2);
    }
  });

  it("shows a crisis peak of extinction at the end of the Cenomanian against background stages", () => {
    const ranges = demo.taxa.filter((t) => t.fadMa !== null && t.ladMa !== null).map((t) => ({ fad: t.fadMa!, lad: t.ladMa! }));
    const names = ["Barremian", "Aptian", "Albian", "Cenomanian", "Turonian", "Coniacian", "Santonian"];
    const rates = ratesThroughTime(
      ranges,
      names.map((name) => ({ name, base: findUnit(name)!.base, top: findUnit(name)!.top })),
    );
    const crisis = rates.find((r) => r.name === "Cenomanian")!;
    for (const r of rates.filter((r) => r.name !== "Cenomanian")) {
      // A peak at least twice every background rate (Foote's per-capita q): a clear crisis (common practice, no source).
      expect(crisis.q!, r.name).toBeGreaterThan(2 * r.q!);
    }
  });
});

describe("an analysis finds the planted effects", () => {
  // Genera at risk at the base of the Turonian, classified from their ranges as any analysis would.
  const complete = demo.taxa.filter((t) => t.fadMa !== null && t.ladMa !== null && t.values.feeding !== undefined && t.values.life_habit !== undefined);
  const outcomes = classifyAcrossBoundary(
    complete.map((t) => ({ fad: t.fadMa!, lad: t.ladMa! })),
    planted.boundary.ageMa,
    planted.boundary.windowMyr,
  );
  const atRisk = complete.map((t, i) => ({ t, extinct: outcomes[i] === "victim" })).filter((_, i) => outcomes[i] !== "excluded");
  const smallRange = (t: DemoTaxon) => Number(t.values.geographic_range) <= planted.smallRangeMaxRegions;
  const deposit = (t: DemoTaxon) => t.values.feeding === planted.feedingMode;
  const hardHit = (t: DemoTaxon) => t.higherTaxon === planted.hardHitClade;
  const habit = (t: DemoTaxon) => t.values.life_habit === planted.confoundedLifeHabit;
  const table = (rows: typeof atRisk, has: (t: DemoTaxon) => boolean): Table2x2 => {
    const cell = (present: boolean, extinct: boolean) => rows.filter((r) => has(r.t) === present && r.extinct === extinct).length;
    return [
      [cell(true, true), cell(true, false)],
      [cell(false, true), cell(false, false)],
    ];
  };

  it("has several hundred genera at risk", () => {
    expect(atRisk.length).toBeGreaterThanOrEqual(600);
    expect(atRisk.length).toBeLessThanOrEqual(900);
  });

  const fit = logisticRegression(
    atRisk.map(({ t }) => [smallRange(t), deposit(t), hardHit(t), habit(t)].map(Number)),
    atRisk.map((r) => Number(r.extinct)),
    { names: ["smallRange", "deposit", "hardHitClade", "lifeHabit"] },
  );
  const coefficient = (name: string) => fit.coefficients.find((c) => c.name === name)!;

  it("finds the narrow-range and deposit-feeding effects significant, near their planted size", () => {
    expect(fit.converged).toBe(true);
    for (const [name, plantedLogOdds] of [
      ["smallRange", planted.smallRangeLogOdds],
      ["deposit", planted.feedingLogOdds],
      ["hardHitClade", planted.cladeLogOdds],
    ] as const) {
      const c = coefficient(name);
      expect(c.pValue, name).toBeLessThan(1e-4); // far beyond any usual significance level (common practice, no source)
      expect(c.ci[0], name).toBeLessThan(plantedLogOdds); // the 95% interval holds the planted value
      expect(c.ci[1], name).toBeGreaterThan(plantedLogOdds);
    }
  });

  it("finds no direct effect of the confounded life habit once the clade is in the model", () => {
    const c = coefficient("lifeHabit");
    expect(c.ci[0]).toBeLessThan(0); // planted direct effect: 0 on the log-odds scale
    expect(c.ci[1]).toBeGreaterThan(0);
  });

  it("flags the confounded life habit: crude odds ratio far from 1, about 1 within clades", () => {
    const crude = oddsRatio(table(atRisk, habit));
    expect(crude.estimate).toBeGreaterThan(2);
    expect(crude.ci[0]).toBeGreaterThan(1);
    const clades = [...new Set(atRisk.map((r) => r.t.higherTaxon))];
    const adjusted = mantelHaenszel(clades.map((clade) => table(atRisk.filter((r) => r.t.higherTaxon === clade), habit)));
    expect(adjusted.ci[0]).toBeLessThan(1);
    expect(adjusted.ci[1]).toBeGreaterThan(1);
    expect(adjusted.oddsRatio).toBeGreaterThan(0.67);
    expect(adjusted.oddsRatio).toBeLessThan(1.5);
    // Change-in-estimate rule: adjustment moving an odds ratio by more than 10% flags confounding (common practice, no source).
    expect(Math.abs(adjusted.oddsRatio - crude.estimate) / crude.estimate).toBeGreaterThan(0.1);
  });

  it("keeps the real effects after the clade adjustment", () => {
    const clades = [...new Set(atRisk.map((r) => r.t.higherTaxon))];
    for (const has of [smallRange, deposit]) {
      const adjusted = mantelHaenszel(clades.map((clade) => table(atRisk.filter((r) => r.t.higherTaxon === clade), has)));
      expect(adjusted.ci[0]).toBeGreaterThan(1.5);
    }
  });
});
