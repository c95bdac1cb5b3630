import { assertValidOccurrences, compareCodeUnits, trimmed, type Occurrence } from "./types";

export type AgeMode = "bounds" | "midpoint";

export interface DeriveRangesOptions {
  /** 'bounds' (default): the widest range the dates allow; 'midpoint': each find at the middle of its dates. */
  ageMode?: AgeMode;
  /** Occurrences dated more coarsely than this many Myr (maxMa - minMa > maxSpanMyr) are left out. */
  maxSpanMyr?: number;
}

export interface DerivedRange {
  taxon: string;
  higherTaxon: string | null;
  fadMa: number;
  ladMa: number;
  /** Occurrences used (after any left out for their span). */
  occurrences: number;
  /** Distinct non-empty collection ids among the occurrences used. */
  collections: number;
}

export interface DroppedOccurrence {
  index: number;
  reason: string;
}

// Spans within this of the limit count as within it, so a decimal limit such as 0.268 is not missed by rounding.
const SPAN_TOLERANCE = 1e-9;

/**
 * First and last appearance of every taxon from its dated finds: the range-through reading of occurrence
 * data, where a taxon's first appearance datum (FAD) is its oldest find and its last appearance datum (LAD)
 * its youngest (the usual definition of a stratigraphic range; common practice, see e.g. Foote 2000,
 * Paleobiology 26(4) suppl., for ranges built this way).
 *   ageMode 'bounds' (default): fadMa = max of maxMa, ladMa = min of minMa (the widest range the dates allow);
 *   ageMode 'midpoint': fadMa = max of (maxMa + minMa) / 2, ladMa = min of the same.
 *   maxSpanMyr: occurrences with maxMa - minMa > maxSpanMyr are left out and listed in `dropped`.
 * Taxon names are matched exactly after trimming; an occurrence whose trimmed name is empty is left out and
 * listed in `dropped`. higherTaxon is the most frequent non-empty (trimmed) value among the taxon's
 * occurrences used, ties going to the first in code-unit order, null if none. Ranges are sorted by taxon name
 * in code-unit order. Throws for an occurrence with non-finite ages or maxMa < minMa, naming its index.
 *
 * @example
 * deriveRanges([
 *   { taxon: "Alpha", higherTaxon: "Ax", maxMa: 260, minMa: 255, collection: "c1" },
 *   { taxon: " Alpha ", higherTaxon: "Ax", maxMa: 252, minMa: 250, collection: "c2" },
 *   { taxon: "Beta", maxMa: 270, minMa: 240 },
 * ], { maxSpanMyr: 20 })
 * // { ranges: [{ taxon: "Alpha", higherTaxon: "Ax", fadMa: 260, ladMa: 250, occurrences: 2, collections: 2 }],
 * //   dropped: [{ index: 2, reason: "dated to a span of 30 Myr (270 to 240 Ma), coarser than the limit of 20 Myr" }] }
 */
