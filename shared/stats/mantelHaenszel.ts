import { chiSquareUpperTail, twoSidedCriticalValue } from "./distributions";
import type { Table2x2 } from "./types";
import { assertCount, assertLevel } from "./validate";

export interface MantelHaenszelOptions {
  /** Continuity correction of the CMH statistic, applied as R's mantelhaen.test does. Default true. */
  correct?: boolean;
  /** Confidence level of the interval. Default 0.95. */
  level?: number;
}

export interface BreslowDayResult {
  /** Breslow-Day statistic with Tarone's correction (Tarone 1985). */
  chiSquare: number;
  df: number;
  pValue: number;
  /** The Breslow-Day statistic without Tarone's correction (what SAS and DescTools print by default). */
  uncorrectedChiSquare: number;
  uncorrectedPValue: number;
  /** Strata used: those with no zero margin (the others carry no information on heterogeneity). */
  strataUsed: number;
}

export interface MantelHaenszelResult {
  /** Mantel-Haenszel common odds ratio, sum(ad/n) / sum(bc/n). */
  oddsRatio: number;
  /** Robins-Breslow-Greenland interval; NaN limits when the estimate is 0 or infinite. */
  ci: [number, number];
  /** Robins-Breslow-Greenland standard error of ln(oddsRatio). */
  logOddsRatioSe: number;
  level: number;
  /** Cochran-Mantel-Haenszel statistic on 1 df and its p-value. */
  chiSquare: number;
  pValue: number;
  /** The continuity correction subtracted from |sum(a - E[a])|: 0.5 or 0. */
  continuityCorrection: number;
  breslowDay: BreslowDayResult;
  /** Strata with at least two taxa (smaller ones carry no information and are skipped). */
  strataUsed: number;
  strataSkipped: number;
}

const FN = "mantelHaenszel";

/**
 * Pools 2x2 tables `[[a, b], [c, d]]` across strata (e.g. clades, so that a trait's association with
 * extinction is not a side effect of which clades carry it).
 *
 * - Common odds ratio: the Mantel-Haenszel estimate sum(a d / n) / sum(b c / n) (Mantel & Haenszel
 *   1959), with the Robins-Breslow-Greenland variance of its logarithm (Robins, Breslow & Greenland
 *   1986) for the interval.
 * - Cochran-Mantel-Haenszel test of conditional independence: (|sum(a - E a)| - c)^2 / sum Var(a) on
 *   1 df, E a = r1 c1 / n and Var a = r1 r2 c1 c2 / (n^2 (n - 1)); c = 0.5 when `correct` (default)
 *   and |sum(a - E a)| >= 0.5, else 0, exactly as R's mantelhaen.test.
 * - Breslow-Day test of homogeneous odds ratios (Breslow & Day 1980) with Tarone's correction (Tarone
 *   1985), on (informative strata - 1) df; strata with a zero margin are dropped from it.
 *
 * Strata with fewer than two taxa are skipped.
 *
 * @example
 * // Rabbits: penicillin level strata, delay of injection against cure (R mantelhaen.test example)
 * mantelHaenszel([[[0, 6], [0, 5]], [[3, 3], [0, 6]], [[6, 0], [2, 4]], [[5, 1], [6, 0]], [[2, 0], [5, 0]]])
 * // => { oddsRatio: 7, ci: [1.026713, 47.725133], chiSquare: 3.9286, pValue: 0.04747, ... }
 */
