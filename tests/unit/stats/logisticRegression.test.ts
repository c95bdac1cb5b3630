import LogisticRegression from "ml-logistic-regression";
import { Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import { normalQuantile } from "@shared/stats/distributions";
import { logisticRegression } from "@shared/stats/logisticRegression";
import { createUniformSource } from "@shared/stats/random";
import { expectAbsoluteClose, expectRelativeClose } from "./helpers";

// Published worked example: Space Shuttle O-ring data (Dalal, Fowlkes & Hoadley 1989), launch
// temperature (F) and O-rings with thermal distress out of 6, in the Swan & Rigby (1995) listing
// (docs/sources.md section 4).
const TEMPERATURE = [53, 57, 58, 63, 66, 67, 67, 67, 68, 69, 70, 70, 70, 70, 72, 73, 75, 75, 76, 76, 78, 79, 81];
const DAMAGED_OF_SIX = [2, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 0, 0, 0, 2, 0, 0, 0, 0, 0];

describe("Challenger O-rings, any distress per flight (docs/sources.md section 4)", () => {
  const anyDistress = DAMAGED_OF_SIX.map((d) => (d > 0 ? 1 : 0));
  const fit = logisticRegression(
    TEMPERATURE.map((t) => [t]),
    anyDistress,
    { names: ["temperature"] },
  );

  it("coefficients, standard errors and Wald tests", () => {
    const [intercept, slope] = fit.coefficients;
    expect(intercept.name).toBe("(Intercept)");
    // Commonly quoted binary model (docs/sources.md section 4); tolerances are half a unit in the last digit.
    expectAbsoluteClose(intercept.estimate, 15.0429, 5e-5);
    expectAbsoluteClose(intercept.se, 7.3786, 5e-5);
    expectAbsoluteClose(slope.estimate, -0.23216, 5e-6);
    expectAbsoluteClose(slope.se, 0.10824, 5e-6);
    expectAbsoluteClose(intercept.z, 2.039, 5e-4); // Wald z 2.039 and -2.145, p 0.0415 and 0.0320
    expectAbsoluteClose(slope.z, -2.145, 5e-4);
    expectAbsoluteClose(intercept.pValue, 0.0415, 5e-5);
    expectAbsoluteClose(slope.pValue, 0.032, 5e-5);
    expectRelativeClose(slope.oddsRatio, Math.exp(-0.23216), 1e-5);
  });

  it("deviance, null deviance and AIC as glm reports them", () => {
    expectAbsoluteClose(fit.deviance, 20.3152, 5e-5); // residual deviance 20.3152 on 21 df
    expectAbsoluteClose(fit.nullDeviance, 28.2672, 5e-5); // null deviance 28.2672 on 22 df
    expectAbsoluteClose(fit.aic, 24.3152, 5e-5);
    expect(fit.dfResidual).toBe(21);
    expect(fit.dfNull).toBe(22);
    expectAbsoluteClose(fit.logLik, -20.3152 / 2, 5e-5);
    expect(fit.converged).toBe(true);
    expect(fit.separation).toBe(false);
    expect(fit.firth).toBe(false);
  });

  it("likelihood ratio test of the temperature term equals the drop in deviance", () => {
    const withTerm = logisticRegression(
      TEMPERATURE.map((t) => [t]),
      anyDistress,
      { terms: [{ name: "temperature", columns: [0] }] },
    );
    // 28.2672 - 20.3152 = 7.9520 from the published deviances.
    expectAbsoluteClose(withTerm.terms![0].chiSquare, 7.952, 1e-4);
    expect(withTerm.terms![0].df).toBe(1);
    expect(withTerm.termTestMethod).toBe("likelihood-ratio");
  });
});

describe("Challenger binomial model, expanded to one row per O-ring (Dalal et al. 1989)", () => {
  it("reproduces the published estimates; the binomial deviance follows from the fitted values", () => {
    const X: number[][] = [];
    const y: number[] = [];
    TEMPERATURE.forEach((t, f) => {
      for (let k = 0; k < 6; k++) {
        X.push([t]);
        y.push(k < DAMAGED_OF_SIX[f] ? 1 : 0);
      }
    });
    const fit = logisticRegression(X, y);
    const [intercept, slope] = fit.coefficients;
    // Dalal et al. 1989 p. 4: 5.085 (SE 3.052) and -0.1156 (SE 0.047); COMPUTED 5.08498, -0.115601,
    // 3.05249, 0.047024 (docs/sources.md section 4).
    expectRelativeClose(intercept.estimate, 5.08498, 1e-5);
    expectRelativeClose(slope.estimate, -0.115601, 1e-5);
    expectRelativeClose(intercept.se, 3.05249, 1e-5);
    expectRelativeClose(slope.se, 0.047024, 1e-4);
    // G^2 = 18.086 on 21 df is the deviance of the grouped (binomial) form; recompute it from the
    // fitted probabilities, since the binary expansion's deviance differs by a constant.
    let binomialDeviance = 0;
    TEMPERATURE.forEach((t, f) => {
      const prob = 1 / (1 + Math.exp(-(intercept.estimate + slope.estimate * t)));
      const d = DAMAGED_OF_SIX[f];
      if (d > 0) binomialDeviance += 2 * d * Math.log(d / (6 * prob));
      if (d < 6) binomialDeviance += 2 * (6 - d) * Math.log((6 - d) / (6 * (1 - prob)));
    });
    expectAbsoluteClose(binomialDeviance, 18.086, 5e-4);
  });
});

describe("budworm, sex * ldose (Venables & Ripley 2002 pp. 190-2; R predict.glm help; docs/sources.md section 4)", () => {
  // Binomial counts out of 20 expanded to binary rows. Coefficients and SEs equal those of the
  // binomial fit; the deviance and AIC of R's output (4.9937, 43.104) belong to the binomial form, so
  // they are recomputed from the fitted probabilities rather than compared with fit.deviance.
  const numberDead = [1, 4, 9, 13, 18, 20, 0, 2, 6, 10, 12, 16];
  const X: number[][] = [];
  const y: number[] = [];
  numberDead.forEach((dead, g) => {
    const male = g < 6 ? 1 : 0;
    const ldose = g % 6;
    for (let k = 0; k < 20; k++) {
      X.push([male, ldose, male * ldose]);
      y.push(k < dead ? 1 : 0);
    }
  });
  const fit = logisticRegression(X, y, { names: ["sexM", "ldose", "sexM:ldose"], terms: [{ name: "all", columns: [0, 1, 2] }] });

  it("coefficients, standard errors, z and p", () => {
    const expected: Array<[string, number, number, number, number]> = [
      ["(Intercept)", -2.9935, 0.5527, -5.416, 6.09e-8],
      ["sexM", 0.175, 0.7783, 0.225, 0.822],
      ["ldose", 0.906, 0.1671, 5.422, 5.89e-8],
      ["sexM:ldose", 0.3529, 0.27, 1.307, 0.191],
    ];
    expected.forEach(([name, estimate, se, z, p], j) => {
      const c = fit.coefficients[j];
      expect(c.name).toBe(name);
      expectAbsoluteClose(c.estimate, estimate, 5e-5); // R output, 4 decimals
      expectAbsoluteClose(c.se, se, 5e-5);
      expectAbsoluteClose(c.z, z, 5e-4);
      expectRelativeClose(c.pValue, p, 5e-3);
    });
  });

  it("binomial deviance 4.9937 and AIC 43.104 from the fitted probabilities", () => {
    let deviance = 0;
    let logLik = 0;
    numberDead.forEach((dead, g) => {
      const eta = fit.coefficients.reduce((s, c, j) => s + c.estimate * [1, ...X[g * 20]][j], 0);
      const prob = 1 / (1 + Math.exp(-eta));
      if (dead > 0) deviance += 2 * dead * Math.log(dead / (20 * prob));
      if (dead < 20) deviance += 2 * (20 - dead) * Math.log((20 - dead) / (20 * (1 - prob)));
      let logChoose = 0;
      for (let k = 1; k <= dead; k++) logChoose += Math.log((20 - dead + k) / k);
      logLik += logChoose + dead * Math.log(prob) + (20 - dead) * Math.log(1 - prob);
    });
    expectAbsoluteClose(deviance, 4.9937, 5e-5); // R: residual deviance 4.9937 on 8 df
    expectAbsoluteClose(-2 * logLik + 2 * 4, 43.104, 5e-4); // R: AIC 43.104
  });

  it("the test of all terms equals null minus residual deviance, the same in binary and binomial form", () => {
    // 124.8756 - 4.9937 = 119.8819 (R output): the saturated-model constant cancels in differences.
    expectAbsoluteClose(fit.terms![0].chiSquare, 124.8756 - 4.9937, 2e-4);
    expectAbsoluteClose(fit.nullDeviance - fit.deviance, 119.8819, 2e-4);
    expect(fit.terms![0].df).toBe(3);
  });
});

describe("cross-check against ml-logistic-regression (gradient ascent) on seeded data without separation", () => {
  it("fitted probabilities agree", () => {
    const random = createUniformSource(31337);
    const n = 300;
    const X = Array.from({ length: n }, () => [normalQuantile(0.001 + 0.998 * random()), random() < 0.4 ? 1 : 0]);
    const y = X.map(([a, b]) => (random() < 1 / (1 + Math.exp(-(-0.4 + 0.8 * a - 0.6 * b))) ? 1 : 0));
    const fit = logisticRegression(X, y);
    const reference = new LogisticRegression({ numSteps: 4000, learningRate: 2e-3 });
    reference.train(new Matrix(X.map((row) => [1, ...row])), Matrix.columnVector(y));
    // Its first one-vs-all classifier models P(y != 0), i.e. P(y = 1) here.
    const scores: number[] = reference.classifiers[0].testScores(new Matrix(X.map((row) => [1, ...row])));
    let largest = 0;
    X.forEach((row, i) => {
      const eta = fit.coefficients[0].estimate + fit.coefficients[1].estimate * row[0] + fit.coefficients[2].estimate * row[1];
      largest = Math.max(largest, Math.abs(1 / (1 + Math.exp(-eta)) - scores[i]));
    });
    expect(largest).toBeLessThan(1e-3); // loose: gradient ascent stops short of the optimum
  });
});

describe("accepts a flat matrix", () => {
  it("gives the same fit as rows of numbers", () => {
    const anyDistress = DAMAGED_OF_SIX.map((d) => (d > 0 ? 1 : 0));
    const flat = logisticRegression({ data: Float64Array.from(TEMPERATURE), rows: TEMPERATURE.length, columns: 1 }, anyDistress);
    const rows = logisticRegression(
      TEMPERATURE.map((t) => [t]),
      anyDistress,
    );
    expect(flat.coefficients).toEqual(rows.coefficients);
  });
});

describe("rejects impossible input", () => {
  const X = [[1], [2], [3], [4]];
  it("says what is wrong", () => {
    expect(() => logisticRegression(X, [0, 1, 2, 0])).toThrow("logisticRegression: y[2] is 2; labels must be 0 or 1");
    expect(() => logisticRegression(X, [0, 1, 0])).toThrow("y has 3 values but 4 were expected");
    expect(() => logisticRegression([[1], [NaN], [3], [4]], [0, 1, 0, 1])).toThrow("X[1][0] is NaN");
    expect(() => logisticRegression([[1], [Infinity], [3], [4]], [0, 1, 0, 1])).toThrow("X[1][0] is Infinity");
    expect(() => logisticRegression([[1], [2, 3], [3], [4]], [0, 1, 0, 1])).toThrow("row 1 of X has 2 values but row 0 has 1");
    expect(() => logisticRegression([], [])).toThrow("X has no rows");
    expect(() => logisticRegression(X, [0, 0, 0, 0])).toThrow("y is 0 in every row");
    expect(() => logisticRegression([[5], [5], [5], [5]], [0, 1, 0, 1])).toThrow('predictor "x1" is constant');
    expect(() => logisticRegression([[1, 2], [2, 4], [3, 6], [4, 8], [5, 10]], [0, 1, 0, 1, 1])).toThrow('predictor "x2" is a linear combination');
    expect(() => logisticRegression([[1, 2], [2, 1]], [0, 1])).toThrow("2 rows cannot estimate 3 coefficients");
    expect(() => logisticRegression(X, [0, 1, 0, 1], { names: ["a", "b"] })).toThrow("names has 2 entries but X has 1 columns");
    expect(() => logisticRegression(X, [0, 1, 0, 1], { terms: [{ name: "t", columns: [3] }] })).toThrow('term "t" names column 3');
    expect(() => logisticRegression(X, [0, 1, 0, 1], { level: -1 })).toThrow("level is -1");
    expect(() => logisticRegression(X, [0, 1, 0, 1], { firth: "yes" as unknown as boolean })).toThrow("firth must be true, false or left out");
  });
});
