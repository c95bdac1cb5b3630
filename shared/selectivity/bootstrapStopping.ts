import { twoSidedCriticalValue } from "../stats/distributions";

/** Taxa above which a confounding bootstrap may stop early, and the replicates between its looks. */
export const EARLY_STOP_TAXA = 20_000;
export const EARLY_STOP_BATCH = 10;

/**
 * Whether a confounding bootstrap on a large study may stop before its last replicate because the
 * flag's answer is already clear (a group-sequential look; common practice, no source): the change
 * is within the threshold, so no uncertainty can make it flag, or the difference is more than twice
 * or less than half the critical value from 0 in units of the standard error so far.
 *
 * @example
 * answerIsClear([0.01, -0.02, 0.015, ...10 draws], 0.001, 0.001, { threshold: 0.1, level: 0.95 }) // => true (change below 10%)
 */
export function answerIsClear(draws: number[], difference: number, change: number, options: { threshold: number; level: number }): boolean {
  if (draws.length < EARLY_STOP_BATCH) return false;
  if (change <= options.threshold) return true;
  const mean = draws.reduce((a, v) => a + v, 0) / draws.length;
  const se = Math.sqrt(draws.reduce((a, v) => a + (v - mean) ** 2, 0) / (draws.length - 1));
  if (!(se > 0)) return false;
  const z = Math.abs(difference) / se;
  const critical = twoSidedCriticalValue(options.level);
  return z > 2 * critical || z < critical / 2;
}
