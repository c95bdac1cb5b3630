// Reading an interval name the way a study reads it: first among the study's own time bins, then in
// the ICS chart shipped with the app. One lookup serves the trait table (grid, bulk edit, import) and
// the occurrence upload, so a name means the same thing everywhere in a study.
import { findUnit, TIMESCALE_VERSION } from "../timescale/index";
import { editDistance } from "../occurrences/closestIntervalNames";

/** The parts of a study's time bin that resolving a name needs (ages in Ma, base older than top). */
export interface TimeBinLike {
  name: string;
  baseMa: number;
  topMa: number;
}

/** An interval name resolved to its limits: a study bin (by its own name) or a chart unit (by its label). */
export interface ResolvedInterval {
  source: "bin" | "chart";
  name: string;
  baseMa: number;
  topMa: number;
}

/** Reads an interval name; `binNames` are the study's bin names, oldest first (none for the chart alone). */
export type IntervalLookup = ((name: string) => ResolvedInterval | undefined) & { readonly binNames?: readonly string[] };

/** The resolution order, as the screens and the API document state it. */
export const INTERVAL_RESOLUTION_ORDER =
  `An interval name is looked up first among this study's time bins, then among the units of the ICS chart ${TIMESCALE_VERSION}: ` +
  "when a name is both, the study's bin is used. Bin names match ignoring case and extra spaces, and a bin named by a number " +
  "is found by that number however it is written (7, 07, 7.0). In a column that takes ages or names (a taxon's first and last " +
  "appearance), a number that names one of the study's bins is read as that bin, not as an age; write “12 Ma” to give an age there.";

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

/**
 * The key two bin names share when they are the same name: trimmed, case-blind, runs of spaces as
 * one, and a name that is a number compared as that number ("07" and "7.0" are bin 7).
 *
 * @example timeBinKey(" Slice  7 ") === timeBinKey("slice 7") // true
 * @example timeBinKey("07") === timeBinKey("7") // true
 */
export function timeBinKey(name: string): string {
  const t = name.trim().replace(/\s+/g, " ").toLowerCase();
  return NUMBER.test(t) ? `#${Number(t)}` : t;
}

/** True when the name is a number (a numbered slice). */
export const isNumberName = (name: string) => NUMBER.test(name.trim());

/**
 * A unit of the ICS chart by name (as findUnit reads names: case, spaces and punctuation ignored,
 * Early/Late for Lower/Upper), or undefined.
 *
 * @example chartInterval("Late Ordovician") // { source: "chart", name: "Upper Ordovician", baseMa: 458.2, topMa: 443.1 }
 */
export function chartInterval(name: string): ResolvedInterval | undefined {
  const unit = findUnit(name);
  return unit ? { source: "chart", name: unit.label, baseMa: unit.base, topMa: unit.top } : undefined;
}

/**
 * The lookup of a study with these bins: a bin of that name (see timeBinKey), else the chart unit of
 * that name, else undefined. Without bins it is the chart lookup alone.
 *
 * @example intervalLookup([{ name: "7", baseMa: 449.5, topMa: 447.0 }])("07")
 *   // { source: "bin", name: "7", baseMa: 449.5, topMa: 447.0 }
 */
export function intervalLookup(bins: readonly TimeBinLike[]): IntervalLookup {
  if (bins.length === 0) return chartInterval;
  const byKey = new Map<string, ResolvedInterval>();
  for (const bin of bins) {
    const key = timeBinKey(bin.name);
    if (!byKey.has(key)) byKey.set(key, { source: "bin", name: bin.name, baseMa: bin.baseMa, topMa: bin.topMa });
  }
  const lookup = (name: string) => byKey.get(timeBinKey(name)) ?? chartInterval(name);
  return Object.assign(lookup, { binNames: bins.map((b) => b.name) });
}

/** True when the lookup reads a study's bins (not the chart alone). */
export const hasBins = (intervals: IntervalLookup) => (intervals.binNames?.length ?? 0) > 0;

/**
 * The study's bin names closest to `name` by Levenshtein distance (case and spaces ignored), closest
 * first, at most `limit`; offered beside the chart's closest names when a name is unknown.
 */
export function closestBinNames(name: string, intervals: IntervalLookup, limit = 3): string[] {
  const key = timeBinKey(name);
  return (intervals.binNames ?? [])
    .map((bin) => ({ bin, distance: editDistance(key, timeBinKey(bin)) }))
    .sort((a, b) => a.distance - b.distance)
    .slice(0, limit)
    .map((c) => c.bin);
}

/** Bins whose name is also a chart unit's: the bin wins there, which the bins screen says. */
export function binsShadowingChart(bins: readonly TimeBinLike[]): Array<{ bin: string; chartUnit: string }> {
  return bins.flatMap((bin) => {
    const unit = chartInterval(bin.name);
    return unit ? [{ bin: bin.name, chartUnit: unit.name }] : [];
  });
}

/** What to add to "unknown interval" when the name is a number and the study has no bin of that number. */
export function numberedIntervalHint(name: string, hasBins: boolean): string {
  if (!isNumberName(name)) return "";
  return hasBins
    ? " (a number in an interval column names one of the study's time bins, and no bin has this number)"
    : " (a number in an interval column is read as a numbered time bin: define the study's time bins in the Codebook first)";
}