export function deriveRanges(
  occurrences: Occurrence[],
  opts: DeriveRangesOptions = {},
): { ranges: DerivedRange[]; dropped: DroppedOccurrence[] } {
  const ageMode = opts.ageMode ?? "bounds";
  if (ageMode !== "bounds" && ageMode !== "midpoint") throw new Error(`ageMode must be 'bounds' or 'midpoint', not ${String(ageMode)}`);
  const maxSpan = opts.maxSpanMyr;
  if (maxSpan !== undefined && maxSpan !== null && !(typeof maxSpan === "number" && maxSpan >= 0)) {
    throw new Error(`maxSpanMyr must be a number >= 0, not ${String(maxSpan)}`);
  }
  assertValidOccurrences(occurrences);

  // Names, higher taxa and collections are numbered once each, so the counting below works on numbers: hashing
  // half a million strings into per-taxon sets cost several times more (bench/occurrences.ts).
  const count = occurrences.length;
  const taxonIds = new Map<string, number>();
  const higherIds = new Map<string, number>();
  const collectionIds = new Map<string, number>();
  const taxonOf = new Int32Array(count).fill(-1);
  const higherOf = new Int32Array(count);
  const collectionOf = new Int32Array(count);
  const fad: number[] = [];
  const lad: number[] = [];
  const used: number[] = [];
  const dropped: DroppedOccurrence[] = [];
  for (let index = 0; index < count; index++) {
    const occurrence = occurrences[index]!;
    const taxon = trimmed(occurrence.taxon);
    if (taxon === "") {
      dropped.push({ index, reason: "empty taxon name" });
      continue;
    }
    const { maxMa, minMa } = occurrence;
    const span = maxMa - minMa;
    if (maxSpan != null && span > maxSpan + SPAN_TOLERANCE) {
      dropped.push({ index, reason: `dated to a span of ${round(span)} Myr (${maxMa} to ${minMa} Ma), coarser than the limit of ${maxSpan} Myr` });
      continue;
    }
    const older = ageMode === "bounds" ? maxMa : (maxMa + minMa) / 2;
    const younger = ageMode === "bounds" ? minMa : older;
    let t = taxonIds.get(taxon);
    if (t === undefined) {
      t = taxonIds.size;
      taxonIds.set(taxon, t);
      fad.push(older);
      lad.push(younger);
      used.push(0);
    } else {
      if (older > fad[t]!) fad[t] = older;
      if (younger < lad[t]!) lad[t] = younger;
    }
    used[t]!++;
    taxonOf[index] = t;
    higherOf[index] = idOf(higherIds, trimmed(occurrence.higherTaxon));
    collectionOf[index] = idOf(collectionIds, trimmed(occurrence.collection));
  }

  const taxonNames = [...taxonIds.keys()];
  const higherNames = [...higherIds.keys()];
  const emptyHigher = higherIds.get("") ?? -1;
  const emptyCollection = collectionIds.get("") ?? -1;
  const collections = new Array<number>(taxonNames.length).fill(0);
  forEachDistinctPair(taxonOf, collectionOf, collectionIds.size, (t, c) => {
    if (c !== emptyCollection) collections[t]!++;
  });
  const bestHigher = new Array<number>(taxonNames.length).fill(-1);
  const bestHigherCount = new Array<number>(taxonNames.length).fill(0);
  forEachDistinctPair(taxonOf, higherOf, higherIds.size, (t, h, n) => {
    if (h === emptyHigher) return;
    const best = bestHigher[t]!;
    // Most frequent; on a tie the first in code-unit order.
    if (n > bestHigherCount[t]! || (n === bestHigherCount[t]! && best >= 0 && higherNames[h]! < higherNames[best]!)) {
      bestHigher[t] = h;
      bestHigherCount[t] = n;
    }
  });

  const ranges: DerivedRange[] = taxonNames.map((taxon, t) => ({
    taxon,
    higherTaxon: bestHigher[t]! >= 0 ? higherNames[bestHigher[t]!]! : null,
    fadMa: fad[t]!,
    ladMa: lad[t]!,
    occurrences: used[t]!,
    collections: collections[t]!,
  }));
  ranges.sort((a, b) => compareCodeUnits(a.taxon, b.taxon));
  return { ranges, dropped };
}

function idOf(ids: Map<string, number>, value: string): number {
  let id = ids.get(value);
  if (id === undefined) {
    id = ids.size;
    ids.set(value, id);
  }
  return id;
}

/**
 * Calls `visit(taxon, value, occurrences)` once for every distinct (taxon, value) pair among the occurrences
 * used (taxon >= 0), with how many occurrences carry it: the pairs are coded as numbers and sorted.
 */
function forEachDistinctPair(
  taxonOf: Int32Array,
  valueOf: Int32Array,
  valueCount: number,
  visit: (taxon: number, value: number, occurrences: number) => void,
): void {
  const width = Math.max(1, valueCount);
  const codes = new Float64Array(taxonOf.length);
  let n = 0;
  for (let i = 0; i < taxonOf.length; i++) {
    if (taxonOf[i]! >= 0) codes[n++] = taxonOf[i]! * width + valueOf[i]!;
  }
  const sorted = codes.subarray(0, n).sort();
  let i = 0;
  while (i < n) {
    const code = sorted[i]!;
    let j = i + 1;
    while (j < n && sorted[j] === code) j++;
    visit(Math.floor(code / width), code % width, j - i);
    i = j;
  }
}

function round(value: number): number {
  return Math.round(value * 1e6) / 1e6;
}
