import { assertValidOccurrences, trimmed, type Occurrence, type TimeBin } from "./types";

export interface ThreeTimerRow {
  bin: string;
  /** Three-timers: taxa sampled in the bin before, this bin and the bin after. */
  t3: number;
  /** Part-timers: sampled in the bins before and after but not in this one. */
  partTimers: number;
  /** Two-timers of the lower (older) boundary: sampled in the bin before and in this one. */
  t2Below: number;
  /** Two-timers of the upper (younger) boundary: sampled in this bin and in the bin after. */
  t2Above: number;
  /** t3 / (t3 + partTimers); null when both are 0. */
  samplingCompleteness: number | null;
  /** ln(t2Below / t3) + ln(samplingCompleteness); null when undefined. */
  extinction: number | null;
  /** ln(t2Above / t3) + ln(samplingCompleteness); null when undefined. */
  origination: number | null;
  /** Taxa sampled in this bin. */
  sampled: number;
  /** Occurrences that fall wholly inside this bin. */
  occurrences: number;
  baseMa: number;
  topMa: number;
}

// Bin membership tolerance (contract: within 1e-9), so ages read from a chart in decimals still fit their bin.
const MEMBERSHIP_TOLERANCE = 1e-9;

/**
 * Three-timer counts and rates after Alroy (2008, Dynamics of origination and extinction in the marine fossil
 * record. PNAS 105 suppl. 1: 11536-11542), over bins given oldest first (each { name, baseMa, topMa },
 * contiguous). Unlike boundary-crosser rates, they read only where a taxon was actually sampled, not its
 * range-through, so a gap in sampling shows as a part-timer instead of hiding inside a range.
 * An occurrence belongs to bin j when its whole age range lies inside it (topMa_j <= minMa and
 * maxMa <= baseMa_j, within 1e-9); an occurrence straddling bins counts for none (an occurrence dated exactly to
 * a shared limit lies inside both bins). A taxon (name trimmed; empty names ignored) is sampled in a bin if it
 * has an occurrence there. For bin i:
 *   t3 = sampled in i-1, i and i+1; partTimers = sampled in i-1 and i+1 but not i;
 *   t2Below = sampled in i-1 and i; t2Above = sampled in i and i+1 (0 where a neighbour is missing);
 *   samplingCompleteness = t3 / (t3 + partTimers);
 *   extinction = ln(t2Below / t3) + ln(samplingCompleteness); origination = ln(t2Above / t3) + ln(samplingCompleteness);
 * each null where undefined (a zero denominator or a log of zero). One row per bin, in order.
 * Throws for an occurrence with non-finite ages or maxMa < minMa (naming its index), and for a bin whose base
 * is not older than its top or that is older than the bin before it.
 *
 * @example
 * // Bins A (30-20 Ma), B (20-10 Ma), C (10-0 Ma); x is found in A, B, C; y in A and C only; z in A and B.
 * threeTimerRates([
 *   { taxon: "x", maxMa: 25, minMa: 25 }, { taxon: "x", maxMa: 15, minMa: 15 }, { taxon: "x", maxMa: 5, minMa: 5 },
 *   { taxon: "y", maxMa: 25, minMa: 25 }, { taxon: "y", maxMa: 5, minMa: 5 },
 *   { taxon: "z", maxMa: 25, minMa: 21 }, { taxon: "z", maxMa: 19, minMa: 11 },
 * ], [{ name: "A", baseMa: 30, topMa: 20 }, { name: "B", baseMa: 20, topMa: 10 }, { name: "C", baseMa: 10, topMa: 0 }])[1]
 * // { bin: "B", t3: 1, partTimers: 1, t2Below: 2, t2Above: 1, samplingCompleteness: 0.5,
 * //   extinction: ln(2) + ln(0.5) = 0, origination: ln(1) + ln(0.5) = -0.693147, sampled: 2, occurrences: 2, ... }
 */
