import { twoSidedCriticalValue } from "./distributions";
import { averageRanks } from "./ranks";
import { countAtMost, countBelow } from "./sortedSearch";
import { assertBinaryLabels, assertFiniteArray, assertLevel } from "./validate";

export interface RocAucResult {
  /** Area under the ROC curve: P(score of a case > score of a control), ties counting one half. */
  auc: number;
  /**
   * DeLong standard error of the area; at an area of 0 or 1, where DeLong's variance collapses to 0,
   * the half-width of the score interval divided by z instead (seMethod says which).
   */
  se: number;
  seMethod: "delong" | "score-interval";
  /**
   * Score-type interval: the values of the true area A whose Hanley-McNeil variance V(A) puts the
   * observed area within z sqrt(V(A)) of A. It stays inside [0, 1] and never has zero width.
   */
  ci: [number, number];
  ciMethod: string;
  level: number;
  /** Mann-Whitney U of the cases: pairs (case, control) with the case scored higher, ties one half. */
  mannWhitneyU: number;
  /** Rows labelled 1 (e.g. extinct, or threatened) and 0. */
  cases: number;
  controls: number;
}

/**
 * Area under the ROC curve of scores against 0/1 labels, where label 1 marks the cases the score
 * should rank higher. The area equals the Mann-Whitney statistic U/(n1 n0) (Hanley & McNeil 1982),
 * computed from mid-ranks in O(n log n). Its standard error follows DeLong, DeLong &
 * Clarke-Pearson (1988): with the structural components V10(X_i) = share of controls below case i
 * and V01(Y_j) = share of cases above control j (ties one half), Var = s^2(V10)/n1 + s^2(V01)/n0.
 *
 * The interval is not area +- z se, which collapses to a point at an area of 0 or 1 and is too
 * narrow for small samples. It is a score-type (Wilson-like) interval: the Hanley-McNeil variance
 * written as a function of the true area, V(A) = A(1 - A)/(n1 n0) [1 + (n1 - 1)(1 - A)/(2 - A) +
 * (n0 - 1)A/(1 + A)] (Hanley & McNeil 1982, with Q1 = A/(2 - A), Q2 = 2A^2/(1 + A)), is inverted:
 * the interval holds every A with (area - A)^2 <= z^2 V(A), found by bisection (Newcombe 2006,
 * Statistics in Medicine 25:559, proposed intervals of this kind; from memory). It holds at an area
 * of 0 or 1 and never has zero width.
 *
 * @example
 * // R wilcox.test help example (Hollander & Wolfe 1973 p. 69): x as cases, y as controls
 * rocAuc([0.8, 0.83, 1.89, 1.04, 1.45, 1.38, 1.91, 1.64, 0.73, 1.46, 1.15, 0.88, 0.9, 0.74, 1.21],
 *        [1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0])
 * // => { auc: 0.7, se: 0.1418, mannWhitneyU: 35, cases: 10, controls: 5, ... }
 * // Four cases ranked above three controls: auc 1, ci about [0.55, 1] (never [1, 1]).
 */
export function rocAuc(scores: number[], labels: number[], opts: { level?: number } = {}): RocAucResult {
  const fn = "rocAuc";
  assertFiniteArray(fn, "scores", scores);
  assertBinaryLabels(fn, "labels", labels, scores.length);
  const level = opts.level ?? 0.95;
  assertLevel(fn, level);
  const caseScores: number[] = [];
  const controlScores: number[] = [];
  scores.forEach((s, i) => (labels[i] === 1 ? caseScores : controlScores).push(s));
  const cases = caseScores.length;
  const controls = controlScores.length;
  if (cases < 2 || controls < 2) {
    throw new Error(`${fn}: ${cases} case(s) labelled 1 and ${controls} control(s) labelled 0; DeLong's standard error needs at least 2 of each`);
  }

  const ranks = averageRanks(scores);
  let caseRankSum = 0;
  for (let i = 0; i < scores.length; i++) if (labels[i] === 1) caseRankSum += ranks[i];
  const mannWhitneyU = caseRankSum - (cases * (cases + 1)) / 2;
  const auc = mannWhitneyU / (cases * controls);

  controlScores.sort((a, b) => a - b);
  caseScores.sort((a, b) => a - b);
  // V10: for each case, controls strictly below plus half the tied ones, as a share of all controls.
  const v10 = caseScores.map((x) => {
    const below = countBelow(controlScores, x);
    return (below + 0.5 * (countAtMost(controlScores, x) - below)) / controls;
  });
  // V01: for each control, cases strictly above plus half the tied ones.
  const v01 = controlScores.map((y) => {
    const atMost = countAtMost(caseScores, y);
    return (cases - atMost + 0.5 * (atMost - countBelow(caseScores, y))) / cases;
  });
  const delong = Math.sqrt(sampleVariance(v10) / cases + sampleVariance(v01) / controls);
  const z = twoSidedCriticalValue(level);
  const ci = scoreInterval(auc, cases, controls, z);
  const collapsed = !(delong > 0);
  return {
    auc,
    se: collapsed ? (ci[1] - ci[0]) / (2 * z) : delong,
    seMethod: collapsed ? "score-interval" : "delong",
    ci,
    ciMethod: "score interval inverting the Hanley-McNeil variance (Hanley & McNeil 1982; Newcombe 2006)",
    level,
    mannWhitneyU,
    cases,
    controls,
  };
}

/** Hanley & McNeil's (1982) variance of the area as a function of the true area A. */
export function hanleyMcNeilVariance(area: number, cases: number, controls: number): number {
  const q1 = area / (2 - area);
  const q2 = (2 * area * area) / (1 + area);
  return (area * (1 - area) + (cases - 1) * (q1 - area * area) + (controls - 1) * (q2 - area * area)) / (cases * controls);
}

/** Every A in [0, 1] with (auc - A)^2 <= z^2 V(A): the bounds by bisection, each to 1e-12. */
function scoreInterval(auc: number, cases: number, controls: number, z: number): [number, number] {
  const outside = (a: number): boolean => (auc - a) ** 2 > z * z * hanleyMcNeilVariance(a, cases, controls);
  const bound = (from: number, to: number): number => {
    // `from` lies outside the interval (or is the end of [0, 1]), `to` inside.
    let out = from;
    let inside = to;
    for (let i = 0; i < 200 && Math.abs(out - inside) > 1e-12; i++) {
      const mid = (out + inside) / 2;
      if (outside(mid)) out = mid;
      else inside = mid;
    }
    return inside;
  };
  const lower = auc <= 0 || !outside(0) ? 0 : bound(0, auc);
  const upper = auc >= 1 || !outside(1) ? 1 : bound(1, auc);
  return [lower, upper];
}

function sampleVariance(values: number[]): number {
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  return values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1);
}
