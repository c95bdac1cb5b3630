import { describe, expect, it } from "vitest";
import { analyzeSelectivity, fitStratifiedSlope, type SelectivityTaxon } from "@shared/selectivity";
import { buildDesignMatrix, conditionalLogisticSlope, logisticRegression } from "@shared/stats";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";
import { DEFAULT_OPTIONS, numericTrait, stateTrait } from "./helpers";

// Published worked example: R's UCBAdmissions data (Admit x Gender x Dept), docs/sources.md section 3. Each
// applicant becomes one row with Dept as the clade, Gender as a two-state trait (male against the
// female reference) and "admitted" as the outcome coded 1, so the clade-adjusted odds ratio is
// the common odds ratio that mantelhaen.test(UCBAdmissions) prints.
const UCB: Array<[string, number, number, number, number]> = [
  // Dept, male admitted, male rejected, female admitted, female rejected
  ["A", 512, 313, 89, 19],
  ["B", 353, 207, 17, 8],
  ["C", 120, 205, 202, 391],
  ["D", 138, 279, 131, 244],
  ["E", 53, 138, 94, 299],
  ["F", 22, 351, 24, 317],
];

function ucbRows(): SelectivityTaxon[] {
  const rows: SelectivityTaxon[] = [];
  const push = (dept: string, gender: string, outcome: 0 | 1, count: number): void => {
    for (let k = 0; k < count; k++) rows.push({ id: `${rows.length}`, name: `row ${rows.length}`, clade: dept, outcome, values: { gender } });
  };
  for (const [dept, ma, mr, fa, fr] of UCB) {
    push(dept, "male", 1, ma);
    push(dept, "male", 0, mr);
    push(dept, "female", 1, fa);
    push(dept, "female", 0, fr);
  }
  return rows;
}

describe("clade-adjusted odds ratio of a two-state trait (UCBAdmissions, R mantelhaen.test example)", () => {
  const result = analyzeSelectivity({
    taxa: ucbRows(),
    traits: [stateTrait("gender", "Gender", ["male", "female"], { reference: "female" })],
    options: DEFAULT_OPTIONS,
  });
  const contrast = result.traits[0].contrasts[0];

  it("matches the published common odds ratio and interval", () => {
    const adjusted = contrast.cladeAdjusted!;
    expectRelativeClose(adjusted.estimate, 0.9046968, 1e-6); // R output "common odds ratio 0.9046968" (docs/sources.md section 3)
    expectRelativeClose(adjusted.ci[0], 0.7719074, 1e-6); // R output, 95% interval
    expectRelativeClose(adjusted.ci[1], 1.0603298, 1e-6); // R output
    expect(adjusted.method).toMatch(/^Mantel-Haenszel over 6 clades/);
  });

  it("reports the Breslow-Day test of equal odds ratios across departments", () => {
    // COMPUTED in docs/sources.md section 3 (no published twin): Breslow-Day = Tarone = 18.8255 on 5 df, p 0.002071.
    expectAbsoluteClose(contrast.cladeAdjusted!.breslowDay!.chiSquare, 18.8255, 5e-4);
    expect(contrast.cladeAdjusted!.breslowDay!.df).toBe(5);
    expectAbsoluteClose(contrast.cladeAdjusted!.breslowDay!.pValue, 0.002071, 5e-6);
  });

  it("sets it beside the crude odds ratio, which points the other way, and flags the move", () => {
    // Worked by hand from the totals: men 1198 admitted / 1493 rejected, women 557 / 1278;
    // crude OR = 1198 * 1278 / (1493 * 557) = 1.8411.
    expectRelativeClose(contrast.crude.estimate, (1198 * 1278) / (1493 * 557), 1e-12);
    expectAbsoluteClose(contrast.crude.estimate, 1.8411, 5e-5);
    // The flag weighs the crude odds ratio against the department-standardised marginal one (direct
    // standardisation; Greenland, Robins & Pearl 1999), not against the Mantel-Haenszel one.
    const check = contrast.cladeCheck!;
    expect(check.informativeClades).toBe(6);
    expect(check.thin).toBe(false);
    expect(check.standardised).toBeLessThan(1);
    expect(contrast.changeOnCladeAdjustment).toBeCloseTo(Math.abs(check.standardised / check.crude - 1), 12);
    expect(check.pValue!).toBeLessThan(0.05);
    expect(contrast.flagged).toBe(true);
    expect(result.traits[0].confoundingNote).toMatch(
      /^The odds ratio of Gender: Male \(against Female\) moves from 1\.84 to 0\.\d+ \(standardised over clades; within clades 0\.905\) once clade is taken into account: within clades the association runs the other way/,
    );
    expect(result.confoundingMethod).toMatch(/Greenland, Robins & Pearl 1999, Statistical Science 14:29/);
  });
});

