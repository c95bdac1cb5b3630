import { timescaleUnits } from "../timescale/index";

// Lower case, letters and digits only, "late"/"early" read as "upper"/"lower" (as findUnit reads names).
function normalize(name: string): string {
  return name
    .toLowerCase()
    .replace(/[^a-z0-9]/g, "")
    .replace(/^late/, "upper")
    .replace(/^early/, "lower");
}

/** Levenshtein (1966) edit distance: insertions, deletions and substitutions of one character each cost 1. */
export function editDistance(a: string, b: string): number {
  let previous = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    const current = [i];
    for (let j = 1; j <= b.length; j++) {
      current[j] = Math.min(previous[j]! + 1, current[j - 1]! + 1, previous[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
    previous = current;
  }
  return previous[b.length]!;
}

const candidates = timescaleUnits.map((unit) => ({ label: unit.label, key: normalize(unit.name) }));

/**
 * The chart units whose names are closest to `name` by Levenshtein distance (ignoring case, spaces and
 * punctuation), closest first, at most `limit`; for offering names when an interval name is unknown.
 *
 * @example closestIntervalNames("Changsingian") // ["Changhsingian", ...]
 */
export function closestIntervalNames(name: string, limit = 3): string[] {
  const key = normalize(name);
  if (!key) return [];
  return candidates
    .map((c) => ({ label: c.label, distance: editDistance(key, c.key) }))
    .sort((a, b) => a.distance - b.distance || (a.label < b.label ? -1 : a.label > b.label ? 1 : 0))
    .filter((c, i, all) => i === 0 || c.label !== all[i - 1]!.label)
    .slice(0, limit)
    .map((c) => c.label);
}
