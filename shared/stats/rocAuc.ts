import { twoSidedCriticalValue } from "./distributions";
import { averageRanks } from "./ranks";
import { countAtMost, countBelow } from "./sortedSearch";
import { assertBinaryLabels, assertFiniteArray, assertLevel } from "./validate";

export interface RocAucResult {
  /** Area under the ROC curve: P(score of a case > score of a control), ties counting one half. */
  auc: number;
  /** DeLong standard error of the area. */
  se: number;
  /** auc +- z se, clipped to [0, 1]. */
  ci: [number, number];
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
 * @example
 * // R wilcox.test help example (Hollander & Wolfe 1973 p. 69): x as cases, y as controls
 * rocAuc([0.8, 0.83, 1.89, 1.04, 1.45, 1.38, 1.91, 1.64, 0.73, 1.46, 1.15, 0.88, 0.9, 0.74, 1.21],
 *        [1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 0, 0, 0, 0, 0])
 * // => { auc: 0.7, se: 0.1418, mannWhitneyU: 35, cases: 10, controls: 5, ... }
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
  const se = Math.sqrt(sampleVariance(v10) / cases + sampleVariance(v01) / controls);
  const z = twoSidedCriticalValue(level);
  return { auc, se, ci: [Math.max(0, auc - z * se), Math.min(1, auc + z * se)], level, mannWhitneyU, cases, controls };
}

function sampleVariance(values: number[]): number {
  const mean = values.reduce((s, v) => s + v, 0) / values.length;
  return values.reduce((s, v) => s + (v - mean) ** 2, 0) / (values.length - 1);
}
