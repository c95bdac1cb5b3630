import { studentTTwoSidedP } from "./distributions";
import { averageRanks } from "./ranks";
import type { Alternative } from "./types";
import { assertFiniteArray } from "./validate";

export interface SpearmanResult {
  /** Spearman's rank correlation: Pearson's correlation of the (average) ranks. */
  rho: number;
  /** t = rho sqrt((n - 2) / (1 - rho^2)), referred to Student's t on n - 2 df. */
  statistic: number;
  df: number;
  pValue: number;
  n: number;
  alternative: Alternative;
  /** How the p-value was obtained: exact enumeration of every permutation up to EXACT_MAX_N pairs, else the t approximation. */
  method: "exact-permutation" | "t-approximation";
}

/** Up to this many pairs the p-value enumerates all n! permutations (10! = 3,628,800). */
export const SPEARMAN_EXACT_MAX_N = 10;

/**
 * Spearman's rank correlation (Spearman 1904) between paired values, tied values sharing their
 * average rank. The test of rho = 0 is exact for small samples: up to SPEARMAN_EXACT_MAX_N pairs
 * the p-value is the share of all n! permutations of y against x (ties kept as mid-ranks) whose
 * correlation is at least as extreme, a permutation test (Pitman 1937), where the t approximation
 * is poor (for 7 perfectly ranked pairs it gives p = 0; the exact two-sided p is 2/7! = 0.0004).
 * Beyond that it uses the t approximation on n - 2 degrees of freedom (as scipy.stats.spearmanr
 * does). Without ties the exact p-values agree with R's cor.test.
 *
 * @example
 * // R cor.test help example (Hollander & Wolfe 1973 p. 185)
 * spearman([44.4, 45.9, 41.9, 53.3, 44.7, 44.1, 50.7, 45.2, 60.1], [2.6, 3.1, 2.5, 5.0, 3.6, 4.0, 5.2, 2.8, 3.8])
 * // => { rho: 0.6, pValue: 0.0968, n: 9, method: "exact-permutation", ... } (R: S = 48, one-sided p 0.0484)
 */
export function spearman(x: number[], y: number[], opts: { alternative?: Alternative } = {}): SpearmanResult {
  const fn = "spearman";
  assertFiniteArray(fn, "x", x);
  assertFiniteArray(fn, "y", y, x.length);
  const n = x.length;
  if (n < 3) throw new Error(`${fn}: ${n} pairs; at least 3 are needed for a test`);
  const alternative = opts.alternative ?? "two-sided";
  if (alternative !== "two-sided" && alternative !== "less" && alternative !== "greater") {
    throw new Error(`${fn}: alternative is "${String(alternative)}"; use "two-sided", "less" or "greater"`);
  }
  const rankX = averageRanks(x);
  const rankY = averageRanks(y);
  const centre = (n + 1) / 2; // the mean of ranks 1..n, ties or not
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = rankX[i] - centre;
    const dy = rankY[i] - centre;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  if (sxx === 0) throw new Error(`${fn}: x is constant; the rank correlation is undefined`);
  if (syy === 0) throw new Error(`${fn}: y is constant; the rank correlation is undefined`);
  const rho = Math.max(-1, Math.min(1, sxy / Math.sqrt(sxx * syy)));
  const df = n - 2;
  const statistic = Math.abs(rho) === 1 ? Math.sign(rho) * Infinity : rho * Math.sqrt(df / (1 - rho * rho));
  if (n <= SPEARMAN_EXACT_MAX_N) {
    const pValue = exactPermutationP(rankX, rankY, sxy, alternative);
    return { rho, statistic, df, pValue, n, alternative, method: "exact-permutation" };
  }
  const twoSided = studentTTwoSidedP(statistic, df);
  const pValue =
    alternative === "two-sided"
      ? twoSided
      : (alternative === "greater") === statistic > 0
        ? twoSided / 2
        : 1 - twoSided / 2;
  return { rho, statistic, df, pValue, n, alternative, method: "t-approximation" };
}

/**
 * Share of the n! orderings of y's ranks against x's whose sum of rank products is at least as
 * extreme as the observed one (rho is a fixed affine function of that sum). Heap's algorithm
 * visits every permutation once, updating the sum by the two swapped terms.
 */
function exactPermutationP(rankX: ArrayLike<number>, rankY: ArrayLike<number>, observedCross: number, alternative: Alternative): number {
  const n = rankX.length;
  const centre = (n + 1) / 2;
  const a = Array.from(rankX, (r) => r - centre);
  const b = Array.from(rankY, (r) => r - centre);
  let cross = 0;
  for (let i = 0; i < n; i++) cross += a[i] * b[i];
  const slack = 1e-9 * (1 + Math.abs(observedCross));
  let extreme = 0;
  let total = 0;
  const count = (): void => {
    total++;
    if (alternative === "two-sided" ? Math.abs(cross) >= Math.abs(observedCross) - slack : alternative === "greater" ? cross >= observedCross - slack : cross <= observedCross + slack) extreme++;
  };
  count();
  const c = new Array<number>(n).fill(0);
  let i = 1;
  while (i < n) {
    if (c[i] < i) {
      const j = i % 2 === 0 ? 0 : c[i];
      cross -= a[i] * b[i] + a[j] * b[j];
      const t = b[i];
      b[i] = b[j];
      b[j] = t;
      cross += a[i] * b[i] + a[j] * b[j];
      count();
      c[i]++;
      i = 1;
    } else {
      c[i] = 0;
      i++;
    }
  }
  return extreme / total;
}
