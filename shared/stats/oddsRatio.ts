import { twoSidedCriticalValue } from "./distributions";
import type { Table2x2 } from "./types";
import { assertCountTable, assertLevel } from "./validate";

export interface OddsRatioOptions {
  /** Confidence level. Default 0.95. */
  level?: number;
  /**
   * When to add 0.5 to every cell (Haldane 1956; Anscombe 1956): "when-zero" (default) only if a
   * cell is 0, "always" on every table.
   */
  correction?: "when-zero" | "always";
}

export interface OddsRatioResult {
  /** ad / bc, after the correction when it applied. */
  estimate: number;
  logEstimate: number;
  /** Standard error of ln(estimate): sqrt(1/a + 1/b + 1/c + 1/d). */
  se: number;
  ci: [number, number];
  level: number;
  /** True when 0.5 was added to every cell. */
  corrected: boolean;
}

/**
 * Sample odds ratio ad/bc of a 2x2 table `[[a, b], [c, d]]` with Woolf's logit interval
 * exp(ln OR +- z sqrt(1/a + 1/b + 1/c + 1/d)) (Woolf 1955). When any cell is 0 the estimate and
 * interval are undefined, so 0.5 is added to every cell first (Haldane 1956; Anscombe 1956) and
 * `corrected` says so.
 *
 * @example
 * oddsRatio([[2, 12], [1, 10]])
 * // => { estimate: 1.6667, se: 1.2974, ci: [0.1310604, 21.1946394], corrected: false, ... }
 */
export function oddsRatio(table: Table2x2, opts: OddsRatioOptions = {}): OddsRatioResult {
  const fn = "oddsRatio";
  assertCountTable(fn, table);
  if (table.length !== 2 || table[0].length !== 2) throw new Error(`${fn}: the table must be 2x2 ([[a, b], [c, d]])`);
  const level = opts.level ?? 0.95;
  assertLevel(fn, level);
  const correction = opts.correction ?? "when-zero";
  if (correction !== "when-zero" && correction !== "always") {
    throw new Error(`${fn}: correction is "${String(correction)}"; use "when-zero" or "always"`);
  }
  const cells = [table[0][0], table[0][1], table[1][0], table[1][1]];
  const corrected = correction === "always" || cells.includes(0);
  const [a, b, c, d] = corrected ? cells.map((v) => v + 0.5) : cells;
  const logEstimate = Math.log(a) + Math.log(d) - Math.log(b) - Math.log(c);
  const se = Math.sqrt(1 / a + 1 / b + 1 / c + 1 / d);
  const z = twoSidedCriticalValue(level);
  return {
    estimate: Math.exp(logEstimate),
    logEstimate,
    se,
    ci: [Math.exp(logEstimate - z * se), Math.exp(logEstimate + z * se)],
    level,
    corrected,
  };
}
