import { boundaryCrosserRates } from "./boundaryCrosserRates";
import { assertValidIntervals, assertValidRanges, type NamedInterval } from "./validateRanges";

export interface IntervalRates {
  name: string;
  base: number;
  top: number;
  /** base - top, in Myr. */
  duration: number;
  nbt: number;
  nbL: number;
  nFt: number;
  nFL: number;
  /** Bottom-boundary crossers, nbt + nbL. */
  nb: number;
  /** Top-boundary crossers, nbt + nFt. */
  nt: number;
  /** Taxa present in the interval, nbt + nbL + nFt + nFL. */
  taxonCount: number;
  /** Per-capita extinction rate per interval; null when not finite (no bottom crossers, or none crossed both limits). */
  q: number | null;
  /** Per-capita origination rate per interval; null when not finite (no top crossers, or none crossed both limits). */
  p: number | null;
  qPerMyr: number | null;
  pPerMyr: number | null;
  /** Share of the taxa present last seen in the interval; null when no taxon is present. */
  proportionalExtinction: number | null;
  /** Share of the taxa present first seen in the interval; null when no taxon is present. */
  proportionalOrigination: number | null;
}

// JSON cannot carry NaN or Infinity; an estimate that is not a finite number is reported as missing.
function finiteOrNull(value: number): number | null {
  return Number.isFinite(value) ? value : null;
}

/**
 * Boundary-crosser counts and rates (Foote 2000, Paleobiology 26(4) suppl.: 74-102; see boundaryCrosserRates)
 * for each interval, in the order given, e.g. the stages of the time scale for a rate curve. Intervals are
 * computed independently and need not be contiguous.
 *
 * Zero counts: a rate whose formula is undefined or infinite is null, never NaN or Infinity. q is null when no
 * taxon crosses the base (0/0) and when every base crosser is last seen in the interval (nbt = 0 < nbL, which
 * would be -ln 0 = Infinity); p likewise for the top. Proportions are null when no taxon is present. Throws as
 * boundaryCrosserRates for bad ranges, and names the index of an interval without base > top >= 0.
 *
 * @example
 * ratesThroughTime([{ fad: 12, lad: 3 }, { fad: 12, lad: 7 }, { fad: 8, lad: 3 }],
 *   [{ name: "B", base: 10, top: 5 }, { name: "A", base: 5, top: 0 }])
 * // [{ name: "B", nbt: 1, nbL: 1, nFt: 1, nFL: 0, q: 0.693147 (= ln 2), p: 0.693147, qPerMyr: 0.138629, ... },
 * //  { name: "A", nbt: 0, nbL: 2, nFt: 0, nFL: 0, q: null, p: null, proportionalExtinction: 1, taxonCount: 2, ... }]
 */
export function ratesThroughTime(taxa: Array<{ fad: number; lad: number }>, intervals: NamedInterval[]): IntervalRates[] {
  assertValidRanges(taxa);
  assertValidIntervals(intervals);
  return intervals.map(({ name, base, top }) => {
    const rates = boundaryCrosserRates(taxa, base, top);
    return {
      name,
      base,
      top,
      duration: rates.duration,
      nbt: rates.nbt,
      nbL: rates.nbL,
      nFt: rates.nFt,
      nFL: rates.nFL,
      nb: rates.nb,
      nt: rates.nt,
      taxonCount: rates.taxonCount,
      q: finiteOrNull(rates.q),
      p: finiteOrNull(rates.p),
      qPerMyr: finiteOrNull(rates.qPerMyr),
      pPerMyr: finiteOrNull(rates.pPerMyr),
      proportionalExtinction: finiteOrNull(rates.proportionalExtinction),
      proportionalOrigination: finiteOrNull(rates.proportionalOrigination),
    };
  });
}
