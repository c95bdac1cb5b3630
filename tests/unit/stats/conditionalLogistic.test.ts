import { describe, expect, it } from "vitest";
import { conditionalLogisticSlope, logisticRegression } from "@shared/stats";
import { conditionalLogLik, prepareConditionalStrata } from "@shared/stats/conditionalLogistic";
import { createUniformSource } from "@shared/stats/random";
import { expectRelativeClose } from "./helpers";

describe("conditionalLogisticSlope", () => {
  it("gives the ratio of discordant pairs for 1:1 matched pairs with a 0/1 exposure", () => {
    // Breslow & Day 1980, vol. 1, ch. 7 (from memory): for matched pairs the conditional MLE of the
    // odds ratio is n10 / n01 (pairs with only the case exposed over pairs with only the control
    // exposed), with Var(ln OR) = 1/n10 + 1/n01. Invented counts: 20, 5, and 10 concordant pairs.
    const x: number[] = [];
    const y: number[] = [];
    const pair: number[] = [];
    const add = (caseX: number, controlX: number, count: number): void => {
      for (let k = 0; k < count; k++) {
        const p = pair.length / 2;
        x.push(caseX, controlX);
        y.push(1, 0);
        pair.push(p, p);
      }
    };
    add(1, 0, 20);
    add(0, 1, 5);
    add(1, 1, 6);
    add(0, 0, 4);
    const fit = conditionalLogisticSlope(x, y, pair, pair.length / 2);
    expect(fit.converged).toBe(true);
    expect(fit.informativeStrata).toBe(25);
    expectRelativeClose(fit.estimate, Math.log(20 / 5), 1e-9);
    expectRelativeClose(fit.se, Math.sqrt(1 / 20 + 1 / 5), 1e-6);
  });

  it("matches a logistic regression on within-pair differences for 1:1 pairs with a numeric covariate", () => {
    // For pairs the conditional likelihood is prod expit(beta (x_case - x_control)) (Breslow & Day
    // 1980, vol. 1, ch. 7); rows (d, 1) and (-d, 0) in a logistic regression with an intercept give
    // the same slope (the intercept is 0 by symmetry) and twice the information, so se * sqrt(2).
    // The engine's logistic regression is checked against R's glm in logisticRegression.test.ts.
    const random = createUniformSource(77);
    const x: number[] = [];
    const y: number[] = [];
    const pair: number[] = [];
    const differences: number[] = [];
    for (let p = 0; p < 60; p++) {
      const a = random() * 3;
      const b = random() * 3;
      const caseFirst = random() < 1 / (1 + Math.exp(-0.8 * (a - b)));
      const [xc, xk] = caseFirst ? [a, b] : [b, a];
      x.push(xc, xk);
      y.push(1, 0);
      pair.push(p, p);
      differences.push(xc - xk);
    }
    const fit = conditionalLogisticSlope(x, y, pair, 60);
    const rows = [...differences.map((d) => [d]), ...differences.map((d) => [-d])];
    const labels = [...differences.map(() => 1), ...differences.map(() => 0)];
    const engine = logisticRegression(rows, labels);
    expect(Math.abs(engine.coefficients[0].estimate)).toBeLessThan(1e-8);
    expectRelativeClose(fit.estimate, engine.coefficients[1].estimate, 1e-7);
    expectRelativeClose(fit.se, engine.coefficients[1].se * Math.SQRT2, 1e-6);
  });

  it("computes the conditional log-likelihood of a stratum as its definition over all subsets", () => {
    // Definition (Breslow & Day 1980, vol. 1, ch. 7): beta * sum over cases of x - ln sum over every
    // subset S of the stratum's size-m subsets of exp(beta * sum_S x). Enumerated by brute force.
    const x = [0.3, 1.7, -0.4, 2.2, 0.9, -1.1, 0.5];
    const y = [1, 0, 1, 1, 0, 0, 0];
    const beta = 0.63;
    const m = 3;
    let total = 0;
    for (let mask = 0; mask < 1 << x.length; mask++) {
      let bits = 0;
      let sum = 0;
      for (let i = 0; i < x.length; i++) if (mask & (1 << i)) {
        bits++;
        sum += x[i];
      }
      if (bits === m) total += Math.exp(beta * sum);
    }
    const caseSum = x.reduce((a, v, i) => a + (y[i] ? v : 0), 0);
    const expected = beta * caseSum - Math.log(total);
    const strata = prepareConditionalStrata(x, y, new Int32Array(x.length), 1);
    expectRelativeClose(conditionalLogLik(strata, beta).logLik, expected, 1e-12);
    // The score is the derivative: check by a central difference.
    const h = 1e-5;
    const numeric = (conditionalLogLik(strata, beta + h).logLik - conditionalLogLik(strata, beta - h).logLik) / (2 * h);
    expectRelativeClose(conditionalLogLik(strata, beta).score, numeric, 1e-6);
  });

  it("says the estimate runs off when x orders the outcomes within every stratum", () => {
    const fit = conditionalLogisticSlope([0, 1, 2, 3, 0, 1, 2, 3], [0, 0, 1, 1, 0, 1, 1, 1], [0, 0, 0, 0, 1, 1, 1, 1], 2);
    expect(fit.separated).toBe(true);
    expect(fit.converged).toBe(false);
  });

  it("drops strata with one outcome or one value", () => {
    const fit = conditionalLogisticSlope([0, 1, 2, 1, 1, 0, 1], [1, 1, 1, 0, 1, 0, 1], [0, 0, 0, 1, 1, 2, 2], 3);
    expect(fit.informativeStrata).toBe(1);
  });
});
