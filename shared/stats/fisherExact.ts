import { fisherRx2 } from "./fisherRx2";
import { compactTable, freemanHaltonExact, freemanHaltonMonteCarlo } from "./freemanHalton";
import {
  hypergeometricSupport,
  logLowerTail,
  logTwoSidedTail,
  logUpperTail,
  noncentralLowerTail,
  noncentralMean,
  noncentralUpperTail,
  type HypergeometricSupport,
} from "./noncentralHypergeometric";
import { increasingRoot } from "./roots";
import type { Alternative } from "./types";
import { assertCountTable, assertLevel } from "./validate";

/** Which computation produced the p-value. */
export type FisherMethod = "exact-2x2" | "exact-rxc" | "monte-carlo-rxc";

export interface FisherExactOptions {
  /** 2x2 only; r x c tables are tested two-sided. Default "two-sided". */
  alternative?: Alternative;
  /** Confidence level of the odds-ratio interval (2x2). Default 0.95. */
  level?: number;
  /**
   * r x c only. "auto" (default) enumerates exactly while that stays within `exactWorkLimit`
   * partial tables and otherwise samples; "exact" always enumerates (may take very long);
   * "monte-carlo" always samples.
   */
  rxcMethod?: "auto" | "exact" | "monte-carlo";
  /** Partial tables the exact r x c enumeration may examine before "auto" switches to sampling. Default 2e6. */
  exactWorkLimit?: number;
  /** Random tables drawn by the Monte Carlo method. Default 100,000. */
  replicates?: number;
  /** Seed of the Monte Carlo random stream, reported back. Default 1. */
  seed?: number;
}

export interface FisherExactResult {
  pValue: number;
  /** ln pValue, finite even where pValue underflows to 0 (exact methods only). */
  logPValue?: number;
  /** 2x2: conditional maximum likelihood estimate of the odds ratio; NaN when a margin is 0. */
  oddsRatio?: number;
  /** 2x2: exact conditional interval for the odds ratio (one-sided for one-sided alternatives). */
  ci?: [number, number];
  level?: number;
  alternative: Alternative;
  method: FisherMethod;
  /** Present when method is "monte-carlo-rxc". */
  monteCarlo?: { replicates: number; seed: number; standardError: number };
}

const MAX_2X2_TOTAL = 10_000_000;
const DEFAULT_EXACT_WORK_LIMIT = 2_000_000;
/** Work (paths carried, completions listed) the r x 2 network may do before "auto" falls back to Monte Carlo: about a second. */
const RX2_WORK_LIMIT = 12_000_000;
const DEFAULT_REPLICATES = 100_000;
const DEFAULT_SEED = 1;

/**
 * Fisher's exact test of independence in a contingency table (Fisher 1935; Freeman & Halton 1951
 * for r x c). Rows are trait states, columns outcomes (extinct, survived).
 *
 * 2x2 `[[a, b], [c, d]]`: the p-value comes from the hypergeometric distribution of `a` given the
 * margins. "less"/"greater" are one-sided in the odds ratio; "two-sided" sums the probabilities of
 * values of `a` no more likely than the observed one, allowing a relative tolerance of 1e-7, as R's
 * fisher.test does. `oddsRatio` is the conditional maximum likelihood estimate (the odds ratio at
 * which E[a] equals the observed a under the noncentral hypergeometric distribution) and `ci` the
 * exact conditional interval that inverts the two one-sided tests at (1 - level)/2 each (Cornfield
 * 1956). All sums are done in log space, so tables with millions of taxa are fine.
 *
 * r x c: the Freeman-Halton p-value (two-sided only). Exact enumeration runs while it is
 * tractable; beyond that a Monte Carlo estimate over random tables with the same margins, with a
 * fixed seed and its standard error, is reported instead (see `method`).
 *
 * @example
 * fisherExact([[3, 1], [1, 3]], { alternative: "greater" })
 * // => { pValue: 0.2429 (= 17/70), oddsRatio: 6.408309, ci: [0.3135693, Infinity], method: "exact-2x2", ... }
 */
export function fisherExact(table: number[][], opts: FisherExactOptions = {}): FisherExactResult {
  const fn = "fisherExact";
  assertCountTable(fn, table);
  const alternative = opts.alternative ?? "two-sided";
  if (alternative !== "two-sided" && alternative !== "less" && alternative !== "greater") {
    throw new Error(`${fn}: alternative is "${String(alternative)}"; use "two-sided", "less" or "greater"`);
  }
  const level = opts.level ?? 0.95;
  assertLevel(fn, level);
  if (table.length === 2 && table[0].length === 2) {
    return fisherExact2x2(table as [[number, number], [number, number]], alternative, level);
  }
  if (alternative !== "two-sided") {
    throw new Error(`${fn}: alternative "${alternative}" exists only for 2x2 tables; r x c tables are tested two-sided`);
  }
  return fisherExactRxC(table, opts);
}

