import { wilcoxonRankSum } from "simple-statistics";
import { describe, expect, it } from "vitest";
import { createUniformSource } from "@shared/stats/random";
import { hanleyMcNeilVariance, rocAuc } from "@shared/stats/rocAuc";
import { rocCurve } from "@shared/stats/rocCurve";
import { expectAbsoluteClose, expectRelativeClose } from "./helpers";

// Published worked example: Hanley & McNeil (1982) CT ratings 1 (definitely normal) to 5
// (definitely abnormal) of 58 normal and 51 abnormal images. The counts are FROM MEMORY
// (docs/sources.md section 10); the paper's AUC 0.893 and SE about 0.032 (also from memory) fit them.
const NORMAL_COUNTS = [33, 6, 6, 11, 2];
const ABNORMAL_COUNTS = [3, 2, 2, 11, 33];

function ratings(): { scores: number[]; labels: number[] } {
  const scores: number[] = [];
  const labels: number[] = [];
  NORMAL_COUNTS.forEach((count, r) => {
    for (let k = 0; k < count; k++) {
        scores.push(r + 1);
        labels.push(0);
      }
  });
  ABNORMAL_COUNTS.forEach((count, r) => {
    for (let k = 0; k < count; k++) {
        scores.push(r + 1);
        labels.push(1);
      }
  });
  return { scores, labels };
}

describe("Hanley & McNeil (1982) rating example (data from memory)", () => {
  it("area and DeLong standard error", () => {
    const { scores, labels } = ratings();
    const result = rocAuc(scores, labels);
    expectRelativeClose(result.auc, 2642 / 2958, 1e-12); // U/(51*58) = 0.89317 (docs/sources.md section 10, COMPUTED)
    expectAbsoluteClose(result.auc, 0.893, 5e-4); // Hanley & McNeil 1982 (from memory)
    expectAbsoluteClose(result.se, 0.0307, 5e-5); // DeLong SE (docs/sources.md section 10, COMPUTED)
    expect(result.cases).toBe(51);
    expect(result.controls).toBe(58);
    // The Hanley-McNeil standard error at the observed area: 0.0325 (docs/sources.md section 10, COMPUTED).
    expectAbsoluteClose(Math.sqrt(hanleyMcNeilVariance(result.auc, 51, 58)), 0.0325, 5e-5);
    // With 109 images the score interval is near auc +- 1.96 x 0.0325 (Wald with Hanley-McNeil's SE),
    // skewed toward 0.5 as a score interval of a bounded quantity is.
    expectAbsoluteClose(result.ci[0], result.auc - 1.959963984540054 * 0.0325, 0.03);
    expectAbsoluteClose(result.ci[1], result.auc + 1.959963984540054 * 0.0325, 0.03);
    expect(result.ci[0]).toBeLessThan(result.auc - 1.959963984540054 * 0.0325);
    expect(result.seMethod).toBe("delong");
  });
});

describe("small and perfectly separated samples: the interval never collapses", () => {
  const z = 1.959963984540054; // normal 0.975 quantile (standard normal table)
  it("7 species, 4 threatened all ranked above 3 not threatened: AUC 1 with an interval of real width", () => {
    const result = rocAuc([0.9, 0.8, 0.75, 0.7, 0.3, 0.2, 0.1], [1, 1, 1, 1, 0, 0, 0]);
    expect(result.auc).toBe(1);
    expect(result.ci[1]).toBe(1);
    expect(result.ci[0]).toBeGreaterThan(0.3);
    expect(result.ci[0]).toBeLessThan(0.8);
    expect(result.se).toBeGreaterThan(0.05);
    expect(result.seMethod).toBe("score-interval");
    // The lower bound solves the score equation (1 - A)^2 = z^2 V(A) with Hanley & McNeil's V.
    expectAbsoluteClose((1 - result.ci[0]) ** 2, z * z * hanleyMcNeilVariance(result.ci[0], 4, 3), 1e-9);
    expect(result.ciMethod).toMatch(/score interval inverting the Hanley-McNeil variance/);
  });

  it("is the mirror image at AUC 0", () => {
    const up = rocAuc([0.9, 0.8, 0.75, 0.7, 0.3, 0.2, 0.1], [1, 1, 1, 1, 0, 0, 0]);
    const down = rocAuc([0.9, 0.8, 0.75, 0.7, 0.3, 0.2, 0.1], [0, 0, 0, 1, 1, 1, 1]);
    expect(down.auc).toBe(0);
    expect(down.ci[0]).toBe(0);
    expect(down.ci[1]).toBeGreaterThan(0.2);
    // Swapping the roles of cases and controls mirrors the area: A -> 1 - A, with n1 and n0 swapped.
    const swapped = rocAuc([0.9, 0.8, 0.75, 0.7, 0.3, 0.2, 0.1], [1, 1, 1, 0, 0, 0, 0]);
    expectAbsoluteClose(down.ci[1], 1 - swapped.ci[0], 1e-9);
    expect(up.ci[1] - up.ci[0]).toBeGreaterThan(0.1);
  });

  it("narrows as the samples grow, and always holds the observed area", () => {
    let width = 1;
    for (const n of [3, 6, 12, 24, 48]) {
      const scores = Array.from({ length: 2 * n }, (_, i) => i);
      const labels = scores.map((i) => (i >= n ? 1 : 0));
      const result = rocAuc(scores, labels);
      expect(result.ci[1] - result.ci[0]).toBeLessThan(width);
      expect(result.ci[1] - result.ci[0]).toBeGreaterThan(0);
      width = result.ci[1] - result.ci[0];
    }
  });
});

