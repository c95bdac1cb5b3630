// Lookups over the time scale the API serves: a unit's period and epoch, the units of one rank
// inside another, and the units around an age (for the strip that shows where a boundary sits).
import { findUnit } from "@shared/timescale/lookup";
import { windowToStageBase, type DefaultWindow } from "@shared/timescale/defaultWindow";
import type { TimescaleRankName, TimescaleUnitDto } from "@shared/schemas/timescale";

/** Two ages closer than this (Myr, under an hour) are the same age; matches the server's tolerance. */
const SAME_AGE = 1e-9;

export interface ScaleIndex {
  /** Youngest first, as the chart lists them. */
  units: readonly TimescaleUnitDto[];
  periods: readonly TimescaleUnitDto[];
  /** The unit a name in the address or a select refers to (case and spacing ignored, "Late" read as "Upper"). */
  resolve(name: string): TimescaleUnitDto | undefined;
  /** The nearest broader unit of this rank (the unit itself when it has that rank). */
  ancestor(unit: TimescaleUnitDto, rank: TimescaleRankName): TimescaleUnitDto | undefined;
  /** Units of `rank` that lie inside `parent`, youngest first. */
  inside(parent: TimescaleUnitDto, rank: TimescaleRankName): TimescaleUnitDto[];
  /** Units of `rank` overlapping the span from `older` to `younger` (Ma), oldest first. */
  overlapping(rank: TimescaleRankName, older: number, younger: number): TimescaleUnitDto[];
  /** The stage with top <= age < base: the last stage before a boundary at `age`. */
  stageBelow(age: number): TimescaleUnitDto | undefined;
  /** Units whose base is this age, broadest first. */
  withBase(age: number): TimescaleUnitDto[];
  /** The default window below a boundary: down to the base of the stage it falls in (as the server applies it). */
  defaultWindow(age: number): DefaultWindow<TimescaleUnitDto> | undefined;
}

const key = (name: string, rank: TimescaleRankName) => `${rank}:${name}`;
const RANKS_BROAD_FIRST: readonly TimescaleRankName[] = ["Eon", "Era", "Period", "Subperiod", "Epoch", "Age"];

export function indexScale(units: readonly TimescaleUnitDto[]): ScaleIndex {
  const byKey = new Map(units.map((u) => [key(u.name, u.rank), u]));
  // A unit's parent is named without its rank; the broadest unit of that name is the parent
  // (the chart's only shared name, Pridoli, is both a series and its own stage).
  const byName = new Map<string, TimescaleUnitDto>();
  for (const rank of RANKS_BROAD_FIRST) for (const u of units) if (u.rank === rank && !byName.has(u.name)) byName.set(u.name, u);
  const parentOf = (u: TimescaleUnitDto) => {
    const parent = u.parent ? byName.get(u.parent) : undefined;
    return parent === u ? undefined : parent;
  };
  const stages = units.filter((u) => u.rank === "Age");

  function ancestor(unit: TimescaleUnitDto, rank: TimescaleRankName): TimescaleUnitDto | undefined {
    let current: TimescaleUnitDto | undefined = unit;
    for (let steps = 0; current && steps < 8; steps++) {
      if (current.rank === rank) return current;
      current = parentOf(current);
    }
    return undefined;
  }

  return {
    units,
    periods: units.filter((u) => u.rank === "Period"),
    resolve(name) {
      const found = findUnit(name);
      return found ? byKey.get(key(found.name, found.rank)) : undefined;
    },
    ancestor,
    inside(parent, rank) {
      return units.filter((u) => u.rank === rank && ancestor(u, parent.rank)?.name === parent.name);
    },
    overlapping(rank, older, younger) {
      return units.filter((u) => u.rank === rank && u.base > younger && u.top < older).reverse();
    },
    stageBelow(age) {
      return stages.find((s) => s.top <= age + SAME_AGE && age < s.base - SAME_AGE);
    },
    defaultWindow(age) {
      const stage = stages.find((s) => s.top <= age + SAME_AGE && age < s.base - SAME_AGE);
      return stage ? windowToStageBase(age, stage) : undefined;
    },
    withBase(age) {
      return units
        .filter((u) => Math.abs(u.base - age) <= SAME_AGE)
        .sort((a, b) => RANKS_BROAD_FIRST.indexOf(a.rank) - RANKS_BROAD_FIRST.indexOf(b.rank));
    },
  };
}
