import { twoSidedCriticalValue } from "./distributions";
import { assertCount, assertLevel } from "./validate";

/**
 * Wilson score interval for a proportion (Wilson 1927): the set of p for which
 * |x/n - p| <= z sqrt(p(1 - p)/n), in closed form
 *   (x/n + z^2/2n -+ z sqrt(x/n (1 - x/n)/n + z^2/4n^2)) / (1 + z^2/n).
 * Unlike the Wald interval it stays inside [0, 1] and keeps its coverage near 0 and 1, which suits
 * extinction proportions of small trait groups (Newcombe 1998).
 *
 * @example
 * wilsonInterval(81, 263) // => [0.2553, 0.3662]
 */
export function wilsonInterval(successes: number, n: number, opts: { level?: number } = {}): [number, number] {
  const fn = "wilsonInterval";
  assertCount(fn, "successes", successes);
  assertCount(fn, "n", n);
  if (n === 0) throw new Error(`${fn}: n is 0; a proportion needs at least one trial`);
  if (successes > n) throw new Error(`${fn}: successes (${successes}) exceed n (${n})`);
  const level = opts.level ?? 0.95;
  assertLevel(fn, level);
  const z = twoSidedCriticalValue(level);
  const proportion = successes / n;
  const z2 = z * z;
  const denominator = 1 + z2 / n;
  const centre = (proportion + z2 / (2 * n)) / denominator;
  const halfWidth = (z * Math.sqrt((proportion * (1 - proportion)) / n + z2 / (4 * n * n))) / denominator;
  // At x = 0 or x = n the limit is exactly 0 or 1; clamping removes rounding residue.
  return [successes === 0 ? 0 : Math.max(0, centre - halfWidth), successes === n ? 1 : Math.min(1, centre + halfWidth)];
}
