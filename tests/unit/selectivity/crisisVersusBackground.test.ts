import { describe, expect, it } from "vitest";
import { crisisVersusBackground, type CrisisVersusBackgroundRow } from "@shared/selectivity";
import { normalQuantile } from "@shared/stats/distributions";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "../stats/helpers";

/** `victims` rows with outcome 1 and `survivors` rows with outcome 0, all with one boundary and value. */
function cells(boundary: string, value: string | number | null, victims: number, survivors: number): CrisisVersusBackgroundRow[] {
  return [
    ...Array.from({ length: victims }, () => ({ boundary, outcome: 1 as const, value })),
    ...Array.from({ length: survivors }, () => ({ boundary, outcome: 0 as const, value })),
  ];
}

const Z95 = 1.959963984540054; // standard normal 0.975 quantile (handbook tables: 1.95996)

describe("two boundaries, one binary trait: the saturated model, worked by hand", () => {
  // With one intercept per boundary, one trait term and one crisis interaction, two boundaries and
  // two states give 4 coefficients for 4 cells: the fit reproduces every cell's proportion, so the
  // odds ratios are the cells' cross-product ratios and the variance of a log odds ratio is the sum
  // of 1/cell (Woolf 1955, docs/sources.md section 2). Cells (victims, survivors):
  //   Background: reference a (12, 30), state b (25, 18)
  //   Crisis:     reference a (20, 15), state b (9, 16)
  const rows = [
    ...cells("Background", "a", 12, 30),
    ...cells("Background", "b", 25, 18),
    ...cells("Crisis", "a", 20, 15),
    ...cells("Crisis", "b", 9, 16),
  ];
  const result = crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "a" } });
  const [b] = result.contrasts;

  it("background, crisis and ratio are cross-product ratios of the cells", () => {
    const background = (25 * 30) / (18 * 12); // 750 / 216 = 3.472222
    const crisis = (9 * 15) / (16 * 20); // 135 / 320 = 0.421875
    expect(b.state).toBe("b");
    expectRelativeClose(b.backgroundOddsRatio, background, 1e-8);
    expectRelativeClose(b.crisisOddsRatio, crisis, 1e-8);
    expectRelativeClose(b.ratio.estimate, crisis / background, 1e-8); // 0.1215
  });

  it("the Wald interval of the ratio uses sqrt(sum of 1/cell) over the 8 cells", () => {
    const se = Math.sqrt(1 / 12 + 1 / 30 + 1 / 25 + 1 / 18 + 1 / 20 + 1 / 15 + 1 / 9 + 1 / 16); // 0.707911
    const logRatio = Math.log(((9 * 15) / (16 * 20)) / ((25 * 30) / (18 * 12)));
    expectRelativeClose(b.se, se, 1e-7);
    expectRelativeClose(b.ratio.ci[0], Math.exp(logRatio - Z95 * se), 1e-7);
    expectRelativeClose(b.ratio.ci[1], Math.exp(logRatio + Z95 * se), 1e-7);
    // the background interval is Woolf's over the background cells alone
    const seBackground = Math.sqrt(1 / 12 + 1 / 30 + 1 / 25 + 1 / 18);
    expectRelativeClose(b.backgroundCi[0], Math.exp(Math.log(750 / 216) - Z95 * seBackground), 1e-7);
    const seCrisis = Math.sqrt(1 / 20 + 1 / 15 + 1 / 9 + 1 / 16);
    expectRelativeClose(b.crisisCi[1], Math.exp(Math.log(135 / 320) + Z95 * seCrisis), 1e-7);
  });

  it("the likelihood-ratio statistic equals the drop in deviance, the reduced fit found by a separate profile search", () => {
    // Full model: every cell at its own proportion. Reduced model (no interaction): logit = a_k +
    // beta d; found here without the engine: for each beta, solve each boundary's intercept from
    // its score equation (victims = expected victims) by bisection, then maximise the profile
    // log-likelihood over beta by golden-section search.
    const table = [
      { a: [12, 30], b: [25, 18] },
      { a: [20, 15], b: [9, 16] },
    ];
    const cellLogLik = (v: number, s: number, p: number) => v * Math.log(p) + s * Math.log(1 - p);
    const expit = (x: number) => 1 / (1 + Math.exp(-x));
    const full = table.reduce((sum, t) => sum + cellLogLik(t.a[0], t.a[1], t.a[0] / (t.a[0] + t.a[1])) + cellLogLik(t.b[0], t.b[1], t.b[0] / (t.b[0] + t.b[1])), 0);
    const profile = (beta: number) =>
      table.reduce((sum, t) => {
        const victims = t.a[0] + t.b[0];
        let lo = -20;
        let hi = 20;
        for (let k = 0; k < 200; k++) {
          const mid = (lo + hi) / 2;
          const expected = (t.a[0] + t.a[1]) * expit(mid) + (t.b[0] + t.b[1]) * expit(mid + beta);
          if (expected < victims) lo = mid;
          else hi = mid;
        }
        const alpha = (lo + hi) / 2;
        return sum + cellLogLik(t.a[0], t.a[1], expit(alpha)) + cellLogLik(t.b[0], t.b[1], expit(alpha + beta));
      }, 0);
    let lo = -5;
    let hi = 5;
    const phi = (Math.sqrt(5) - 1) / 2;
    for (let k = 0; k < 200; k++) {
      const x1 = hi - phi * (hi - lo);
      const x2 = lo + phi * (hi - lo);
      if (profile(x1) > profile(x2)) hi = x2;
      else lo = x1;
    }
    const reduced = profile((lo + hi) / 2);
    const statistic = 2 * (full - reduced);
    expectRelativeClose(result.test.statistic, statistic, 1e-7);
    expect(result.test.df).toBe(1);
    expect(statistic).toBeGreaterThan(5); // the two ORs point in opposite directions
    expect(result.test.pValue).toBeLessThan(0.05);
    expect(result.firth).toBe(false);
    expect(result.method).toMatch(/^Logistic regression with boundary-specific intercepts/);
    expect(result.method).toMatch(/Jablonski \(1986\)/);
  });
});

