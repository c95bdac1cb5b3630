import { describe, expect, it } from "vitest";
import { analyzeSelectivity, robustnessPanel, type RobustnessInput, type SelectivityTaxon } from "@shared/selectivity";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, expectPlainJson, numericTrait, stateTrait } from "./helpers";

// Invented stages and a boundary at 100 Ma with a 10 Myr window below it.
const STAGES = [
  { label: "Upper stage", base: 100, top: 90 },
  { label: "Lower stage", base: 110, top: 100 },
  { label: "Older stage", base: 125, top: 110 },
];
const BOUNDARY = 100;
const WINDOW = 10;

interface Planted {
  name: string;
  clade: string;
  victim: boolean;
  values: SelectivityTaxon["values"];
  fad: number;
  lad: number;
}

const FEEDING = stateTrait("feeding", "Feeding", ["suspension", "deposit"], { reference: "suspension" });

function asInput(list: Planted[], extra: Partial<RobustnessInput> = {}): RobustnessInput {
  return {
    taxa: list.map((t) => ({ id: t.name, name: t.name, clade: t.clade, outcome: t.victim ? 1 : 0, values: t.values })),
    windows: [],
    ranges: Object.fromEntries(list.map((t) => [t.name, { fad: t.fad, lad: t.lad }])),
    boundaryMa: BOUNDARY,
    windowMyr: WINDOW,
    truncationMyr: 2,
    stages: STAGES,
    traits: [FEEDING],
    references: { feeding: "suspension" },
    level: 0.95,
    ...extra,
  };
}

describe("the tea-tasting table as a run (docs/sources.md section 2)", () => {
  // Deposit feeders: 3 victims, 1 survivor; suspension feeders: 1 victim, 3 survivors.
  // Woolf: OR 9.0, 95% interval 0.3666 - 220.93 (docs/sources.md section 2, COMPUTED).
  const list: Planted[] = [
    { name: "d1", clade: "A", victim: true, values: { feeding: "deposit" }, fad: 120, lad: 101 },
    { name: "d2", clade: "A", victim: true, values: { feeding: "deposit" }, fad: 120, lad: 105 },
    { name: "d3", clade: "B", victim: true, values: { feeding: "deposit" }, fad: 108, lad: 104 }, // within the Lower stage
    { name: "d4", clade: "B", victim: false, values: { feeding: "deposit" }, fad: 120, lad: 95 },
    { name: "s1", clade: "A", victim: true, values: { feeding: "suspension" }, fad: 120, lad: 107 },
    { name: "s2", clade: "A", victim: false, values: { feeding: "suspension" }, fad: 120, lad: 99 }, // last seen 1 Myr above
    { name: "s3", clade: "B", victim: false, values: { feeding: "suspension" }, fad: 120, lad: 80 },
    { name: "s4", clade: "B", victim: false, values: { feeding: "suspension" }, fad: 120, lad: 70 },
  ];
  const panel = robustnessPanel(asInput(list));
  const [deposit] = panel.contrasts;
  const at = (variant: string) => deposit.estimates.find((e) => e.variant === variant)!;

  it("the run's own crude odds ratio is Woolf's", () => {
    expect(deposit.contrast).toBe("Deposit vs Suspension");
    expectRelativeClose(at("run").crude!.estimate, 9, 1e-12);
    expectRelativeClose(at("run").crude!.ci[0], 0.3666, 1e-3);
    expectRelativeClose(at("run").crude!.ci[1], 220.93, 1e-4);
    expect(at("run").adjusted).toBeNull(); // one trait: nothing to adjust for
  });

  it("leaves each clade out in turn", () => {
    // Without A: deposit (1 victim, 1 survivor), suspension (0, 2): a zero cell, so Haldane:
    // (1.5 * 2.5) / (1.5 * 0.5) = 5 (docs/sources.md section 2, the 0.5 correction).
    expectRelativeClose(at("clade:A").crude!.estimate, 5, 1e-12);
    // Without B: deposit (2, 0), suspension (1, 1): (2.5 * 1.5) / (0.5 * 1.5) = 5.
    expectRelativeClose(at("clade:B").crude!.estimate, 5, 1e-12);
    expectRelativeClose(deposit.jackknife.crude!.min, 5, 1e-12);
    expectRelativeClose(deposit.jackknife.crude!.max, 5, 1e-12);
    expect(deposit.jackknife.crude!.cladesLeftOut).toBe(2);
  });

  it("takes out taxa whose whole range lies within one stage", () => {
    const single = panel.variants.find((v) => v.id === "single-stage")!;
    expect(single.label).toBe("Single-stage taxa out (1)"); // d3, 108-104 Ma inside the Lower stage
    expect(single.victims + single.survivors).toBe(7);
    // deposit (2, 1), suspension (1, 3): 2 * 3 / (1 * 1) = 6
    expectRelativeClose(at("single-stage").crude!.estimate, 6, 1e-12);
  });

  it("recodes last appearances near the boundary both ways", () => {
    // Victims last seen within 2 Myr below 100 Ma: d1 (101 Ma) becomes a survivor:
    // deposit (2, 2), suspension (1, 3): 2 * 3 / (2 * 1) = 3.
    expect(panel.variants.find((v) => v.id === "truncation-victims")!.label).toBe("Victims last seen within 2.0 Myr below as survivors (1)"); // one decimal at least (shared/format/ages.ts)
    expectRelativeClose(at("truncation-victims").crude!.estimate, 3, 1e-12);
    // Survivors last seen within 2 Myr above: s2 (99 Ma) becomes a victim:
    // deposit (3, 1), suspension (2, 2): 3 * 2 / (1 * 2) = 3.
    expectRelativeClose(at("truncation-survivors").crude!.estimate, 3, 1e-12);
  });

  it("calls a contrast whose interval includes 1 everywhere never there", () => {
    expect(deposit.verdict.crude.status).toBe("never-there");
    expect(deposit.verdict.crude.sentence).toBe("Never there: the interval includes 1 under all 6 variants.");
    expect(deposit.verdict.adjusted.status).toBe("not-estimated");
    expectPlainJson(panel);
  });
});

