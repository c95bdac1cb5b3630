import { DEFAULT_EDGE_TOLERANCE, outcomeOf } from "./classifyAcrossBoundary";
import { assertNonNegative, assertValidIntervals, rangeProblem, type NamedInterval } from "./validateRanges";

/** The taxa a warning applies to: their number and their indices in the input, ascending. */
export interface WarningGroup {
  count: number;
  indices: number[];
}

export interface OutcomeWarnings {
  /** fad or lad is null, undefined or NaN: the taxon cannot be classified. */
  missingRange: WarningGroup;
  /** fad or lad is negative, infinite or not a number, or the range is inverted (fad < lad). */
  invalidRange: WarningGroup;
  /**
   * Survivors and victims whose whole range (fad and lad) lies within one of the given intervals: taxa known
   * from a single interval. Foote (2000, Paleobiology 26(4) suppl.: 74-102) shows such taxa to be especially
   * sensitive to preservation and interval length; a single-interval victim may owe its outcome to one
   * sample. Excluded taxa are not checked, since they do not enter a selectivity test.
   */
  singleInterval: WarningGroup;
  /**
   * Victims last seen strictly below the boundary, inside the window (boundary < lad <= boundary + window).
   * Their ranges may be truncated: because the fossil record is incomplete, the last find of a taxon falls
   * before its true extinction (the Signor-Lipps effect; Signor & Lipps 1982, GSA Special Paper 190), so
   * some victims look earlier than they were and an abrupt loss can look gradual. Conversely some of these
   * taxa may truly have vanished before the boundary. Victims last seen at the boundary itself are not flagged.
   */
  lastSeenBelowBoundary: WarningGroup;
}

function group(indices: number[]): WarningGroup {
  return { count: indices.length, indices };
}

/**
 * Data-quality warnings for a boundary analysis (see classifyAcrossBoundary for the outcome rules). Unlike
 * classifyAcrossBoundary it does not throw for missing or invalid ranges: it lists them, so that the rows
 * can be shown and fixed. Throws for an unusable boundary, window or interval list.
 *
 * @example
 * outcomeWarnings(
 *   [{ fad: 80, lad: 60 }, { fad: 70, lad: 68 }, { fad: null, lad: 66 }, { fad: 67, lad: 69 }, { fad: 72.2, lad: 66 }],
 *   66, 6.2, [{ name: "Maastrichtian", base: 72.2, top: 66 }, { name: "Danian", base: 66, top: 61.66 }],
 * )
 * // { missingRange: { count: 1, indices: [2] }, invalidRange: { count: 1, indices: [3] },
 * //   singleInterval: { count: 2, indices: [1, 4] }, lastSeenBelowBoundary: { count: 1, indices: [1] } }
 */
export function outcomeWarnings(
  taxa: ReadonlyArray<{ fad: number | null | undefined; lad: number | null | undefined }>,
  boundary: number,
  window: number,
  intervals: ReadonlyArray<NamedInterval>,
  options: { edgeTolerance?: number } = {},
): OutcomeWarnings {
  assertNonNegative(boundary, "boundary");
  assertNonNegative(window, "window");
  assertValidIntervals(intervals);
  const edgeTolerance = options.edgeTolerance ?? DEFAULT_EDGE_TOLERANCE;
  assertNonNegative(edgeTolerance, "edgeTolerance");
  if (!Array.isArray(taxa)) throw new Error("taxa must be an array of { fad, lad }");

  const missing: number[] = [];
  const invalid: number[] = [];
  const singleInterval: number[] = [];
  const lastSeenBelow: number[] = [];
  taxa.forEach((taxon, index) => {
    const problem = rangeProblem(taxon ?? {});
    if (problem) {
      (problem.kind === "missing" ? missing : invalid).push(index);
      return;
    }
    const fad = taxon.fad as number;
    const lad = taxon.lad as number;
    const outcome = outcomeOf(fad, lad, boundary, window, edgeTolerance);
    if (outcome === "excluded") return;
    if (intervals.some((interval) => interval.top <= lad && fad <= interval.base)) singleInterval.push(index);
    if (outcome === "victim" && lad > boundary) lastSeenBelow.push(index);
  });
  return {
    missingRange: group(missing),
    invalidRange: group(invalid),
    singleInterval: group(singleInterval),
    lastSeenBelowBoundary: group(lastSeenBelow),
  };
}
