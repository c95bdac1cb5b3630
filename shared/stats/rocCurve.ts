import { assertBinaryLabels, assertFiniteArray } from "./validate";

/** One point of an ROC curve: calling every score >= threshold a case. */
export interface RocPoint {
  threshold: number;
  truePositiveRate: number;
  falsePositiveRate: number;
}

/**
 * Points of the empirical ROC curve of scores against 0/1 labels (label 1 = case), one per
 * distinct score from the highest down, starting at (0, 0) with threshold Infinity. Joining them by
 * straight lines gives the trapezoidal area, which equals rocAuc's area (Hanley & McNeil 1982).
 *
 * @example
 * rocCurve([0.9, 0.4, 0.7, 0.2], [1, 0, 1, 0])
 * // => [{ threshold: Infinity, truePositiveRate: 0, falsePositiveRate: 0 },
 * //     { threshold: 0.9, truePositiveRate: 0.5, falsePositiveRate: 0 },
 * //     { threshold: 0.7, truePositiveRate: 1, falsePositiveRate: 0 },
 * //     { threshold: 0.4, truePositiveRate: 1, falsePositiveRate: 0.5 },
 * //     { threshold: 0.2, truePositiveRate: 1, falsePositiveRate: 1 }]
 */
export function rocCurve(scores: number[], labels: number[]): RocPoint[] {
  const fn = "rocCurve";
  assertFiniteArray(fn, "scores", scores);
  assertBinaryLabels(fn, "labels", labels, scores.length);
  let cases = 0;
  for (const label of labels) cases += label;
  const controls = labels.length - cases;
  if (cases === 0 || controls === 0) throw new Error(`${fn}: labels need at least one 1 and one 0`);
  const order = scores.map((_, i) => i).sort((a, b) => scores[b] - scores[a]);
  const points: RocPoint[] = [{ threshold: Infinity, truePositiveRate: 0, falsePositiveRate: 0 }];
  let truePositives = 0;
  let falsePositives = 0;
  for (let k = 0; k < order.length; k++) {
    const i = order[k];
    if (labels[i] === 1) truePositives++;
    else falsePositives++;
    // Tied scores move together: emit a point only after the last of them.
    if (k + 1 < order.length && scores[order[k + 1]] === scores[i]) continue;
    points.push({ threshold: scores[i], truePositiveRate: truePositives / cases, falsePositiveRate: falsePositives / controls });
  }
  return points;
}
