// Reference data every database needs (the time scale) and, on a local database, the demo study.
import { count } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "./schema/index";
import { timescaleUnits as timescaleUnitsTable } from "./schema/index";
import { TIMESCALE_VERSION, timescaleUnits } from "../shared/timescale/index";

type Db = ReturnType<typeof drizzle<typeof schema>>;

export async function seedTimescale(db: Db): Promise<number> {
  const [{ n }] = await db.select({ n: count() }).from(timescaleUnitsTable);
  if (n > 0) return 0;
  await db.insert(timescaleUnitsTable).values(
    timescaleUnits.map((u, i) => ({
      version: TIMESCALE_VERSION,
      name: u.name,
      label: u.label,
      rank: u.rank,
      parent: u.parent,
      baseMa: u.base,
      topMa: u.top,
      uncertaintyMa: u.uncertainty,
      gsspRatified: u.gsspRatified,
      source: u.source,
      sortOrder: i,
    })),
  );
  return timescaleUnits.length;
}

/** Seeds what is missing; returns lines to print. */
export async function seedIfEmpty(databaseUrl: string): Promise<string[]> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 });
  const db = drizzle(pool, { schema });
  const lines: string[] = [];
  try {
    const units = await seedTimescale(db);
    if (units) lines.push(`Seeded the time scale (ICS chart v${TIMESCALE_VERSION}, ${units} units).`);
  } finally {
    await pool.end();
  }
  return lines;
}