describe("fitStratifiedSlope: one intercept per stratum and a common slope", () => {
  // Budworm data (Venables & Ripley 2002, from R's predict.glm help; docs/sources.md section 4): 20 moths per
  // dose and sex, deaths 1, 4, 9, 13, 18, 20 (male) and 0, 2, 6, 10, 12, 16 (female) at ldose 0..5.
  // The additive model sex + ldose - 1 gives ldose 1.0642 (SE 0.1311), sexF -3.4732, sexM -2.3724
  // (Venables & Ripley 2002 p. 192, from memory); the engine's logistic regression with a sex dummy
  // reproduces these digits (1.06421, 0.13108; -3.47316, -3.47316 + 1.10074), which verifies them.
  const deaths = [1, 4, 9, 13, 18, 20, 0, 2, 6, 10, 12, 16];
  const x: number[] = [];
  const y: number[] = [];
  const sex: number[] = [];
  deaths.forEach((dead, group) => {
    for (let k = 0; k < 20; k++) {
      x.push(group % 6);
      y.push(k < dead ? 1 : 0);
      sex.push(group < 6 ? 1 : 0);
    }
  });

  it("reproduces the budworm slope and its standard error", () => {
    const fit = fitStratifiedSlope(Float64Array.from(x), Uint8Array.from(y), Int32Array.from(sex), 2)!;
    expectAbsoluteClose(fit.estimate, 1.0642, 5e-5); // Venables & Ripley 2002 p. 192 (from memory, see above)
    expectAbsoluteClose(fit.se, 0.1311, 5e-5); // same
  });

  it("agrees with the engine's regression on clade dummies for many clades", () => {
    const random = createUniformSource(11);
    const n = 600;
    const clades = 12;
    const xs = new Float64Array(n);
    const ys = new Uint8Array(n);
    const strata = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      strata[i] = i % clades;
      xs[i] = random() * 4 - 2 + strata[i] / 6;
      const eta = -0.5 + 0.8 * xs[i] + (strata[i] % 3) - 1;
      ys[i] = random() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
    }
    const fit = fitStratifiedSlope(xs, ys, strata, clades)!;
    const design = buildDesignMatrix([
      { name: "x", kind: "numeric", values: Array.from(xs) },
      { name: "clade", kind: "categorical", values: Array.from(strata) },
    ]);
    const engine = logisticRegression(design, Array.from(ys), { names: design.names });
    expectRelativeClose(fit.estimate, engine.coefficients[1].estimate, 1e-7);
    expectRelativeClose(fit.se, engine.coefficients[1].se, 1e-7);
  });

  it("gives up, returning null, when the values separate the outcomes within every stratum", () => {
    // Within each stratum every victim has a larger value than every survivor.
    const fit = fitStratifiedSlope(Float64Array.of(0, 1, 2, 3, 0, 1, 2, 3), Uint8Array.of(0, 0, 1, 1, 0, 1, 1, 1), Int32Array.of(0, 0, 0, 0, 1, 1, 1, 1), 2);
    expect(fit).toBeNull();
  });
});

describe("clade-adjusted odds ratio of a numeric trait", () => {
  it("uses the clades holding both outcomes and says how many were left out", () => {
    const random = createUniformSource(5);
    const taxa: SelectivityTaxon[] = [];
    // Invented genera: three mixed clades and one clade whose genera all died out.
    for (let i = 0; i < 240; i++) {
      const clade = ["Amberidae", "Borlidae", "Cestidae", "Drumidae"][i % 4];
      const size = 10 ** (random() * 2);
      const outcome = clade === "Drumidae" ? 1 : random() < 1 / (1 + Math.exp(-(Math.log10(size) - 1))) ? 1 : 0;
      taxa.push({ id: `${i}`, name: `Genus ${i}`, clade, outcome, values: { size } });
    }
    const result = analyzeSelectivity({ taxa, traits: [numericTrait("size", "Size")], options: DEFAULT_OPTIONS });
    const adjusted = result.traits[0].contrasts[0].cladeAdjusted!;
    expect(adjusted.method).toBe(
      "conditional logistic regression by clade (conditional likelihood; Breslow & Day 1980, vol. 1, ch. 7) over 3 informative clades; 1 clade whose taxa all died, all survived or share one value carries no information within clade and is left out, Wald interval",
    );
    expect(adjusted.informativeClades).toBe(3);
    expect(adjusted.thin).toBe(false);
    // The same slope from the engine, fitted on the mixed clades with clade dummies.
    const kept = taxa.filter((t) => t.clade !== "Drumidae");
    const logs = taxa.map((t) => Math.log10(t.values.size as number));
    const mean = logs.reduce((a, b) => a + b) / logs.length;
    const sd = Math.sqrt(logs.reduce((a, v) => a + (v - mean) ** 2, 0) / (logs.length - 1));
    const design = buildDesignMatrix([
      { name: "size", kind: "numeric", values: kept.map((t) => (Math.log10(t.values.size as number) - mean) / sd) },
      { name: "clade", kind: "categorical", values: kept.map((t) => t.clade) },
    ]);
    // With 60 genera per clade the incidental-parameter bias of the unconditional fit (clade
    // dummies, the engine's regression) is small, so the two estimates nearly agree (Breslow & Day
    // 1980, vol. 1, ch. 7); the conditional one is the one reported.
    const engine = logisticRegression(design, kept.map((t) => t.outcome), { names: design.names });
    expectRelativeClose(adjusted.estimate, engine.coefficients[1].oddsRatio, 0.05);
    const conditional = conditionalLogisticSlope(
      kept.map((t) => (Math.log10(t.values.size as number) - mean) / sd),
      kept.map((t) => t.outcome),
      kept.map((t) => ["Amberidae", "Borlidae", "Cestidae"].indexOf(t.clade)),
      3,
    );
    expectRelativeClose(adjusted.estimate, Math.exp(conditional.estimate), 1e-9);
    expectRelativeClose(adjusted.ci[0], Math.exp(conditional.estimate - 1.959963984540054 * conditional.se), 1e-9); // z 0.975 (normal table)
  });
});