describe("a mirrored table whose test statistic has a closed form", () => {
  // Background: a (10 victims, 20 survivors), b (20, 10); crisis: a (20, 10), b (10, 20). Swapping
  // the states and the boundaries together maps the data onto themselves and beta onto -beta, so
  // the reduced model's unique fit has beta = 0 and each boundary at its own proportion 30/60.
  // log L(reduced) = 120 ln(1/2); log L(full) = 4 (10 ln(1/3) + 20 ln(2/3)) = 80 ln 2 - 120 ln 3;
  // statistic = 2 (full - reduced) = 400 ln 2 - 240 ln 3 = 13.59192.
  const rows = [...cells("Background", "a", 10, 20), ...cells("Background", "b", 20, 10), ...cells("Crisis", "a", 20, 10), ...cells("Crisis", "b", 10, 20)];
  const result = crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "a" } });

  it("gives background 4, crisis 1/4, ratio 1/16 and the closed-form statistic", () => {
    const [b] = result.contrasts;
    expectRelativeClose(b.backgroundOddsRatio, 4, 1e-9);
    expectRelativeClose(b.crisisOddsRatio, 0.25, 1e-9);
    expectRelativeClose(b.ratio.estimate, 1 / 16, 1e-9);
    expectRelativeClose(b.se, Math.sqrt(4 / 10 + 4 / 20), 1e-9); // sqrt(0.6)
    expectRelativeClose(result.test.statistic, 400 * Math.log(2) - 240 * Math.log(3), 1e-8);
    // chi-square(1) upper tail of 13.59192 = erfc(sqrt(13.59192 / 2)) = 2.2716e-4 (jstat gives the same)
    expectRelativeClose(result.test.pValue, 2.2716e-4, 1e-4);
  });

  it("the level sets the interval width", () => {
    const at90 = crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "a" }, level: 0.9 });
    const z90 = -normalQuantile(0.05); // 1.644854 (handbook tables: 1.6449)
    expectAbsoluteClose(z90, 1.6449, 5e-5);
    expectRelativeClose(at90.contrasts[0].ratio.ci[1], Math.exp(Math.log(1 / 16) + z90 * Math.sqrt(0.6)), 1e-8);
    expect(at90.level).toBe(0.9);
  });
});

