import { asc, eq } from "drizzle-orm";
import type { Database } from "../db";
import { timescaleUnits } from "../../db/schema/index";
import { TIMESCALE_CITATION, TIMESCALE_VERSION } from "../../shared/timescale/index";
import type { Timescale, TimescaleUnitDto } from "../../shared/schemas/timescale";
import { DomainError } from "../domain/errors";

type UnitRow = typeof timescaleUnits.$inferSelect;

// base - top rounded to 1e-6 Myr (one year), so 72.2 - 66 reads 6.2 rather than 6.200000000000003.
function durationOf(base: number, top: number): number {
  return Math.round((base - top) * 1e6) / 1e6;
}

function toUnit(row: UnitRow): TimescaleUnitDto {
  return {
    name: row.name,
    label: row.label,
    rank: row.rank as TimescaleUnitDto["rank"],
    parent: row.parent,
    base: row.baseMa,
    top: row.topMa,
    uncertainty: row.uncertaintyMa,
    duration: durationOf(row.baseMa, row.topMa),
    gsspRatified: row.gsspRatified,
    source: row.source as TimescaleUnitDto["source"],
  };
}

/** The time scale as seeded into the database (reference data: read once, then kept in memory). */
export function createTimescaleService(db: Database) {
  let cached: Timescale | null = null;
  return {
    async get(): Promise<Timescale> {
      if (cached) return cached;
      const rows = await db
        .select()
        .from(timescaleUnits)
        .where(eq(timescaleUnits.version, TIMESCALE_VERSION))
        .orderBy(asc(timescaleUnits.sortOrder));
      if (rows.length === 0) {
        throw new DomainError("unavailable", "timescale_missing", `The time scale (ICS chart v${TIMESCALE_VERSION}) is not loaded in the database. Restart the server so that it seeds it.`);
      }
      cached = { version: TIMESCALE_VERSION, citation: TIMESCALE_CITATION, units: rows.map(toUnit) };
      return cached;
    },
  };
}
export type TimescaleService = ReturnType<typeof createTimescaleService>;
