import { describe, expect, it } from "vitest";
import { logisticRegression } from "@shared/stats/logisticRegression";
import { oddsRatio } from "@shared/stats/oddsRatio";
import { createUniformSource } from "@shared/stats/random";
import type { Table2x2 } from "@shared/stats/types";
import { expectAbsoluteClose } from "./helpers";

// Published worked example: endometrial cancer data (Heinze & Schemper 2002), 79 patients; NV
// (neovasculization), PI (pulsatility index), EH (endometrium height), outcome HG (high grade).
// Rows NV,PI,EH,HG as listed in docs/sources.md section 5.
const ENDOMETRIAL = `0,13,1.64,0;0,16,2.26,0;0,8,3.14,0;0,34,2.68,0;0,20,1.28,0;0,5,2.31,0;0,17,1.8,0;0,10,1.68,0;0,26,1.56,0;0,17,2.31,0;
0,8,2.01,0;0,7,1.89,0;0,20,3.15,0;0,10,1.23,0;0,18,1.27,0;0,16,1.76,0;0,18,2,0;0,8,2.64,1;0,29,0.88,1;0,12,1.27,1;
0,20,1.37,1;1,38,0.97,1;1,22,1.14,1;1,7,0.88,1;1,25,0.91,1;1,15,0.58,1;0,7,0.97,1;0,28,1.5,0;0,11,1.33,0;0,19,2.37,0;
0,10,1.82,0;0,10,3.13,0;0,18,1.31,0;0,14,1.92,0;0,21,1.64,0;0,11,2.01,0;0,17,1.88,0;0,25,1.93,0;0,16,2.11,0;0,19,1.29,0;
0,15,1.72,0;0,33,0.75,0;0,24,1.92,0;0,48,1.84,1;0,12,1.11,1;0,19,1.61,1;0,2,1.18,1;1,22,1.44,1;1,40,1.18,1;1,5,0.93,1;
1,0,1.17,1;0,21,1.19,1;0,15,1.06,1;0,29,2.02,0;0,15,2.29,0;0,12,2.33,0;0,3,2.9,0;0,20,1.7,0;0,23,1.41,0;0,12,2.25,0;
0,22,1.54,0;0,42,1.97,0;0,15,1.75,0;0,13,2.16,0;0,14,2.57,0;0,19,1.37,0;0,12,3.61,0;0,13,2.04,0;0,10,2.17,0;0,12,1.69,1;
1,49,0.27,1;0,6,1.84,1;0,5,1.3,1;0,17,0.96,1;1,11,1.01,1;1,21,0.98,1;0,5,0.35,1;1,19,1.02,1;0,33,0.85,1`
  .split(";")
  .map((row) => row.trim().split(",").map(Number));
const X = ENDOMETRIAL.map((row) => row.slice(0, 3));
const HG = ENDOMETRIAL.map((row) => row[3]);