describe("three states: one dummy and one interaction per non-reference state", () => {
  // Still saturated (2 intercepts + 2 dummies + 2 interactions for 6 cells): the odds ratios are
  // cross-product ratios against the reference state "infaunal", and the test has 2 df.
  const rows = [
    ...cells("Boundary 2", "infaunal", 10, 30),
    ...cells("Boundary 2", "epifaunal", 15, 25),
    ...cells("Boundary 2", "nektonic", 8, 12),
    ...cells("Boundary 1", "infaunal", 30, 10),
    ...cells("Boundary 1", "epifaunal", 20, 20),
    ...cells("Boundary 1", "nektonic", 18, 6),
  ];
  const result = crisisVersusBackground({ rows, crisis: "Boundary 1", trait: { kind: "states", reference: "infaunal" } });

  it("orders the contrasts by state code and uses df = 2", () => {
    expect(result.contrasts.map((c) => c.state)).toEqual(["epifaunal", "nektonic"]);
    expect(result.test.df).toBe(2);
    expect(result.boundaries).toEqual(["Boundary 1", "Boundary 2"]);
  });

  it("matches the cells' cross-product ratios", () => {
    const [epifaunal, nektonic] = result.contrasts;
    expectRelativeClose(epifaunal.backgroundOddsRatio, (15 * 30) / (25 * 10), 1e-8); // 1.8
    expectRelativeClose(epifaunal.crisisOddsRatio, (20 * 10) / (20 * 30), 1e-8); // 1/3
    expectRelativeClose(nektonic.backgroundOddsRatio, (8 * 30) / (12 * 10), 1e-8); // 2
    expectRelativeClose(nektonic.crisisOddsRatio, (18 * 10) / (6 * 30), 1e-8); // 1
    expectRelativeClose(nektonic.se, Math.sqrt(1 / 8 + 1 / 12 + 1 / 10 + 1 / 30 + 1 / 18 + 1 / 6 + 1 / 30 + 1 / 10), 1e-7);
  });
});

describe("a numeric trait: the budworm data of Venables & Ripley (R's predict.glm help, docs/sources.md section 4)", () => {
  // glm(cbind(numdead, 20 - numdead) ~ sex * ldose) is this very model with the sexes as the two
  // "boundaries" and male as the "crisis": ldose is the background slope b, sexM:ldose is g.
  const ldose = [0, 1, 2, 3, 4, 5];
  const deadMale = [1, 4, 9, 13, 18, 20];
  const deadFemale = [0, 2, 6, 10, 12, 16];
  const rows: CrisisVersusBackgroundRow[] = [];
  ldose.forEach((dose, i) => {
    rows.push(...cells("M", dose, deadMale[i], 20 - deadMale[i]));
    rows.push(...cells("F", String(dose), deadFemale[i], 20 - deadFemale[i])); // numbers may come as text
  });
  const result = crisisVersusBackground({ rows, crisis: "M", trait: { kind: "numeric" } });
  const [slope] = result.contrasts;

  it("reproduces R's coefficients and standard error", () => {
    expect(slope.state).toBeNull();
    // R example output: ldose 0.9060 (SE 0.1671), sexM:ldose 0.3529 (SE 0.2700, z 1.307, p 0.191)
    expectAbsoluteClose(Math.log(slope.backgroundOddsRatio), 0.906, 5e-5);
    expectAbsoluteClose(slope.logRatio, 0.3529, 5e-5);
    expectAbsoluteClose(slope.se, 0.27, 5e-5);
    expectAbsoluteClose(slope.pValue, 0.191, 5e-4);
    expectAbsoluteClose(Math.log(slope.crisisOddsRatio), 0.906 + 0.3529, 1e-4);
    expectRelativeClose(slope.ratio.ci[0], Math.exp(slope.logRatio - Z95 * slope.se), 1e-12);
  });

  it("the likelihood-ratio test of the interaction has 1 df", () => {
    // From memory (Venables & Ripley's budworm analysis): the model sex + ldose has residual
    // deviance 6.757 on 9 df against 4.9937 on 8 df for sex * ldose (R example output), so the
    // statistic is about 1.763.
    expect(result.test.df).toBe(1);
    expectAbsoluteClose(result.test.statistic, 6.757 - 4.9937, 2e-3);
    expect(result.test.pValue).toBeGreaterThan(0.1);
  });
});

