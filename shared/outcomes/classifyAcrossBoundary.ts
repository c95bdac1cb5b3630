import { assertNonNegative, assertValidRanges } from "./validateRanges";

export type BoundaryOutcome = "survivor" | "victim" | "excluded";

export interface ClassifyOptions {
  /**
   * Slack, in Myr, allowed at the window's far edge only (lad <= boundary + window + edgeTolerance), so that
   * a window computed as a stage's base minus its top (e.g. 72.2 - 66 = 6.200000000000003) still takes in a
   * last appearance at that stage's base. Default 1e-9 Myr (about nine hours), far below any dated age.
   */
  edgeTolerance?: number;
}

export const DEFAULT_EDGE_TOLERANCE = 1e-9;

/** Outcome of one valid range; shared with outcomeWarnings so the two never disagree. */
export function outcomeOf(fad: number, lad: number, boundary: number, window: number, edgeTolerance: number): BoundaryOutcome {
  if (!(fad > boundary)) return "excluded"; // first seen at or after the boundary: never at risk
  if (lad < boundary) return "survivor"; // range crosses the boundary
  if (lad <= boundary + window + edgeTolerance) return "victim"; // last seen in the window below it
  return "excluded"; // gone before the window
}

/**
 * Outcome of each taxon across a boundary at age `boundary` (Ma), with a window of `window` Myr below it:
 *   'survivor'  fad > boundary and lad < boundary (its range crosses the boundary)
 *   'victim'    fad > boundary and boundary <= lad <= boundary + window (last seen in the window)
 *   'excluded'  everything else: gone before the window, or first seen at or after the boundary.
 * A range touching the boundary only with its last appearance (lad == boundary) is a victim; one starting
 * at the boundary (fad == boundary) is excluded. Ranges are taken as range-through (present from fad to lad).
 * Throws an Error naming the taxon's index for a missing, NaN, negative or inverted (fad < lad) range.
 *
 * @example
 * classifyAcrossBoundary(
 *   [{ fad: 80, lad: 60 }, { fad: 75, lad: 66 }, { fad: 70, lad: 68 }, { fad: 90, lad: 80 }, { fad: 66, lad: 60 }],
 *   66, 6.2,
 * ) // ["survivor", "victim", "victim", "excluded", "excluded"]
 */
export function classifyAcrossBoundary(
  taxa: Array<{ fad: number; lad: number }>,
  boundary: number,
  window: number,
  options: ClassifyOptions = {},
): BoundaryOutcome[] {
  assertNonNegative(boundary, "boundary");
  assertNonNegative(window, "window");
  const edgeTolerance = options.edgeTolerance ?? DEFAULT_EDGE_TOLERANCE;
  assertNonNegative(edgeTolerance, "edgeTolerance");
  assertValidRanges(taxa);
  return taxa.map((t) => outcomeOf(t.fad, t.lad, boundary, window, edgeTolerance));
}
