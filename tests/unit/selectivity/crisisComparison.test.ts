import { describe, expect, it } from "vitest";
import { crisisComparison, crisisVersusBackground, type SelectivityTaxon } from "@shared/selectivity";
import { adjustPValues } from "@shared/stats";
import { createUniformSource } from "@shared/stats/random";
import { expectPlainJson, numericTrait, stateTrait, taxon } from "./helpers";

// Invented genera across three boundaries: at the crisis ("Gamma") deposit feeders die far more
// often (log odds +1.6), in background not at all; body size matters nowhere; "nektonic" feeding
// occurs only in background.
function boundaryTaxa(label: string, seed: number, crisis: boolean): SelectivityTaxon[] {
  const uniform = createUniformSource(seed);
  const out: SelectivityTaxon[] = [];
  for (let i = 0; i < 300; i++) {
    const feeding = uniform() < 0.4 ? "deposit" : "suspension";
    const size = 10 ** (uniform() * 2);
    const eta = (crisis ? 0 : -1.5) + (crisis && feeding === "deposit" ? 1.6 : 0);
    const outcome = uniform() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
    out.push(taxon(`${label} genus ${i}`, `Clade ${i % 5}`, outcome, { feeding, size: i % 17 === 0 ? null : size }));
  }
  if (!crisis) for (let i = 0; i < 12; i++) out.push(taxon(`${label} swimmer ${i}`, "Clade 9", (i % 3 === 0 ? 1 : 0) as 0 | 1, { feeding: "nektonic", size: 5 }));
  return out;
}

const FEEDING = stateTrait("feeding", "Feeding", ["suspension", "deposit", "nektonic"], { reference: "suspension" });
const SIZE = numericTrait("size", "Body size");
const boundaries = [
  { label: "Alpha", taxa: boundaryTaxa("Alpha", 1, false) },
  { label: "Beta", taxa: boundaryTaxa("Beta", 2, false) },
  { label: "Gamma", taxa: boundaryTaxa("Gamma", 3, true) },
];
const result = crisisComparison({ boundaries, crisis: 2, traits: [FEEDING, SIZE], options: { correction: "holm", level: 0.95 } });

describe("crisisComparison over a run's boundaries", () => {
  const [feeding, size] = result.traits;

  it("fits crisisVersusBackground per trait on the pooled rows of all boundaries", () => {
    // the same model, built by hand from the taxa: nektonic left out (no taxa at the crisis)
    const rows = boundaries.flatMap((b) =>
      b.taxa.map((t) => ({ boundary: b.label, outcome: t.outcome, value: t.values.feeding === "nektonic" ? null : (t.values.feeding as string) })),
    );
    const direct = crisisVersusBackground({ rows, crisis: "Gamma", trait: { kind: "states", reference: "suspension" } });
    expect(feeding.test!.statistic).toBeCloseTo(direct.test.statistic, 10);
    expect(feeding.contrasts).toHaveLength(1);
    expect(feeding.contrasts[0].contrast).toBe("Deposit vs Suspension");
    expect(feeding.contrasts[0].ratio.estimate).toBeCloseTo(direct.contrasts[0].ratio.estimate, 10);
    expect(feeding.notes).toContain("Nektonic is left out: it has no taxa at the crisis, so its effect there cannot be estimated.");
    expect(result.crisis).toEqual({ index: 2, label: "Gamma" });
    expect(result.background).toEqual(["Alpha", "Beta"]);
  });

  it("adjusts the p-values across traits with the run's method", () => {
    const holm = adjustPValues([feeding.test!.pValue, size.test!.pValue], "holm");
    expect(feeding.test!.adjustedPValue).toBe(holm[0]);
    expect(size.test!.adjustedPValue).toBe(holm[1]);
  });

  it("finds the planted difference and words it; says nothing for the trait without one", () => {
    expect(feeding.differs).toBe(true);
    expect(feeding.contrasts[0].ratio.ci[0]).toBeGreaterThan(1);
    expect(feeding.contrasts[0].sentence).toMatch(/^The crisis punished Feeding: Deposit \(against Suspension\) more than background did: its odds ratio of extinction was /);
    expect(feeding.summary).toMatch(/adjusted p = /);
    expect(size.differs).toBe(false);
    expect(size.contrasts[0].contrast).toBe("per SD");
    expect(size.contrasts[0].sentence).toBeNull();
    expect(size.summary).toMatch(/^No evidence that the crisis treated Body size differently from background/);
    expect(size.notes[0]).toMatch(/^Odds ratios are per standard deviation/);
  });

  it("leaves out missing values and returns plain JSON", () => {
    const missing = boundaries.reduce((n, b) => n + b.taxa.filter((t) => t.values.size === null).length, 0);
    const total = boundaries.reduce((n, b) => n + b.taxa.length, 0);
    expect(size.used).toBe(total - missing);
    expectPlainJson(result);
  });

  it("says why a trait cannot be tested instead of failing", () => {
    const onlyBackground = stateTrait("habit", "Habit", ["a", "b"]);
    const withHabit = boundaries.map((b) => ({ ...b, taxa: b.taxa.map((t, i) => ({ ...t, values: { ...t.values, habit: b.label === "Gamma" ? "a" : i % 2 ? "a" : "b" } })) }));
    const out = crisisComparison({ boundaries: withHabit, crisis: 2, traits: [onlyBackground], options: { correction: "bh", level: 0.95 } });
    expect(out.traits[0].test).toBeNull();
    expect(out.traits[0].summary).toBe("Not tested: only one state of Habit holds taxa both at the crisis and in background.");
    expect(() => crisisComparison({ boundaries: boundaries.slice(0, 1), crisis: 0, traits: [FEEDING], options: { correction: "bh", level: 0.95 } })).toThrow(/at least two boundaries/);
  });
});