export function threeTimerRates(occurrences: Occurrence[], bins: Array<{ name: string; baseMa: number; topMa: number }>): ThreeTimerRow[] {
  assertValidBins(bins);
  assertValidOccurrences(occurrences);
  const binCount = bins.length;
  const bases = bins.map((b) => b.baseMa);
  const tops = bins.map((b) => b.topMa);

  // Presence of taxon t in bin j at presence[t * binCount + j]; grown as taxa appear.
  const taxonIndex = new Map<string, number>();
  let presence = new Uint8Array(Math.max(1, binCount * 64));
  const occurrencesPerBin = new Array<number>(binCount).fill(0);

  for (let index = 0; index < occurrences.length; index++) {
    const occurrence = occurrences[index]!;
    if (binCount === 0) break;
    const taxon = trimmed(occurrence.taxon);
    if (taxon === "") continue;
    // Bins are ordered oldest first: the bins whose top is young enough form a suffix, those whose base is old
    // enough a prefix; the occurrence lies inside each bin of their overlap.
    const first = firstIndex(binCount, (j) => tops[j]! <= occurrence.minMa + MEMBERSHIP_TOLERANCE);
    const last = firstIndex(binCount, (j) => !(bases[j]! >= occurrence.maxMa - MEMBERSHIP_TOLERANCE)) - 1;
    if (first > last) continue;
    let t = taxonIndex.get(taxon);
    if (t === undefined) {
      t = taxonIndex.size;
      taxonIndex.set(taxon, t);
      if ((t + 1) * binCount > presence.length) {
        const grown = new Uint8Array(presence.length * 2);
        grown.set(presence);
        presence = grown;
      }
    }
    for (let j = first; j <= last; j++) {
      presence[t * binCount + j] = 1;
      occurrencesPerBin[j]!++;
    }
  }

  const rows: ThreeTimerRow[] = bins.map((bin, j) => ({
    bin: bin.name,
    t3: 0,
    partTimers: 0,
    t2Below: 0,
    t2Above: 0,
    samplingCompleteness: null,
    extinction: null,
    origination: null,
    sampled: 0,
    occurrences: occurrencesPerBin[j]!,
    baseMa: bin.baseMa,
    topMa: bin.topMa,
  }));
  const taxa = taxonIndex.size;
  for (let t = 0; t < taxa; t++) {
    const offset = t * binCount;
    for (let j = 0; j < binCount; j++) {
      const here = presence[offset + j] === 1;
      const before = j > 0 && presence[offset + j - 1] === 1;
      const after = j < binCount - 1 && presence[offset + j + 1] === 1;
      const row = rows[j]!;
      if (here) row.sampled++;
      if (before && here) row.t2Below++;
      if (here && after) row.t2Above++;
      if (before && after) {
        if (here) row.t3++;
        else row.partTimers++;
      }
    }
  }
  for (const row of rows) {
    const completeness = row.t3 + row.partTimers > 0 ? row.t3 / (row.t3 + row.partTimers) : null;
    row.samplingCompleteness = completeness;
    row.extinction = logRate(row.t2Below, row.t3, completeness);
    row.origination = logRate(row.t2Above, row.t3, completeness);
  }
  return rows;
}

/** ln(twoTimers / t3) + ln(completeness), or null when either log is of zero or its ratio has no denominator. */
function logRate(twoTimers: number, t3: number, completeness: number | null): number | null {
  if (t3 === 0 || twoTimers === 0 || completeness === null || completeness === 0) return null;
  return Math.log(twoTimers / t3) + Math.log(completeness);
}

/** Smallest j in [0, n) with predicate true, n if none; the predicate must be false then true along j. */
function firstIndex(n: number, predicate: (j: number) => boolean): number {
  let lo = 0;
  let hi = n;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (predicate(mid)) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

function assertValidBins(bins: ReadonlyArray<TimeBin>): void {
  if (!Array.isArray(bins)) throw new Error("bins must be an array, oldest first");
  for (let j = 0; j < bins.length; j++) {
    const bin = bins[j]!;
    if (!Number.isFinite(bin.baseMa) || !Number.isFinite(bin.topMa)) throw new Error(`bin ${j} (${bin.name}): ages must be finite numbers`);
    if (!(bin.baseMa > bin.topMa)) throw new Error(`bin ${j} (${bin.name}): base ${bin.baseMa} Ma must be older (larger) than top ${bin.topMa} Ma`);
    const previous = bins[j - 1];
    if (previous && bin.baseMa > previous.baseMa) {
      throw new Error(`bin ${j} (${bin.name}) is older than bin ${j - 1} (${previous.name}): bins must be given oldest first`);
    }
  }
}
