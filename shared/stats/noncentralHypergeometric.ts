// The (Fisher) noncentral hypergeometric distribution of the top-left cell of a 2x2 table given its
// margins, held in log space so that tables with millions of taxa neither overflow nor lose
// precision. It is the conditional distribution on which Fisher's exact test, the conditional
// maximum likelihood odds ratio and its exact interval rest (Fisher 1935; Cornfield 1956).

import { LogSumAccumulator, logSumExp } from "./distributions";

// Terms below exp(-WINDOW_LOG_CUTOFF) of the largest one are dropped from tilted sums; with a
// log-concave pmf what is dropped is below 1e-20 of the total.
const WINDOW_LOG_CUTOFF = 50;

/**
 * Support lo..hi of X = a given the margins of [[a, b], [c, d]], with the central (odds ratio 1)
 * log-probabilities up to a constant: logWeight[i] = ln P(X = lo + i) + constant.
 */
export interface HypergeometricSupport {
  lo: number;
  hi: number;
  logWeight: Float64Array;
  /** ln of the sum of exp(logWeight): subtract it to get normalised log-probabilities. */
  logTotal: number;
  /** Index of the central mode, where logWeight is 0. */
  modeIndex: number;
}

/**
 * Builds the support for first-column total m, second-column total n and first-row total k (R's
 * dhyper parameterisation). Probabilities are built outward from the mode by the exact ratio
 * P(x + 1) / P(x) = (k - x)(m - x) / ((x + 1)(n - k + x + 1)), so each value carries a relative
 * error of a few roundings per step instead of the cancellation of large log-factorials.
 */
export function hypergeometricSupport(m: number, n: number, k: number): HypergeometricSupport {
  const lo = Math.max(0, k - n);
  const hi = Math.min(k, m);
  const size = hi - lo + 1;
  const logWeight = new Float64Array(size);
  const mode = Math.min(hi, Math.max(lo, Math.floor(((k + 1) * (m + 1)) / (m + n + 2))));
  const modeIndex = mode - lo;
  for (let x = mode; x < hi; x++) {
    const i = x - lo;
    logWeight[i + 1] = logWeight[i] + Math.log(((k - x) * (m - x)) / ((x + 1) * (n - k + x + 1)));
  }
  for (let x = mode; x > lo; x--) {
    const i = x - lo;
    logWeight[i - 1] = logWeight[i] - Math.log(((k - x + 1) * (m - x + 1)) / (x * (n - k + x)));
  }
  return { lo, hi, logWeight, logTotal: logSumExp(logWeight), modeIndex };
}

/** ln P(X <= x) under odds ratio 1, summed in log space (accurate however small). */
export function logLowerTail(support: HypergeometricSupport, x: number): number {
  if (x < support.lo) return -Infinity;
  if (x >= support.hi) return 0;
  return Math.min(0, logSumExp(support.logWeight, 0, x - support.lo + 1) - support.logTotal);
}

/** ln P(X >= x) under odds ratio 1. */
export function logUpperTail(support: HypergeometricSupport, x: number): number {
  if (x <= support.lo) return 0;
  if (x > support.hi) return -Infinity;
  return Math.min(0, logSumExp(support.logWeight, x - support.lo, support.logWeight.length) - support.logTotal);
}

/**
 * ln of the two-sided p-value: the total probability of values no more likely than x, where "no
 * more likely" allows a relative tolerance of 1e-7 (the rule of R's fisher.test).
 */
export function logTwoSidedTail(support: HypergeometricSupport, x: number): number {
  const { logWeight } = support;
  const threshold = logWeight[x - support.lo] + Math.log1p(1e-7);
  const accumulator = new LogSumAccumulator();
  for (let i = 0; i < logWeight.length; i++) if (logWeight[i] <= threshold) accumulator.add(logWeight[i]);
  return Math.min(0, accumulator.value() - support.logTotal);
}

/**
 * Window of the distribution tilted by odds ratio exp(theta): weights proportional to
 * exp(logWeight[i] + theta * i), normalised, over the indices that carry any mass.
 */
interface TiltedWindow {
  start: number;
  weights: Float64Array;
}

function tiltedWindow(support: HypergeometricSupport, theta: number): TiltedWindow {
  const { logWeight } = support;
  const last = logWeight.length - 1;
  // The tilted log-weights are concave in i, so their maximum is where the increments turn negative.
  let low = 0;
  let high = last;
  while (low < high) {
    const mid = (low + high) >> 1;
    if (logWeight[mid + 1] - logWeight[mid] + theta > 0) low = mid + 1;
    else high = mid;
  }
  const peak = low;
  const value = (i: number): number => logWeight[i] - logWeight[peak] + theta * (i - peak);
  let start = peak;
  while (start > 0 && value(start - 1) > -WINDOW_LOG_CUTOFF) start--;
  let end = peak;
  while (end < last && value(end + 1) > -WINDOW_LOG_CUTOFF) end++;
  const weights = new Float64Array(end - start + 1);
  let total = 0;
  for (let i = start; i <= end; i++) {
    const w = Math.exp(value(i));
    weights[i - start] = w;
    total += w;
  }
  for (let i = 0; i < weights.length; i++) weights[i] /= total;
  return { start, weights };
}

/** E[X] under odds ratio exp(theta). */
export function noncentralMean(support: HypergeometricSupport, theta: number): number {
  const { start, weights } = tiltedWindow(support, theta);
  let mean = 0;
  for (let i = 0; i < weights.length; i++) mean += weights[i] * (support.lo + start + i);
  return mean;
}

/** P(X <= x) under odds ratio exp(theta). */
export function noncentralLowerTail(support: HypergeometricSupport, theta: number, x: number): number {
  const { start, weights } = tiltedWindow(support, theta);
  const last = Math.min(weights.length - 1, x - support.lo - start);
  let sum = 0;
  for (let i = 0; i <= last; i++) sum += weights[i];
  return Math.min(1, sum);
}

/** P(X >= x) under odds ratio exp(theta). */
export function noncentralUpperTail(support: HypergeometricSupport, theta: number, x: number): number {
  const { start, weights } = tiltedWindow(support, theta);
  let sum = 0;
  for (let i = Math.max(0, x - support.lo - start); i < weights.length; i++) sum += weights[i];
  return Math.min(1, sum);
}
