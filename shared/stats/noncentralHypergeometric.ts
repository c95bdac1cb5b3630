// The (Fisher) noncentral hypergeometric distribution of the top-left cell of a 2x2 table given its
// margins, held in log space so that tables with millions of taxa neither overflow nor lose
// precision. It is the conditional distribution on which Fisher's exact test, the conditional
// maximum likelihood odds ratio and its exact interval rest (Fisher 1935; Cornfield 1956).
//
// The support of a table with a million taxa has hundreds of thousands of values, nearly all of them
// with probabilities far below anything a sum can notice. Log-weights are therefore computed lazily,
// outward from the mode, only as far as some sum needs them; every sum stops where its terms fall
// below exp(-WINDOW_LOG_CUTOFF) of its largest term. The pmf is log-concave, so past that point the
// terms keep shrinking at least geometrically and what is left out is below 1e-18 of the sum.

import { logSumExp } from "./distributions";

const WINDOW_LOG_CUTOFF = 50;

/**
 * Support lo..hi of X = a given the margins of [[a, b], [c, d]], with the central (odds ratio 1)
 * log-probabilities up to a constant: logWeight(i) = ln P(X = lo + i) + constant, 0 at the mode.
 *
 * Probabilities are built outward from the mode by the exact ratio
 * P(x + 1) / P(x) = (k - x)(m - x) / ((x + 1)(n - k + x + 1)), so each value carries a relative
 * error of a few roundings per step instead of the cancellation of large log-factorials.
 */
export class HypergeometricSupport {
  readonly lo: number;
  readonly hi: number;
  /** Index of the central mode, where logWeight is 0. */
  readonly modeIndex: number;
  /** ln of the sum of all weights: subtract it to get normalised log-probabilities. */
  readonly logTotal: number;
  private readonly weights: Float64Array;
  // Indices whose log-weight has been computed: from..to, always containing the mode.
  private from: number;
  private to: number;

  /** First-column total m, second-column total n and first-row total k (R's dhyper parameterisation). */
  constructor(
    private readonly m: number,
    private readonly n: number,
    private readonly k: number,
  ) {
    this.lo = Math.max(0, k - n);
    this.hi = Math.min(k, m);
    this.weights = new Float64Array(this.hi - this.lo + 1);
    const mode = Math.min(this.hi, Math.max(this.lo, Math.floor(((k + 1) * (m + 1)) / (m + n + 2))));
    this.modeIndex = mode - this.lo;
    this.from = this.modeIndex;
    this.to = this.modeIndex;
    const first = this.lowerEnd(this.modeIndex, -WINDOW_LOG_CUTOFF);
    const last = this.upperEnd(this.modeIndex, -WINDOW_LOG_CUTOFF);
    this.logTotal = logSumExp(this.weights, first, last + 1);
  }

  get size(): number {
    return this.weights.length;
  }

  /** ln P(X = lo + index) + constant (0 at the mode). */
  logWeight(index: number): number {
    if (index < this.from) this.extendDown(index);
    else if (index > this.to) this.extendUp(index);
    return this.weights[index];
  }

  /** P(lo + index + 1) / P(lo + index), known without walking the support. */
  stepRatio(index: number): number {
    const { m, n, k } = this;
    const x = this.lo + index;
    return ((k - x) * (m - x)) / ((x + 1) * (n - k + x + 1));
  }

  /** ln of stepRatio(index). */
  logStepRatio(index: number): number {
    return Math.log(this.stepRatio(index));
  }

  /** Smallest index at or below `index` whose log-weight, and every one between, exceeds `floor` (log-weights fall away from the mode). */
  lowerEnd(index: number, floor: number): number {
    let i = index;
    while (i > 0 && this.logWeight(i - 1) > floor) i--;
    return i;
  }

  /** Largest index at or above `index` whose log-weight, and every one between, exceeds `floor`. */
  upperEnd(index: number, floor: number): number {
    const last = this.weights.length - 1;
    let i = index;
    while (i < last && this.logWeight(i + 1) > floor) i++;
    return i;
  }

  /** ln of the sum of weights over first..last, a run on one side of the mode whose largest term is at `peak`. */
  logSumFrom(peak: number, first: number, last: number): number {
    const floor = this.logWeight(peak) - WINDOW_LOG_CUTOFF;
    const start = Math.max(first, peak > first ? this.lowerEnd(peak, floor) : peak);
    const end = Math.min(last, peak < last ? this.upperEnd(peak, floor) : peak);
    return logSumExp(this.weights, start, end + 1);
  }

  private extendDown(index: number): void {
    const { weights } = this;
    for (let i = this.from; i > index; i--) weights[i - 1] = weights[i] - this.logStepRatio(i - 1);
    this.from = index;
  }

  private extendUp(index: number): void {
    const { weights } = this;
    for (let i = this.to; i < index; i++) weights[i + 1] = weights[i] + this.logStepRatio(i);
    this.to = index;
  }
}

