import { assertNonNegative, assertValidRanges } from "./validateRanges";

export interface BoundaryCrosserCounts {
  /** Crosses both the base and the top (range-through taxa). */
  nbt: number;
  /** Crosses the base, not the top: last appearance within the interval. */
  nbL: number;
  /** Crosses the top, not the base: first appearance within the interval. */
  nFt: number;
  /** Crosses neither, first and last appearance within [top, base] (single-interval taxa). */
  nFL: number;
}

export interface BoundaryCrosserRates extends BoundaryCrosserCounts {
  /** Per-capita extinction rate per interval, -ln(nbt / (nbt + nbL)). NaN when nbt + nbL = 0; Infinity when nbt = 0 < nbL. */
  q: number;
  /** Per-capita origination rate per interval, -ln(nbt / (nbt + nFt)). NaN when nbt + nFt = 0; Infinity when nbt = 0 < nFt. */
  p: number;
  /** q / (base - top). */
  qPerMyr: number;
  /** p / (base - top). */
  pPerMyr: number;
  /** (nbL + nFL) / (nbt + nbL + nFt + nFL): share of the taxa present that are last seen in the interval. NaN when none. */
  proportionalExtinction: number;
  /** (nFt + nFL) / (nbt + nbL + nFt + nFL): share of the taxa present that are first seen in the interval. NaN when none. */
  proportionalOrigination: number;
  /** Bottom-boundary crossers, nbt + nbL. */
  nb: number;
  /** Top-boundary crossers, nbt + nFt. */
  nt: number;
  /** Taxa present in the interval, nbt + nbL + nFt + nFL. */
  taxonCount: number;
  /** base - top, in Myr. */
  duration: number;
}

/**
 * Sorts each range into Foote's (2000) four classes for the interval from `base` to `top`; a range crosses an
 * age t when fad > t > lad (strictly). Ranges that do not reach into [top, base] count in none. Inputs are
 * assumed valid (see boundaryCrosserRates).
 */
export function countBoundaryCrossers(taxa: ReadonlyArray<{ fad: number; lad: number }>, base: number, top: number): BoundaryCrosserCounts {
  const counts: BoundaryCrosserCounts = { nbt: 0, nbL: 0, nFt: 0, nFL: 0 };
  for (const { fad, lad } of taxa) {
    const crossesBase = fad > base && base > lad;
    const crossesTop = fad > top && top > lad;
    if (crossesBase && crossesTop) counts.nbt++;
    else if (crossesBase) counts.nbL++; // lad in [top, base)
    else if (crossesTop && fad <= base) counts.nFt++;
    else if (fad <= base && lad >= top) counts.nFL++;
  }
  return counts;
}

/**
 * Boundary-crosser counts and per-capita rates for the interval from `base` (older, Ma) to `top` (younger),
 * after Foote (2000, Origination and extinction components of taxonomic diversity: general problems.
 * Paleobiology 26(4) suppl.: 74-102). Ranges are range-through: a taxon is present from fad to lad.
 *   nbt: crosses both base and top; nbL: crosses base, not top; nFt: crosses top, not base, fad <= base;
 *   nFL: crosses neither and lies within [top, base].
 *   q = -ln(nbt / (nbt + nbL)); p = -ln(nbt / (nbt + nFt)); qPerMyr, pPerMyr divide by (base - top);
 *   proportionalExtinction = (nbL + nFL) / (nbt + nbL + nFt + nFL).
 * The rates use boundary crossers only, so single-interval taxa (nFL), which Foote shows to be especially
 * sensitive to preservation and interval length, affect only the proportions. A rate is NaN when there is no
 * crosser to take it from (0/0) and Infinity when all crossers of the boundary are lost; ratesThroughTime turns
 * both into null. Throws for a missing, NaN, negative or inverted range (naming the taxon's index) and
 * unless base > top >= 0.
 *
 * @example
 * boundaryCrosserRates([{ fad: 12, lad: 3 }, { fad: 12, lad: 3 }, { fad: 12, lad: 7 }, { fad: 8, lad: 3 }, { fad: 9, lad: 6 }], 10, 5)
 * // { nbt: 2, nbL: 1, nFt: 1, nFL: 1, q: 0.405465 (= ln 1.5), p: 0.405465, qPerMyr: 0.081093, pPerMyr: 0.081093,
 * //   proportionalExtinction: 0.4, proportionalOrigination: 0.4, nb: 3, nt: 3, taxonCount: 5, duration: 5 }
 */
export function boundaryCrosserRates(taxa: Array<{ fad: number; lad: number }>, base: number, top: number): BoundaryCrosserRates {
  assertNonNegative(base, "base");
  assertNonNegative(top, "top");
  if (!(base > top)) throw new Error(`base ${base} Ma must be older (larger) than top ${top} Ma`);
  assertValidRanges(taxa);
  const counts = countBoundaryCrossers(taxa, base, top);
  const { nbt, nbL, nFt, nFL } = counts;
  const nb = nbt + nbL;
  const nt = nbt + nFt;
  const taxonCount = nbt + nbL + nFt + nFL;
  const duration = base - top;
  // ln(nb / nbt) equals -ln(nbt / nb) but gives +0 rather than -0 when nothing is lost.
  const q = Math.log(nb / nbt);
  const p = Math.log(nt / nbt);
  return {
    ...counts,
    q,
    p,
    qPerMyr: q / duration,
    pPerMyr: p / duration,
    proportionalExtinction: (nbL + nFL) / taxonCount,
    proportionalOrigination: (nFt + nFL) / taxonCount,
    nb,
    nt,
    taxonCount,
    duration,
  };
}
