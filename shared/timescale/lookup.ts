import { RANK_ORDER, timescaleStages, timescaleUnits, type TimescaleUnit } from "./units";

// Lower case without spaces, hyphens or other separators, so "Upper Cretaceous", "upper-cretaceous" and
// "UpperCretaceous" meet. A leading "Late"/"Early" is read as "Upper"/"Lower": the time words used for
// the rock words of the chart's series (common practice, no source).
function normalizeName(name: string): string {
  return name
    .toLowerCase()
    .replace(/[^a-z0-9]/g, "")
    .replace(/^late/, "upper")
    .replace(/^early/, "lower");
}

// The first unit wins on a shared name: units are ordered broadest first at an equal base, so
// "Pridoli" finds the series rather than the stage of the same name and extent.
const unitsByNormalizedName = new Map<string, TimescaleUnit>();
for (const unit of timescaleUnits) {
  const key = normalizeName(unit.name);
  if (!unitsByNormalizedName.has(key)) unitsByNormalizedName.set(key, unit);
}

/**
 * The unit with this name, or undefined. Matching ignores case, spaces and separators, and accepts
 * "Late"/"Early" for "Upper"/"Lower".
 *
 * @example findUnit("Late Cretaceous") // { name: "UpperCretaceous", base: 100.5, top: 66, ... }
 */
export function findUnit(name: string): TimescaleUnit | undefined {
  return unitsByNormalizedName.get(normalizeName(name));
}

function assertAge(age: number, what: string): void {
  if (typeof age !== "number" || !Number.isFinite(age)) throw new Error(`${what} must be a finite age in Ma, got ${String(age)}`);
  if (age < 0) throw new Error(`${what} must not be negative (ages are in Ma before present), got ${age}`);
}

/**
 * All units that contain the instant `age` (Ma), broadest rank first. A unit spans (top, base]: a
 * boundary age belongs to the unit it is the base of (66.0 lies in the Danian, not the Maastrichtian);
 * age 0 belongs to the youngest units.
 *
 * @example unitsContaining(66).map((u) => u.name)
 *   // ["Phanerozoic", "Cenozoic", "Paleogene", "Paleocene", "Danian"]
 */
export function unitsContaining(age: number): TimescaleUnit[] {
  assertAge(age, "Age");
  return timescaleUnits
    .filter((u) => (u.top < age && age <= u.base) || (age === 0 && u.top === 0))
    .sort((a, b) => RANK_ORDER.indexOf(a.rank) - RANK_ORDER.indexOf(b.rank));
}

/**
 * The stage just below (older than) `age`: the stage with top <= age < base. For a boundary it is the
 * last stage before the boundary, whose duration is the default window below it. Undefined at or below
 * the base of the oldest stage (538.8 Ma).
 *
 * @example stageBelow(66) // { name: "Maastrichtian", base: 72.2, top: 66, duration: 6.2, ... }
 */
export function stageBelow(age: number): TimescaleUnit | undefined {
  assertAge(age, "Age");
  return timescaleStages.find((s) => s.top <= age && age < s.base);
}

/**
 * A stratigraphic range given as named intervals, in ages: fad = base of the first interval,
 * lad = top of the last one (range-through from the start of one to the end of the other). Throws
 * for an unknown name, and when the last interval ends at or before the first one begins (names
 * swapped).
 *
 * @example resolveIntervalRange("Campanian", "Maastrichtian") // { fad: 83.6, lad: 66 }
 */
export function resolveIntervalRange(firstIntervalName: string, lastIntervalName: string): { fad: number; lad: number } {
  const first = findUnit(firstIntervalName);
  if (!first) throw new Error(`Unknown interval "${firstIntervalName}" (first appearance): not a unit of the time scale`);
  const last = findUnit(lastIntervalName);
  if (!last) throw new Error(`Unknown interval "${lastIntervalName}" (last appearance): not a unit of the time scale`);
  const range = { fad: first.base, lad: last.top };
  if (range.lad >= range.fad) {
    throw new Error(
      `Interval range "${firstIntervalName}" to "${lastIntervalName}" is inverted: the last interval ends at ` +
        `${range.lad} Ma, not after the first one begins at ${range.fad} Ma`,
    );
  }
  return range;
}
