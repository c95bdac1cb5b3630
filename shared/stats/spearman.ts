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
  /** How the p-value was obtained. */
  method: "t-approximation";
}

/**
 * Spearman's rank correlation (Spearman 1904) between paired values, tied values sharing their
 * average rank, with a test of rho = 0 by the t approximation on n - 2 degrees of freedom (as
 * scipy.stats.spearmanr does; R's cor.test uses exact permutation p-values for small samples without
 * ties instead, so small-sample p-values differ from R's).
 *
 * @example
 * // R cor.test help example (Hollander & Wolfe 1973 p. 185)
 * spearman([44.4, 45.9, 41.9, 53.3, 44.7, 44.1, 50.7, 45.2, 60.1], [2.6, 3.1, 2.5, 5.0, 3.6, 4.0, 5.2, 2.8, 3.8])
 * // => { rho: 0.6, pValue: 0.0876, n: 9, method: "t-approximation", ... }
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
  const twoSided = studentTTwoSidedP(statistic, df);
  const pValue =
    alternative === "two-sided"
      ? twoSided
      : (alternative === "greater") === statistic > 0
        ? twoSided / 2
        : 1 - twoSided / 2;
  return { rho, statistic, df, pValue, n, alternative, method: "t-approximation" };
}