describe("endometrial data: separation and Firth's penalized likelihood (Heinze & Schemper 2002)", () => {
  const fit = logisticRegression(X, HG, { names: ["NV", "PI", "EH"], terms: [{ name: "NV", columns: [0] }] });

  it("detects the quasi-complete separation and names NV", () => {
    // All 13 patients with NV = 1 have HG = 1 (docs/sources.md section 5, COMPUTED from the data).
    expect(fit.separation).toBe(true);
    expect(fit.separatedPredictors).toEqual(["NV"]);
    expect(fit.firth).toBe(true);
    expect(fit.firthReason).toBe("separation");
    expect(fit.converged).toBe(true);
  });

  it("finds that separation before fitting, by the linear programme (Konis 2007), as quasi-complete", () => {
    // Quasi-complete: the NV = 1 rows sit strictly on the victims' side, the others overlap (docs/sources.md section 5).
    expect(fit.separationMethod).toBe("linear-programme");
    expect(fit.separationKind).toBe("quasi-complete");
  });

  it("estimates and Wald standard errors", () => {
    // logistf output as recorded in firthlogist's tests and recomputed (docs/sources.md section 5).
    const expected: Array<[string, number, number]> = [
      ["(Intercept)", 3.77456, 1.48869],
      ["NV", 2.92927, 1.55076],
      ["PI", -0.034752, 0.039578],
      ["EH", -2.60416, 0.77602],
    ];
    expected.forEach(([name, estimate, se], j) => {
      expect(fit.coefficients[j].name).toBe(name);
      expectAbsoluteClose(fit.coefficients[j].estimate, estimate, 1e-5);
      expectAbsoluteClose(fit.coefficients[j].se, se, 1e-5);
    });
    expectAbsoluteClose(fit.penalizedLogLik!, -24.0373, 5e-5); // docs/sources.md section 5 (COMPUTED)
  });

  it("profile penalized likelihood intervals", () => {
    expect(fit.ciMethod).toBe("profile");
    // docs/sources.md section 5; NV 0.61 - 7.85 also as recalled from Heinze & Schemper 2002 (from memory).
    const expected: Array<[number, number]> = [
      [1.08254, 7.20928],
      [0.60972, 7.85463],
      [-0.12446, 0.04046],
      [-4.36518, -1.23272],
    ];
    expected.forEach(([lower, upper], j) => {
      expectAbsoluteClose(fit.coefficients[j].ci[0], lower, 1e-4);
      expectAbsoluteClose(fit.coefficients[j].ci[1], upper, 1e-4);
    });
  });

  it("penalized likelihood ratio tests", () => {
    expect(fit.pValueMethod).toBe("penalized-likelihood-ratio");
    // PLR chi-square 8.198, 6.7985, 0.7468, 17.759 with p 0.00419, 0.00912, 0.387, 2.51e-5 (docs/sources.md section 5).
    expectAbsoluteClose(fit.coefficients[0].pValue, 0.00419, 5e-6);
    expectAbsoluteClose(fit.coefficients[1].pValue, 0.00912, 5e-6);
    expectAbsoluteClose(fit.coefficients[2].pValue, 0.387, 5e-4);
    expectAbsoluteClose(fit.coefficients[3].pValue, 2.51e-5, 5e-8);
    expectAbsoluteClose(fit.terms![0].chiSquare, 6.7985, 5e-5);
    expect(fit.termTestMethod).toBe("penalized-likelihood-ratio");
  });

  it("Wald intervals on request", () => {
    const wald = logisticRegression(X, HG, { names: ["NV", "PI", "EH"], firthIntervals: "wald" });
    expect(wald.ciMethod).toBe("wald");
    const nv = wald.coefficients[1];
    expectAbsoluteClose(nv.estimate, 2.92927, 1e-5);
    expectAbsoluteClose(nv.ci[0], nv.estimate - 1.959963984540054 * nv.se, 1e-12);
  });

  it("without Firth the maximum likelihood fit diverges along NV", () => {
    const ml = logisticRegression(X, HG, { names: ["NV", "PI", "EH"], firth: false });
    expect(ml.separation).toBe(true);
    expect(ml.firth).toBe(false);
    // The NV estimate runs off and its standard error explodes (common practice, no source).
    expect(ml.coefficients[1].estimate).toBeGreaterThan(10);
    expect(ml.coefficients[1].se).toBeGreaterThan(100);
    // The unpenalized deviance is the same number whichever estimates are reported.
    expect(ml.deviance).toBe(logisticRegression(X, HG, { names: ["NV", "PI", "EH"] }).deviance);
  });
});

describe("2x2 special case: Firth's log odds ratio equals the Haldane-Anscombe corrected one", () => {
  // Tables and values from docs/sources.md section 5 (COMPUTED there): 3.044522, 2.901422, 3.806662.
  const cases: Array<[Table2x2, number]> = [
    [
      [
        [10, 0],
        [5, 5],
      ],
      3.044522,
    ],
    [
      [
        [3, 0],
        [2, 6],
      ],
      2.901422,
    ],
    [
      [
        [7, 3],
        [0, 10],
      ],
      3.806662,
    ],
  ];
  it.each(cases)("table %j", (table, expected) => {
    const rowsX: number[][] = [];
    const y: number[] = [];
    // Row 0 = trait present (x = 1), row 1 = absent; column 0 = extinct (y = 1).
    table.forEach((row, r) =>
      row.forEach((count, c) => {
        for (let k = 0; k < count; k++) {
          rowsX.push([r === 0 ? 1 : 0]);
          y.push(c === 0 ? 1 : 0);
        }
      }),
    );
    const fit = logisticRegression(rowsX, y, { firth: true });
    expect(fit.firthReason).toBe("requested");
    expectAbsoluteClose(fit.coefficients[1].estimate, expected, 5e-7);
    expectAbsoluteClose(fit.coefficients[1].estimate, oddsRatio(table, { correction: "always" }).logEstimate, 1e-8);
  });

  it("Firth SE 1.6446 exceeds the Woolf-Haldane SE 1.5681 for [[10,0],[5,5]] (docs/sources.md section 5)", () => {
    const rowsX = [...Array(10).fill([1]), ...Array(5).fill([0]), ...Array(5).fill([0])];
    const y = [...Array(10).fill(1), ...Array(5).fill(1), ...Array(5).fill(0)];
    const fit = logisticRegression(rowsX, y);
    expect(fit.separation).toBe(true); // the zero cell separates
    expectAbsoluteClose(fit.coefficients[1].se, 1.6446, 5e-5);
    expectAbsoluteClose(oddsRatio([[10, 0], [5, 5]]).se, 1.5681, 5e-5);
  });
});