describe("the Challenger data mirrored: a numeric case with a closed-form test (docs/sources.md section 4)", () => {
  // Background: the 23 flights, any O-ring distress against temperature; crisis: the same flights
  // with the temperature negated. Swapping the boundaries and negating every value maps the data
  // onto themselves and the common slope onto its negative, so the reduced fit has slope 0 and
  // deviance 2 x 28.2672 (the null deviance); the full fit is two separate fits, deviance
  // 2 x 20.3152. Statistic = 2 x (28.2672 - 20.3152) = 15.904.
  const temperature = [53, 57, 58, 63, 66, 67, 67, 67, 68, 69, 70, 70, 70, 70, 72, 73, 75, 75, 76, 76, 78, 79, 81];
  const distress = [1, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 0, 0, 0, 1, 0, 0, 0, 0, 0] as const;
  const rows: CrisisVersusBackgroundRow[] = temperature.flatMap((t, i) => [
    { boundary: "background", outcome: distress[i], value: t },
    { boundary: "crisis", outcome: distress[i], value: -t },
  ]);
  const result = crisisVersusBackground({ rows, crisis: "crisis", trait: { kind: "numeric" } });

  it("slopes -0.23216 and +0.23216 (SE 0.10824 each), ratio exp(0.46432)", () => {
    const [c] = result.contrasts;
    expectAbsoluteClose(Math.log(c.backgroundOddsRatio), -0.23216, 5e-6);
    expectAbsoluteClose(Math.log(c.crisisOddsRatio), 0.23216, 5e-6);
    expectAbsoluteClose(c.logRatio, 0.46432, 1e-5);
    expectAbsoluteClose(c.se, Math.SQRT2 * 0.10824, 1e-5); // two independent fits: variances add
    expectAbsoluteClose(result.test.statistic, 2 * (28.2672 - 20.3152), 2e-4);
  });
});

describe("rows whose value is missing are left out", () => {
  const base = [...cells("Background", "a", 12, 30), ...cells("Background", "b", 25, 18), ...cells("Crisis", "a", 20, 15), ...cells("Crisis", "b", 9, 16)];
  const withMissing = [...base, ...cells("Crisis", null, 7, 1), ...cells("Background", null, 0, 5)];
  const expected = crisisVersusBackground({ rows: base, crisis: "Crisis", trait: { kind: "states", reference: "a" } });
  const result = crisisVersusBackground({ rows: withMissing, crisis: "Crisis", trait: { kind: "states", reference: "a" } });

  it("gives the same fit as without those rows and counts them", () => {
    expect(result.dropped).toBe(13);
    expect(result.n).toBe(base.length);
    expect(result.test.statistic).toBeCloseTo(expected.test.statistic, 10);
    expect(result.contrasts[0].ratio.estimate).toBeCloseTo(expected.contrasts[0].ratio.estimate, 10);
    expect(result.counts.crisis).toEqual({ rows: 60, victims: 29 });
  });
});