function fisherExact2x2(table: [[number, number], [number, number]], alternative: Alternative, level: number): FisherExactResult {
  const [[a, b], [c, d]] = table;
  const total = a + b + c + d;
  if (total > MAX_2X2_TOTAL) {
    throw new Error(`fisherExact: the table holds ${total} taxa, more than the ${MAX_2X2_TOTAL} this exact test supports`);
  }
  const support = hypergeometricSupport(a + c, b + d, a + b);
  const logPValue =
    alternative === "less" ? logLowerTail(support, a) : alternative === "greater" ? logUpperTail(support, a) : logTwoSidedTail(support, a);
  const degenerate = support.lo === support.hi;
  return {
    pValue: Math.exp(logPValue),
    logPValue,
    oddsRatio: degenerate ? NaN : conditionalMaximumLikelihood(support, a),
    ci: degenerate ? [0, Infinity] : exactInterval(support, a, alternative, level),
    level,
    alternative,
    method: "exact-2x2",
  };
}

/** Odds ratio psi at which E[a] under the noncentral hypergeometric distribution equals a. */
function conditionalMaximumLikelihood(support: HypergeometricSupport, a: number): number {
  if (a === support.lo) return 0;
  if (a === support.hi) return Infinity;
  return Math.exp(increasingRoot((theta) => noncentralMean(support, theta) - a, -1, 1));
}

/**
 * Exact conditional limits: the lower limit solves P(X >= a; psi) = alpha, the upper limit
 * P(X <= a; psi) = alpha, with alpha = (1 - level)/2 for two-sided intervals.
 */
function exactInterval(support: HypergeometricSupport, a: number, alternative: Alternative, level: number): [number, number] {
  const alpha = alternative === "two-sided" ? (1 - level) / 2 : 1 - level;
  const lower = (): number =>
    a === support.lo ? 0 : Math.exp(increasingRoot((theta) => noncentralUpperTail(support, theta, a) - alpha, -1, 1));
  const upper = (): number =>
    a === support.hi ? Infinity : Math.exp(increasingRoot((theta) => alpha - noncentralLowerTail(support, theta, a), -1, 1));
  if (alternative === "less") return [0, upper()];
  if (alternative === "greater") return [lower(), Infinity];
  return [lower(), upper()];
}

function fisherExactRxC(table: number[][], opts: FisherExactOptions): FisherExactResult {
  const fn = "fisherExact";
  const rxcMethod = opts.rxcMethod ?? "auto";
  if (rxcMethod !== "auto" && rxcMethod !== "exact" && rxcMethod !== "monte-carlo") {
    throw new Error(`${fn}: rxcMethod is "${String(rxcMethod)}"; use "auto", "exact" or "monte-carlo"`);
  }
  const workLimit = opts.exactWorkLimit ?? DEFAULT_EXACT_WORK_LIMIT;
  const replicates = opts.replicates ?? DEFAULT_REPLICATES;
  const seed = opts.seed ?? DEFAULT_SEED;
  if (!(workLimit > 0)) throw new Error(`${fn}: exactWorkLimit is ${workLimit}; it must be positive`);
  if (!Number.isInteger(replicates) || replicates < 1) throw new Error(`${fn}: replicates is ${replicates}; it must be a positive integer`);
  if (!Number.isInteger(seed)) throw new Error(`${fn}: seed is ${seed}; it must be an integer`);

  const compact = compactTable(table);
  if (compact.rowTotals.length < 2 || compact.columnTotals.length < 2) {
    // Only one non-empty row or column: the margins fix the table, so nothing is more extreme.
    return { pValue: 1, logPValue: 0, alternative: "two-sided", method: "exact-rxc" };
  }
  if (rxcMethod !== "monte-carlo") {
    // r x 2 and 2 x c tables: the network over rows reaches far larger tables exactly, most of all
    // tables of many rows of unequal size; few large rows suit the enumeration over columns better,
    // so even "exact" gives the network only its usual budget before trying that.
    const twoColumn = compact.rowTotals.length === 2 || compact.columnTotals.length === 2 ? fisherRx2(compact, RX2_WORK_LIMIT) : null;
    if (twoColumn) return { pValue: Math.exp(twoColumn.logPValue), logPValue: twoColumn.logPValue, alternative: "two-sided", method: "exact-rxc" };
    // Over 20,000 taxa in a table larger than 2 x 2 the enumeration cannot finish within its
    // budget (its networks grow with the margins), so "auto" does not spend the budget finding out.
    const hopeless = rxcMethod === "auto" && compact.total > 20_000;
    const exact = hopeless ? null : freemanHaltonExact(compact, rxcMethod === "exact" ? Infinity : workLimit);
    if (exact) return { pValue: Math.exp(exact.logPValue), logPValue: exact.logPValue, alternative: "two-sided", method: "exact-rxc" };
  }
  const simulated = freemanHaltonMonteCarlo(compact, replicates, seed);
  return {
    pValue: simulated.pValue,
    alternative: "two-sided",
    method: "monte-carlo-rxc",
    monteCarlo: { replicates, seed, standardError: simulated.standardError },
  };
}