describe("R wilcox.test example (Hollander & Wolfe 1973 p. 69f)", () => {
  const x = [0.8, 0.83, 1.89, 1.04, 1.45, 1.38, 1.91, 1.64, 0.73, 1.46];
  const y = [1.15, 0.88, 0.9, 0.74, 1.21];
  it("W = 35, so AUC = 35/50 = 0.70", () => {
    const result = rocAuc([...x, ...y], [...x.map(() => 1), ...y.map(() => 0)]);
    expect(result.mannWhitneyU).toBe(35); // R output "W = 35"
    expectRelativeClose(result.auc, 0.7, 1e-12); // Hanley & McNeil 1982: AUC = U/(n1 n0)
    expectAbsoluteClose(result.se, 0.1418, 5e-5); // DeLong SE (docs/sources.md section 10, COMPUTED)
  });
});

describe("cross-checks", () => {
  it("U equals simple-statistics' Wilcoxon rank sum minus n1(n1 + 1)/2, with ties (seeded random data)", () => {
    const random = createUniformSource(1982);
    for (let trial = 0; trial < 50; trial++) {
      const n = 6 + Math.floor(random() * 60);
      // Scores on a coarse grid, so that ties occur.
      const scores = Array.from({ length: n }, () => Math.floor(random() * 8));
      const labels = scores.map((_, i) => (i < 2 ? 1 : i < 4 ? 0 : random() < 0.4 ? 1 : 0));
      const cases = scores.filter((_, i) => labels[i] === 1);
      const controls = scores.filter((_, i) => labels[i] === 0);
      const result = rocAuc(scores, labels);
      const rankSum = wilcoxonRankSum(cases, controls);
      expectAbsoluteClose(result.mannWhitneyU, rankSum - (cases.length * (cases.length + 1)) / 2, 1e-9);
      // Direct pair count (the definition in Hanley & McNeil 1982).
      let pairs = 0;
      for (const c of cases) for (const d of controls) pairs += c > d ? 1 : c === d ? 0.5 : 0;
      expectAbsoluteClose(result.auc, pairs / (cases.length * controls.length), 1e-12);
      expect(result.ci[0]).toBeGreaterThanOrEqual(0);
      expect(result.ci[1]).toBeLessThanOrEqual(1);
    }
  });

  it("clips the interval to [0, 1]", () => {
    const result = rocAuc([1, 2, 3, 4, 5, 6], [0, 0, 0, 1, 1, 1]);
    expect(result.auc).toBe(1);
    expect(result.ci[1]).toBe(1);
    expect(result.ci[0]).toBeLessThan(1);
  });
});

describe("ROC curve", () => {
  it("its trapezoidal area equals the AUC (Hanley & McNeil 1982)", () => {
    const { scores, labels } = ratings();
    const points = rocCurve(scores, labels);
    expect(points[0]).toEqual({ threshold: Infinity, truePositiveRate: 0, falsePositiveRate: 0 });
    expect(points.at(-1)).toMatchObject({ truePositiveRate: 1, falsePositiveRate: 1 });
    expect(points.length).toBe(6); // one point per distinct rating, plus the origin
    let area = 0;
    for (let k = 1; k < points.length; k++) {
      area += ((points[k].falsePositiveRate - points[k - 1].falsePositiveRate) * (points[k].truePositiveRate + points[k - 1].truePositiveRate)) / 2;
    }
    expectRelativeClose(area, rocAuc(scores, labels).auc, 1e-12);
  });
});

describe("rejects impossible input", () => {
  it("says what is wrong", () => {
    expect(() => rocAuc([1, 2, 3, 4], [0, 1, 2, 1])).toThrow("rocAuc: labels[2] is 2; labels must be 0 or 1");
    expect(() => rocAuc([1, 2, 3], [0, 1, 0, 1])).toThrow("labels has 4 values but 3 were expected");
    expect(() => rocAuc([1, NaN, 3, 4], [0, 1, 0, 1])).toThrow("scores[1] is NaN");
    expect(() => rocAuc([1, 2, 3, 4], [0, 1, 1, 1])).toThrow("3 case(s) labelled 1 and 1 control(s) labelled 0");
    expect(() => rocCurve([1, 2], [1, 1])).toThrow("rocCurve: labels need at least one 1 and one 0");
  });
});