describe("separation that only a combination of predictors produces", () => {
  it("names every predictor of the separating combination", () => {
    // Invented: y = 1 exactly when x1 + x2 > 0, yet neither predictor alone orders the outcomes.
    const rowsX = [
      [2, -1],
      [-1, 2],
      [1, 1],
      [3, -1],
      [-2, 1],
      [1, -2],
      [-1, -1],
      [-3, 2],
    ];
    const y = [1, 1, 1, 1, 0, 0, 0, 0];
    const fit = logisticRegression(rowsX, y);
    expect(fit.separation).toBe(true);
    expect(fit.separatedPredictors).toEqual(["x1", "x2"]);
    for (const c of fit.coefficients) expect(Number.isFinite(c.estimate)).toBe(true);
  });
});

describe("property: Firth estimates stay finite under separation (seeded random data)", () => {
  it("for complete and quasi-complete separation", () => {
    const random = createUniformSource(2718);
    let fitted = 0;
    for (let trial = 0; trial < 20; trial++) {
      const n = 30 + Math.floor(random() * 40);
      const threshold = random() - 0.5;
      const quasi = trial % 2 === 1;
      const raw = Array.from({ length: n }, () => [random() * 2 - 1, random()]);
      // Complete: y = 1 exactly when x1 exceeds the threshold. Quasi-complete (like NV above): x1 is
      // the 0/1 indicator of exceeding it, rows with x1 = 1 all have y = 1, the others a random outcome.
      const rowsX = quasi ? raw.map(([a, b]) => [a > threshold ? 1 : 0, b]) : raw;
      const y = raw.map(([a]) => (a > threshold ? 1 : quasi ? (random() < 0.5 ? 1 : 0) : 0));
      if (quasi && rowsX.every((row) => row[0] === rowsX[0][0])) continue;
      if (y.every((v) => v === y[0])) continue;
      const fit = logisticRegression(rowsX, y, { names: ["x1", "x2"] });
      expect(fit.separation).toBe(true);
      expect(fit.separatedPredictors).toContain("x1");
      expect(fit.firth).toBe(true);
      for (const c of fit.coefficients) {
        expect(Number.isFinite(c.estimate)).toBe(true);
        expect(Number.isFinite(c.se)).toBe(true);
      }
      fitted++;
    }
    expect(fitted).toBeGreaterThanOrEqual(15);
  });

  it("a small separated group among many taxa is found (the deviance criterion alone stops early)", () => {
    // Invented: 13 of 20,000 taxa carry a rare state and all went extinct; the rest follow a weak trend.
    const random = createUniformSource(5);
    const rowsX: number[][] = [];
    const y: number[] = [];
    for (let i = 0; i < 20_000; i++) {
      const rare = i < 13 ? 1 : 0;
      const size = random() * 2 - 1;
      rowsX.push([rare, size]);
      y.push(rare === 1 ? 1 : random() < 1 / (1 + Math.exp(-0.5 * size)) ? 1 : 0);
    }
    const ml = logisticRegression(rowsX, y, { names: ["rare", "size"], firth: false });
    expect(ml.converged).toBe(true); // glm's criterion is met while the coefficient still runs off
    expect(ml.separation).toBe(true);
    expect(ml.separatedPredictors).toEqual(["rare"]);
    const firth = logisticRegression(rowsX, y, { names: ["rare", "size"], firthIntervals: "wald" });
    expect(firth.firthReason).toBe("separation");
    expect(Number.isFinite(firth.coefficients[1].estimate)).toBe(true);
  });

  it("strong but overlapping data are not flagged", () => {
    const rowsX = [[1], [2], [3], [4], [5], [6], [7], [8], [9], [10]];
    const y = [0, 0, 0, 1, 0, 1, 1, 1, 1, 1]; // invented
    const fit = logisticRegression(rowsX, y);
    expect(fit.separation).toBe(false);
    expect(fit.firth).toBe(false);
  });
});
