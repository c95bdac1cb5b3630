/**
 * ln of the sample odds ratio ad / (bc) of a 2 x 2 table [[a, b], [c, d]] (counts may be weighted),
 * with 0.5 added to every cell when one is empty (Haldane 1956), so the confounding judgements
 * always have a finite crude figure to compare.
 *
 * @example
 * haldaneLogOdds(10, 0, 5, 5) // => ln((10.5 * 5.5) / (0.5 * 5.5)) = ln 21
 */
export function haldaneLogOdds(a: number, b: number, c: number, d: number): number {
  if (a === 0 || b === 0 || c === 0 || d === 0) return Math.log(((a + 0.5) * (d + 0.5)) / ((b + 0.5) * (c + 0.5)));
  return Math.log((a * d) / (b * c));
}