export function mantelHaenszel(strata: Table2x2[], opts: MantelHaenszelOptions = {}): MantelHaenszelResult {
  if (!Array.isArray(strata) || strata.length === 0) throw new Error(`${FN}: no strata given`);
  const level = opts.level ?? 0.95;
  assertLevel(FN, level);
  const correct = opts.correct ?? true;
  if (typeof correct !== "boolean") throw new Error(`${FN}: correct must be true or false`);

  const used: Array<[number, number, number, number]> = [];
  strata.forEach((table, k) => {
    if (!Array.isArray(table) || table.length !== 2 || !table.every((row) => Array.isArray(row) && row.length === 2)) {
      throw new Error(`${FN}: stratum ${k} is not a 2x2 table [[a, b], [c, d]]`);
    }
    table.forEach((row, i) => row.forEach((v, j) => assertCount(FN, `stratum ${k} cell [${i}][${j}]`, v)));
    const cells: [number, number, number, number] = [table[0][0], table[0][1], table[1][0], table[1][1]];
    if (cells[0] + cells[1] + cells[2] + cells[3] >= 2) used.push(cells);
  });
  if (used.length === 0) throw new Error(`${FN}: no stratum holds at least 2 taxa`);

  let sumR = 0;
  let sumS = 0;
  let sumPR = 0;
  let sumPSQR = 0;
  let sumQS = 0;
  let difference = 0;
  let variance = 0;
  for (const [a, b, c, d] of used) {
    const n = a + b + c + d;
    const r = (a * d) / n;
    const s = (b * c) / n;
    const pk = (a + d) / n;
    const qk = (b + c) / n;
    sumR += r;
    sumS += s;
    sumPR += pk * r;
    sumPSQR += pk * s + qk * r;
    sumQS += qk * s;
    const row1 = a + b;
    const row2 = c + d;
    const column1 = a + c;
    const column2 = b + d;
    difference += a - (row1 * column1) / n;
    variance += (row1 * row2 * column1 * column2) / (n * n * (n - 1));
  }

  const estimate = sumR / sumS;
  const logVariance = sumPR / (2 * sumR * sumR) + sumPSQR / (2 * sumR * sumS) + sumQS / (2 * sumS * sumS);
  const logSe = Math.sqrt(logVariance);
  const z = twoSidedCriticalValue(level);
  const estimable = estimate > 0 && Number.isFinite(estimate);
  const ci: [number, number] = estimable ? [estimate * Math.exp(-z * logSe), estimate * Math.exp(z * logSe)] : [NaN, NaN];

  const continuityCorrection = correct && Math.abs(difference) >= 0.5 ? 0.5 : 0;
  const chiSquare = variance > 0 ? (Math.abs(difference) - continuityCorrection) ** 2 / variance : NaN;

  return {
    oddsRatio: estimate,
    ci,
    logOddsRatioSe: estimable ? logSe : NaN,
    level,
    chiSquare,
    pValue: Number.isNaN(chiSquare) ? NaN : chiSquareUpperTail(chiSquare, 1),
    continuityCorrection,
    breslowDay: breslowDay(used, estimate),
    strataUsed: used.length,
    strataSkipped: strata.length - used.length,
  };
}

/**
 * Breslow-Day statistic: for each stratum with all margins positive, the count A expected under the
 * common odds ratio psi solves A (r2 - c1 + A) = psi (r1 - A)(c1 - A) inside the support
 * [max(0, c1 - r2), min(r1, c1)]; BD = sum (a - A)^2 / V with 1/V = 1/A + 1/(r1 - A) + 1/(c1 - A)
 * + 1/(r2 - c1 + A). Tarone's statistic subtracts (sum a - sum A)^2 / sum V.
 */
function breslowDay(strata: Array<[number, number, number, number]>, psi: number): BreslowDayResult {
  const informative = strata.filter(([a, b, c, d]) => a + b > 0 && c + d > 0 && a + c > 0 && b + d > 0);
  const df = informative.length - 1;
  const undefinedResult = (): BreslowDayResult => ({
    chiSquare: NaN,
    df: Math.max(df, 0),
    pValue: NaN,
    uncorrectedChiSquare: NaN,
    uncorrectedPValue: NaN,
    strataUsed: informative.length,
  });
  if (df < 1 || !(psi > 0) || !Number.isFinite(psi)) return undefinedResult();
  let statistic = 0;
  let sumObserved = 0;
  let sumExpected = 0;
  let sumVariance = 0;
  for (const [a, b, c, d] of informative) {
    const row1 = a + b;
    const row2 = c + d;
    const column1 = a + c;
    const expected = expectedUnderCommonOddsRatio(row1, row2, column1, psi);
    const variance = 1 / (1 / expected + 1 / (row1 - expected) + 1 / (column1 - expected) + 1 / (row2 - column1 + expected));
    statistic += (a - expected) ** 2 / variance;
    sumObserved += a;
    sumExpected += expected;
    sumVariance += variance;
  }
  const tarone = statistic - (sumObserved - sumExpected) ** 2 / sumVariance;
  return {
    chiSquare: tarone,
    df,
    pValue: chiSquareUpperTail(tarone, df),
    uncorrectedChiSquare: statistic,
    uncorrectedPValue: chiSquareUpperTail(statistic, df),
    strataUsed: informative.length,
  };
}

/** Root of (1 - psi) A^2 + (r2 - c1 + psi (r1 + c1)) A - psi r1 c1 = 0 inside the support. */
function expectedUnderCommonOddsRatio(row1: number, row2: number, column1: number, psi: number): number {
  const lowest = Math.max(0, column1 - row2);
  const highest = Math.min(row1, column1);
  const quadratic = 1 - psi;
  const linear = row2 - column1 + psi * (row1 + column1);
  const constant = -psi * row1 * column1;
  if (Math.abs(quadratic) < 1e-12 * Math.abs(linear)) return -constant / linear;
  // Numerically stable roots: q = -(B + sign(B) sqrt(B^2 - 4AC)) / 2, roots q/A and C/q.
  const q = -0.5 * (linear + Math.sign(linear || 1) * Math.sqrt(linear * linear - 4 * quadratic * constant));
  const candidates = [q / quadratic, constant / q];
  const slack = 1e-9 * Math.max(1, highest);
  const inside = candidates.find((root) => root >= lowest - slack && root <= highest + slack);
  if (inside === undefined) throw new Error(`${FN}: no expected count inside the support (internal error)`);
  return Math.min(highest, Math.max(lowest, inside));
}