describe("separation: an empty cell switches to Firth's penalty and says so", () => {
  // Every taxon of state b died at the crisis (9 victims, 0 survivors). In a saturated model
  // Firth's modified score (Firth 1993) for the rows of cell j reads v_j - n_j p_j + (1/2 - p_j) = 0,
  // because each of the n_j rows has leverage 1/n_j; so p_j = (v_j + 1/2) / (n_j + 1): half a
  // victim and half a survivor added to every cell (Haldane-Anscombe, docs/sources.md sections 2 and 5).
  const table = { bgA: [12, 30], bgB: [25, 18], crA: [20, 15], crB: [9, 0] };
  const rows = [
    ...cells("Background", "a", table.bgA[0], table.bgA[1]),
    ...cells("Background", "b", table.bgB[0], table.bgB[1]),
    ...cells("Crisis", "a", table.crA[0], table.crA[1]),
    ...cells("Crisis", "b", table.crB[0], table.crB[1]),
  ];
  const result = crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "a" } });
  const [b] = result.contrasts;

  it("fits Firth's model and names it in the method", () => {
    expect(result.separation).toBe(true);
    expect(result.firth).toBe(true);
    expect(result.method).toMatch(/^Firth's bias-reduced logistic regression \(Firth 1993\)/);
    expect(result.method).toMatch(/penalized likelihood-ratio test/);
    expect(Number.isFinite(result.test.statistic)).toBe(true);
  });

  it("odds ratios are the half-corrected cross-product ratios, the SE from the penalized fit's information", () => {
    const odds = ([v, s]: number[]) => (v + 0.5) / (s + 0.5);
    const background = odds(table.bgB) / odds(table.bgA); // (25.5/18.5) / (12.5/30.5) = 3.3632
    const crisis = odds(table.crB) / odds(table.crA); // (9.5/0.5) / (20.5/15.5) = 14.366
    expectRelativeClose(b.backgroundOddsRatio, background, 1e-6);
    expectRelativeClose(b.crisisOddsRatio, crisis, 1e-6);
    expectRelativeClose(b.ratio.estimate, crisis / background, 1e-6);
    // information of cell j: n_j p_j (1 - p_j) with p_j = (v + 1/2) / (n + 1)
    const inverseInformation = ([v, s]: number[]) => {
      const n = v + s;
      const p = (v + 0.5) / (n + 1);
      return 1 / (n * p * (1 - p));
    };
    const se = Math.sqrt(Object.values(table).reduce((sum, cell) => sum + inverseInformation(cell), 0));
    expectRelativeClose(b.se, se, 1e-5);
  });
});

describe("input that cannot be fitted is refused with the reason", () => {
  const rows = [...cells("Background", "a", 12, 30), ...cells("Background", "b", 25, 18), ...cells("Crisis", "a", 20, 15), ...cells("Crisis", "b", 9, 16)];
  it("names the problem", () => {
    expect(() => crisisVersusBackground({ rows, crisis: "Other", trait: { kind: "states", reference: "a" } })).toThrow(/crisis boundary "Other" has no rows/);
    expect(() => crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "z" } })).toThrow(/reference state "z" does not occur/);
    const noBAtCrisis = rows.filter((r) => !(r.boundary === "Crisis" && r.value === "b"));
    expect(() => crisisVersusBackground({ rows: noBAtCrisis, crisis: "Crisis", trait: { kind: "states", reference: "a" } })).toThrow(/state "b" does not occur at the crisis/);
    const onlyCrisis = rows.filter((r) => r.boundary === "Crisis");
    expect(() => crisisVersusBackground({ rows: onlyCrisis, crisis: "Crisis", trait: { kind: "states", reference: "a" } })).toThrow(/at least one background boundary/);
    expect(() => crisisVersusBackground({ rows: [...rows, { boundary: "Crisis", outcome: 1, value: "x1" }], crisis: "Crisis", trait: { kind: "numeric" } })).toThrow(/row 0 has value "a"/);
  });
});

// --- Simulation (seeded): three background boundaries and a crisis, one binary trait ---------

interface Scenario {
  backgroundLogOdds: number;
  crisisLogOdds: number;
}