/** Support and central weights for first-column total m, second-column total n and first-row total k. */
export function hypergeometricSupport(m: number, n: number, k: number): HypergeometricSupport {
  return new HypergeometricSupport(m, n, k);
}

/** ln P(X <= x) under odds ratio 1, summed in log space (accurate however small). */
export function logLowerTail(support: HypergeometricSupport, x: number): number {
  if (x < support.lo) return -Infinity;
  if (x >= support.hi) return 0;
  const index = x - support.lo;
  const peak = Math.min(index, support.modeIndex);
  return Math.min(0, support.logSumFrom(peak, 0, index) - support.logTotal);
}

/** ln P(X >= x) under odds ratio 1. */
export function logUpperTail(support: HypergeometricSupport, x: number): number {
  if (x <= support.lo) return 0;
  if (x > support.hi) return -Infinity;
  const index = x - support.lo;
  const peak = Math.max(index, support.modeIndex);
  return Math.min(0, support.logSumFrom(peak, index, support.size - 1) - support.logTotal);
}

/**
 * ln of the two-sided p-value: the total probability of values no more likely than x, where "no
 * more likely" allows a relative tolerance of 1e-7 (the rule of R's fisher.test).
 */
export function logTwoSidedTail(support: HypergeometricSupport, x: number): number {
  const threshold = support.logWeight(x - support.lo) + Math.log1p(1e-7);
  // The weights rise to the mode and fall after it, so the values no more likely than x are the
  // indices up to `left` and from `right` on.
  let left = support.modeIndex;
  while (left >= 0 && support.logWeight(left) > threshold) left--;
  let right = support.modeIndex + 1;
  while (right < support.size && support.logWeight(right) > threshold) right++;
  const lowerPart = left >= 0 ? support.logSumFrom(left, 0, left) : -Infinity;
  const upperPart = right < support.size ? support.logSumFrom(right, right, support.size - 1) : -Infinity;
  return Math.min(0, logSumExp([lowerPart, upperPart]) - support.logTotal);
}

/**
 * Sums over the distribution tilted by odds ratio exp(theta): weights proportional to
 * exp(logWeight(i) + theta * i), over the indices that carry any mass.
 */
interface TiltedSums {
  total: number;
  /** Sum of weight times the value lo + i. */
  moment: number;
  /** Sum of the weights of values <= `split`. */
  atOrBelow: number;
  /** Sum of the weights of values > `split` (summed apart so that a small upper tail keeps its digits). */
  above: number;
}

function tiltedSums(support: HypergeometricSupport, theta: number, split = -Infinity): TiltedSums {
  // The tilted log-weights are concave in i, so their maximum is where the increments turn negative;
  // the increments are known in closed form, so the peak is found without walking the support.
  const last = support.size - 1;
  let low = 0;
  let high = last;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (support.logStepRatio(mid) + theta > 0) low = mid + 1;
    else high = mid;
  }
  const peak = low;
  // Weights relative to the peak, walked outward by multiplying the step ratios: no exp or log per
  // term, and the rounding that accumulates over a window of thousands of steps stays near 1e-14.
  const { lo } = support;
  const factor = Math.exp(theta);
  const floor = Math.exp(-WINDOW_LOG_CUTOFF);
  const splitIndex = split - lo;
  let total = 1;
  let moment = lo + peak;
  let atOrBelow = peak <= splitIndex ? 1 : 0;
  let above = 1 - atOrBelow;
  let w = 1;
  for (let i = peak + 1; i <= last; i++) {
    w *= support.stepRatio(i - 1) * factor;
    if (!(w > floor)) break;
    total += w;
    moment += w * (lo + i);
    if (i <= splitIndex) atOrBelow += w;
    else above += w;
  }
  w = 1;
  for (let i = peak - 1; i >= 0; i--) {
    w /= support.stepRatio(i) * factor;
    if (!(w > floor)) break;
    total += w;
    moment += w * (lo + i);
    if (i <= splitIndex) atOrBelow += w;
    else above += w;
  }
  return { total, moment, atOrBelow, above };
}

/** E[X] under odds ratio exp(theta). */
export function noncentralMean(support: HypergeometricSupport, theta: number): number {
  const { total, moment } = tiltedSums(support, theta);
  return moment / total;
}

/** P(X <= x) under odds ratio exp(theta). */
export function noncentralLowerTail(support: HypergeometricSupport, theta: number, x: number): number {
  const { total, atOrBelow } = tiltedSums(support, theta, x);
  return Math.min(1, atOrBelow / total);
}

/** P(X >= x) under odds ratio exp(theta). */
export function noncentralUpperTail(support: HypergeometricSupport, theta: number, x: number): number {
  const { total, above } = tiltedSums(support, theta, x - 1);
  return Math.min(1, above / total);
}
