import { ICS_2024_12_ROWS, type ChartRow } from "./ics2024-12";

// Ranks from broadest to narrowest. "Age" is the chart's rank name for what the UI calls a stage;
// "Epoch" holds series, "Period" systems. Subperiod and Eon appear only as derived units (below).
export type TimescaleRank = "Eon" | "Era" | "Period" | "Subperiod" | "Epoch" | "Age";

export const RANK_ORDER: readonly TimescaleRank[] = ["Eon", "Era", "Period", "Subperiod", "Epoch", "Age"];

export interface TimescaleUnit {
  /** Identifier as written in the chart data, e.g. "UpperCretaceous", "CambrianStage10". */
  readonly name: string;
  /** Readable form of the name, e.g. "Upper Cretaceous", "Cambrian Stage 10" (derived, see splitName). */
  readonly label: string;
  readonly rank: TimescaleRank;
  /** Name of the next broader unit; null for the Phanerozoic. */
  readonly parent: string | null;
  /** Base (older limit) in Ma. */
  readonly base: number;
  /** Stated uncertainty of the base in Myr (+/-), null when the chart gives none. */
  readonly uncertainty: number | null;
  /** Top (younger limit) in Ma: the base of the next younger unit of the same rank, 0 for the youngest. */
  readonly top: number;
  /** base - top in Myr, rounded to 1e-6 Myr (one year) to drop floating-point residue such as 6.200000000000003. */
  readonly duration: number;
  readonly gsspRatified: boolean;
  /**
   * 'chart' = a row of the chart data; 'derived' = a unit the data name only as a parent, its base read
   * from its oldest member (see DERIVED_UNITS); 'recalled' = FROM MEMORY, missing from the data (see RECALLED_UNITS).
   */
  readonly source: "chart" | "derived" | "recalled";
}

// Inserts spaces into the chart's run-together identifiers: "UpperPleistocene" -> "Upper Pleistocene",
// "CambrianStage10" -> "Cambrian Stage 10". The labels are derived this way, not read from the chart.
export function splitName(name: string): string {
  return name.replace(/([a-z])([A-Z])/g, "$1 $2").replace(/([A-Za-z])(\d)/g, "$1 $2");
}

function roundToYear(myr: number): number {
  return Math.round(myr * 1e6) / 1e6;
}

type UnitWithoutTop = Omit<TimescaleUnit, "top" | "duration">;

interface DerivedUnitSpec {
  readonly name: string;
  readonly rank: TimescaleRank;
  readonly parent: string | null;
  /** The chart unit whose base (and uncertainty and GSSP status) this unit shares. */
  readonly baseFrom: string;
}

// Units named only as parents in the chart data. Their bases are read from the chart: a unit's base
// is the base of its oldest member (Lower Mississippian, Lower Pennsylvanian, Cambrian). Their own
// parents (Carboniferous for both subperiods; none for the Phanerozoic eon) are recalled from the
// chart's layout, FROM MEMORY, not read from the data.
const DERIVED_UNITS: readonly DerivedUnitSpec[] = [
  { name: "Phanerozoic", rank: "Eon", parent: null, baseFrom: "Cambrian" },
  { name: "Mississippian", rank: "Subperiod", parent: "Carboniferous", baseFrom: "LowerMississippian" },
  { name: "Pennsylvanian", rank: "Subperiod", parent: "Carboniferous", baseFrom: "LowerPennsylvanian" },
];

// The chart data lack the Pridoli, the youngest series of the Silurian, which the chart leaves
// undivided (it fills both the series and the stage column). Without it the Ludlow and the
// Ludfordian would run up to the Devonian base. Its name, base 422.7, uncertainty 1.6 and ratified
// GSSP are FROM MEMORY, not read from the chart data: check them against the chart before relying on
// them. It is listed twice, as the series and as its own stage, so that the stage column stays
// gap-free; findUnit("Pridoli") returns the series (both have the same base and top).
const RECALLED_UNITS: readonly UnitWithoutTop[] = [
  { name: "Pridoli", label: "Pridoli", rank: "Epoch", parent: "Silurian", base: 422.7, uncertainty: 1.6, gsspRatified: true, source: "recalled" },
  { name: "Pridoli", label: "Pridoli", rank: "Age", parent: "Pridoli", base: 422.7, uncertainty: 1.6, gsspRatified: true, source: "recalled" },
];

function fromChartRow(row: ChartRow): UnitWithoutTop {
  return {
    name: row.name,
    label: splitName(row.name),
    rank: row.rank,
    parent: row.parent,
    base: row.base,
    uncertainty: row.uncertainty,
    gsspRatified: row.gsspRatified,
    source: "chart",
  };
}

function buildUnits(): TimescaleUnit[] {
  const chartUnits = ICS_2024_12_ROWS.map(fromChartRow);
  const byName = new Map(chartUnits.map((u) => [u.name, u]));
  const derivedUnits: UnitWithoutTop[] = DERIVED_UNITS.map((spec) => {
    const source = byName.get(spec.baseFrom);
    if (!source) throw new Error(`Time scale data lack ${spec.baseFrom}, needed for ${spec.name}`);
    return {
      name: spec.name,
      label: splitName(spec.name),
      rank: spec.rank,
      parent: spec.parent,
      base: source.base,
      uncertainty: source.uncertainty,
      gsspRatified: source.gsspRatified,
      source: "derived",
    };
  });
  const all = [...chartUnits, ...derivedUnits, ...RECALLED_UNITS];

  // Keyed by rank and name: the Pridoli is both a series and a stage.
  const key = (u: UnitWithoutTop) => `${u.rank}:${u.name}`;
  const topByKey = new Map<string, number>();
  for (const rank of RANK_ORDER) {
    // Subperiods do not tile the whole scale (none after the Carboniferous), so their top is the top of
    // their youngest member epoch, computed after the epochs below.
    if (rank === "Subperiod") continue;
    const sameRank = all.filter((u) => u.rank === rank).sort((a, b) => a.base - b.base);
    sameRank.forEach((unit, i) => topByKey.set(key(unit), i === 0 ? 0 : sameRank[i - 1].base));
  }
  for (const subperiod of all.filter((u) => u.rank === "Subperiod")) {
    const memberTops = all.filter((u) => u.parent === subperiod.name).map((u) => topByKey.get(key(u))!);
    topByKey.set(key(subperiod), Math.min(...memberTops));
  }

  const withTops: TimescaleUnit[] = all.map((u) => {
    const top = topByKey.get(key(u))!;
    return { ...u, top, duration: roundToYear(u.base - top) };
  });
  // Youngest first; at an equal base, the broader unit first (as the chart reads: Paleogene before Danian).
  return withTops.sort((a, b) => a.base - b.base || RANK_ORDER.indexOf(a.rank) - RANK_ORDER.indexOf(b.rank));
}

/** Every unit of the time scale (Phanerozoic eon, eras, periods, subperiods, epochs, stages), youngest first. */
export const timescaleUnits: readonly TimescaleUnit[] = buildUnits();

/** The stages (chart rank "Age"), youngest first. */
export const timescaleStages: readonly TimescaleUnit[] = timescaleUnits.filter((u) => u.rank === "Age");