function simulate(seed: number, scenario: Scenario): CrisisVersusBackgroundRow[] {
  const uniform = createUniformSource(seed);
  const rows: CrisisVersusBackgroundRow[] = [];
  // invented boundaries with their own extinction levels (intercepts)
  const boundaries = [
    { label: "B1", intercept: -1.5, crisis: false },
    { label: "B2", intercept: -1.0, crisis: false },
    { label: "B3", intercept: -1.8, crisis: false },
    { label: "Crisis", intercept: 0.4, crisis: true },
  ];
  for (const boundary of boundaries) {
    for (let i = 0; i < 150; i++) {
      const hasState = uniform() < 0.4;
      const beta = boundary.crisis ? scenario.crisisLogOdds : scenario.backgroundLogOdds;
      const eta = boundary.intercept + (hasState ? beta : 0);
      const outcome = uniform() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
      rows.push({ boundary: boundary.label, outcome, value: hasState ? "deposit" : "suspension" });
    }
  }
  return rows;
}

function rejectionRate(scenario: Scenario, replicates: number, seed: number): number {
  let rejected = 0;
  for (let r = 0; r < replicates; r++) {
    const result = crisisVersusBackground({ rows: simulate(seed + r, scenario), crisis: "Crisis", trait: { kind: "states", reference: "suspension" } });
    if (result.test.pValue < 0.05) rejected++;
  }
  return rejected / replicates;
}

describe("simulation: the test finds a planted difference and keeps its nominal level", () => {
  it("with no difference it rejects at about 5%", () => {
    const replicates = 200;
    const rate = rejectionRate({ backgroundLogOdds: 0.7, crisisLogOdds: 0.7 }, replicates, 1500);
    console.log(`crisisVersusBackground, no planted difference: rejected ${(rate * 100).toFixed(1)}% of ${replicates} at alpha 0.05`);
    // Binomial(200, 0.05): P(X < 3) = 0.0023 and P(X > 19) = 0.0027 (jstat binomial cdf), so a
    // calibrated test gives 3 to 19 rejections 99.5% of the time.
    expect(rate * replicates).toBeGreaterThanOrEqual(3);
    expect(rate * replicates).toBeLessThanOrEqual(19);
  });

  it("with a planted difference (background OR 2, crisis OR 0.5) it rejects nearly always", () => {
    const replicates = 200;
    const rate = rejectionRate({ backgroundLogOdds: Math.log(2), crisisLogOdds: Math.log(0.5) }, replicates, 2500);
    console.log(`crisisVersusBackground, planted ratio 0.25: rejected ${(rate * 100).toFixed(1)}% of ${replicates} at alpha 0.05`);
    // Planned power (normal approximation, common practice, no source): with about 60/90 crisis
    // and 180/270 background taxa per state, var(log ratio) ~ 1/(60*0.25) + 1/(90*0.24) +
    // 1/(180*0.2) + 1/(270*0.15) = 0.166, SE 0.41, so |ln 0.25| / 0.41 = 3.4 standard errors:
    // power about 0.92.
    expect(rate).toBeGreaterThan(0.85);
  });

  it("the estimate recovers the planted ratio on a large sample", () => {
    const uniform = createUniformSource(99);
    const rows: CrisisVersusBackgroundRow[] = [];
    for (const [label, intercept, beta] of [["B1", -1.2, 0.5], ["B2", -0.8, 0.5], ["Crisis", 0.3, 1.5]] as const) {
      for (let i = 0; i < 20000; i++) {
        const d = uniform() < 0.5;
        const p = 1 / (1 + Math.exp(-(intercept + (d ? beta : 0))));
        rows.push({ boundary: label, outcome: uniform() < p ? 1 : 0, value: d ? "x" : "o" });
      }
    }
    const result = crisisVersusBackground({ rows, crisis: "Crisis", trait: { kind: "states", reference: "o" } });
    const [c] = result.contrasts;
    expect(c.ratio.ci[0]).toBeLessThan(Math.exp(1));
    expect(c.ratio.ci[1]).toBeGreaterThan(Math.exp(1));
    expectAbsoluteClose(Math.log(c.backgroundOddsRatio), 0.5, 0.1);
    expectAbsoluteClose(Math.log(c.crisisOddsRatio), 1.5, 0.1);
  });
});
