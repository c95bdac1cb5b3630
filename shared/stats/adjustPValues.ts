/** Multiple-testing adjustments offered by adjustPValues. */
export type PValueAdjustment = "bh" | "holm" | "bonferroni";

/**
 * Adjusts p-values for multiple testing, returning them in the input order (as R's p.adjust):
 * - "bh": Benjamini & Hochberg (1995) false discovery rate, p(i) * m / i made monotone from the
 *   largest p down;
 * - "holm": Holm (1979) step-down family-wise error rate, p(i) * (m - i + 1) made monotone from the
 *   smallest p up;
 * - "bonferroni": p * m.
 * All are capped at 1.
 *
 * @example
 * adjustPValues([0.01, 0.04, 0.03], "holm") // => [0.03, 0.06, 0.06]
 */
export function adjustPValues(p: number[], method: PValueAdjustment): number[] {
  const fn = "adjustPValues";
  if (!Array.isArray(p)) throw new Error(`${fn}: p must be an array of p-values`);
  p.forEach((value, i) => {
    if (typeof value !== "number" || !(value >= 0 && value <= 1)) {
      throw new Error(`${fn}: p[${i}] is ${String(value)}; p-values must lie between 0 and 1`);
    }
  });
  const m = p.length;
  const adjusted = new Array<number>(m);
  if (method === "bonferroni") {
    for (let i = 0; i < m; i++) adjusted[i] = Math.min(1, p[i] * m);
    return adjusted;
  }
  const ascending = p.map((_, i) => i).sort((a, b) => p[a] - p[b] || a - b);
  if (method === "holm") {
    let running = 0;
    ascending.forEach((index, rank) => {
      running = Math.max(running, Math.min(1, (m - rank) * p[index]));
      adjusted[index] = running;
    });
    return adjusted;
  }
  if (method === "bh") {
    let running = 1;
    for (let rank = m - 1; rank >= 0; rank--) {
      const index = ascending[rank];
      running = Math.min(running, (m / (rank + 1)) * p[index]);
      adjusted[index] = Math.min(1, running);
    }
    return adjusted;
  }
  throw new Error(`${fn}: method is "${String(method)}"; use "bh", "holm" or "bonferroni"`);
}