/** Invented genera: deposit feeders die more (log odds +1.5); in clade "Fragilidae" only, small size kills (-3 per log10 unit). */
function simulated(seed: number): Planted[] {
  const uniform = createUniformSource(seed);
  const out: Planted[] = [];
  const clades = ["Alphidae", "Betidae", "Gammidae", "Deltidae", "Fragilidae"];
  for (let i = 0; i < 800; i++) {
    const clade = clades[i % clades.length];
    const deposit = uniform() < 0.4;
    const size = 10 ** (uniform() * 2);
    const eta = -1 + (deposit ? 1.5 : 0) + (clade === "Fragilidae" ? -3 * (Math.log10(size) - 1) : 0);
    const victim = uniform() < 1 / (1 + Math.exp(-eta));
    const fad = 100 + 1 + uniform() * 20;
    const lad = victim ? 100 + uniform() * WINDOW : 100 - uniform() * 30;
    out.push({ name: `Genus ${i}`, clade, victim, values: { feeding: deposit ? "deposit" : "suspension", size }, fad, lad });
  }
  return out;
}

describe("a planted effect holds, a clade-bound one is fragile", () => {
  const SIZE = numericTrait("size", "Body size", { standardise: false });
  const list = simulated(7);
  const input = asInput(list, { traits: [FEEDING, SIZE], references: { feeding: "suspension", size: null } });
  // A wider window from the same ranges: the same taxa here (every victim is last seen within 10 Myr).
  input.windows = [{ factor: 2, windowMyr: 20, taxa: input.taxa }];
  const panel = robustnessPanel(input);
  const deposit = panel.contrasts.find((c) => c.traitKey === "feeding")!;
  const size = panel.contrasts.find((c) => c.traitKey === "size")!;

  it("the adjusted odds ratios under the run's own choice are the run's model-adjusted ones", () => {
    const run = analyzeSelectivity({ taxa: input.taxa, traits: [FEEDING, SIZE], options: DEFAULT_OPTIONS });
    const fromRun = run.traits.find((t) => t.key === "feeding")!.contrasts[0].modelAdjusted!;
    const own = deposit.estimates[0].adjusted!;
    expectRelativeClose(own.estimate, fromRun.estimate, 1e-6);
    expectRelativeClose(own.ci[0], fromRun.ci[0], 1e-6);
    const crude = run.traits.find((t) => t.key === "size")!.contrasts[0].crude;
    expectRelativeClose(size.estimates[0].crude!.estimate, crude.estimate, 1e-6);
  });

  it("deposit feeding holds under every variant", () => {
    console.log(`robustness, deposit feeding: ${deposit.verdict.adjusted.sentence}`);
    expect(deposit.verdict.crude.status).toBe("holds");
    expect(deposit.verdict.adjusted.status).toBe("holds");
    expect(panel.variants.map((v) => v.kind)).toEqual(["run", "window", "clade", "clade", "clade", "clade", "clade", "single-stage", "truncation-victims", "truncation-survivors"]);
  });

  it("size, which matters in one clade only, is fragile and the jackknife names that clade", () => {
    console.log(`robustness, body size: ${size.verdict.crude.sentence}`);
    expect(size.verdict.crude.status).toBe("fragile");
    expect(size.verdict.crude.changedUnder).toContain("Without Fragilidae");
    expect(size.jackknife.crude!.mostInfluential!.clade).toBe("Fragilidae");
    expectAbsoluteClose(size.jackknife.crude!.mostInfluential!.estimate, size.estimates.find((e) => e.variant === "clade:Fragilidae")!.crude!.estimate, 0);
  });

  it("limits the clades left out and says so", () => {
    const few = robustnessPanel({ ...input, maxCladesLeftOut: 2 });
    expect(few.variants.filter((v) => v.kind === "clade")).toHaveLength(2);
    expect(few.notes[0]).toBe("The 2 largest of 5 clades were left out in turn; the 3 smaller ones stay in every jackknife sample.");
  });
});
