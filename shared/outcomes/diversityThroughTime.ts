import { countBoundaryCrossers } from "./boundaryCrosserRates";
import { assertValidIntervals, assertValidRanges, type NamedInterval } from "./validateRanges";

export interface StageDiversity {
  name: string;
  base: number;
  top: number;
  /** Range-through richness: taxa whose range reaches into the stage (nbt + nbL + nFt + nFL). */
  rangeThrough: number;
  /** Taxa crossing the stage's base (nbt + nbL): the standing richness at its start. */
  crossingBase: number;
  /** Taxa crossing the stage's top (nbt + nFt): the standing richness at its end. */
  crossingTop: number;
  /** Taxa first seen in the stage (nFt + nFL). */
  firstSeen: number;
  /** Taxa last seen in the stage (nbL + nFL). */
  lastSeen: number;
  /** Taxa known from this stage only (nFL). */
  singleStage: number;
}

export interface GroupDiversity {
  /** The group's key as given (a trait state code, a higher taxon); null for taxa with no group. */
  group: string | null;
  /** Taxa of the group counted in at least one stage. */
  taxa: number;
  stages: StageDiversity[];
}

export interface DiversityThroughTime {
  overall: StageDiversity[];
  /** One entry per group, in order of first appearance in the input; empty when no taxon carries a group. */
  groups: GroupDiversity[];
}

/** Whether one range is counted in the interval by the boundary-crosser rules (in any of the four classes). */
function isPresentIn(taxon: { fad: number; lad: number }, interval: NamedInterval): boolean {
  const { nbt, nbL, nFt, nFL } = countBoundaryCrossers([taxon], interval.base, interval.top);
  return nbt + nbL + nFt + nFL > 0;
}

function countStages(taxa: ReadonlyArray<{ fad: number; lad: number }>, intervals: NamedInterval[]): StageDiversity[] {
  return intervals.map(({ name, base, top }) => {
    const { nbt, nbL, nFt, nFL } = countBoundaryCrossers(taxa, base, top);
    return {
      name,
      base,
      top,
      rangeThrough: nbt + nbL + nFt + nFL,
      crossingBase: nbt + nbL,
      crossingTop: nbt + nFt,
      firstSeen: nFt + nFL,
      lastSeen: nbL + nFL,
      singleStage: nFL,
    };
  });
}

/**
 * Standing diversity per stage from ranges taken as range-through (a taxon is present from its first to its
 * last appearance), overall and for each group (e.g. the states of a trait, or higher taxa). Three counts per
 * stage: the range-through richness (every taxon whose range reaches into the stage, the four boundary-crosser
 * classes of Foote 2000, Paleobiology 26(4) suppl.: 74-102, together), and the boundary crossers at the stage's
 * base and at its top, which Foote recommends as the estimate of standing diversity at an instant because they
 * leave out taxa confined to the stage. The same counting rules as boundaryCrosserRates: a range crosses an
 * age t when fad > t > lad.
 *
 * Range-through richness is inflated in stages in the middle of the span (gaps in a taxon's record are filled
 * in) and truncated at the span's edges (taxa that lived beyond it are not in the data): read the edge stages
 * with care. Throws for a bad range (naming the taxon's index) or interval, as ratesThroughTime does.
 *
 * @example
 * diversityThroughTime([{ fad: 12, lad: 3, group: "infaunal" }, { fad: 12, lad: 7, group: "epifaunal" }, { fad: 8, lad: 3, group: "infaunal" }],
 *   [{ name: "B", base: 10, top: 5 }, { name: "A", base: 5, top: 0 }])
 * // overall: [{ name: "B", rangeThrough: 3, crossingBase: 2, crossingTop: 2, firstSeen: 1, lastSeen: 1, singleStage: 0 },
 * //           { name: "A", rangeThrough: 2, crossingBase: 2, crossingTop: 0, firstSeen: 0, lastSeen: 2, singleStage: 0 }]
 * // groups: [{ group: "infaunal", taxa: 2, stages: [B: rangeThrough 2, A: rangeThrough 2] }, { group: "epifaunal", taxa: 1, ... }]
 */
export function diversityThroughTime(
  taxa: ReadonlyArray<{ fad: number; lad: number; group?: string | null }>,
  intervals: NamedInterval[],
): DiversityThroughTime {
  assertValidRanges(taxa as Array<{ fad: number; lad: number }>);
  assertValidIntervals(intervals);
  const overall = countStages(taxa, intervals);

  const members = new Map<string | null, Array<{ fad: number; lad: number }>>();
  const anyGroup = taxa.some((t) => t.group !== undefined);
  if (anyGroup) {
    for (const t of taxa) {
      const key = t.group ?? null;
      const list = members.get(key) ?? [];
      list.push(t);
      members.set(key, list);
    }
  }
  const groups = [...members].map(([group, list]) => ({
    group,
    taxa: list.filter((t) => intervals.some((i) => isPresentIn(t, i))).length,
    stages: countStages(list, intervals),
  }));
  return { overall, groups };
}
