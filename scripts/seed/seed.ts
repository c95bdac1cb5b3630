// Reference data every database needs (the time scale) and, on a local database, the demo study.
import { count, inArray } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "../../db/schema/index";
import { timescaleUnits as timescaleUnitsTable, users } from "../../db/schema/index";
import { TIMESCALE_VERSION, timescaleUnits } from "../../shared/timescale/index";
import { ROLE_LABELS } from "../../shared/roles";
import { verifyPassword } from "../../server/auth/password";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount } from "./demo/seed";
import { generateDemoStudy } from "./demo/generator";

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

function demoAccountLines(accounts: readonly DemoAccount[]): string[] {
  const width = Math.max(...accounts.map((a) => a.email.length));
  return [
    "Demo accounts (local use only; the demo study and its data are invented):",
    ...accounts.map((a) => `  ${ROLE_LABELS[a.role].padEnd(11)} ${a.email.padEnd(width)}  password: ${a.password}`),
  ];
}

/** Demo accounts that still have their demo password (people may have changed it since). */
async function demoAccountsInUse(db: Db): Promise<DemoAccount[]> {
  const rows = await db
    .select({ email: users.email, passwordHash: users.passwordHash })
    .from(users)
    .where(inArray(users.email, DEMO_ACCOUNTS.map((a) => a.email)));
  const hashOf = new Map(rows.map((r) => [r.email, r.passwordHash]));
  const checks = await Promise.all(DEMO_ACCOUNTS.map(async (a) => hashOf.has(a.email) && (await verifyPassword(hashOf.get(a.email)!, a.password))));
  return DEMO_ACCOUNTS.filter((_, i) => checks[i]);
}

/**
 * Seeds what is missing; returns lines to print. Outside production, a database without any account
 * also gets the invented demo study; while demo accounts keep their demo passwords, the lines list them.
 */
export async function seedIfEmpty(databaseUrl: string, env: { NODE_ENV?: string } = process.env): Promise<string[]> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 2 });
  // pool.end() resolves before its clients' connections have closed; one ended by the server in
  // that moment (a shutdown, a dropped database) must not crash the process. Queries still reject.
  pool.on("error", (err) => console.error(`seeding pool: ${err.message}`));
  const db = drizzle(pool, { schema });
  const lines: string[] = [];
  try {
    const units = await seedTimescale(db);
    if (units) lines.push(`Seeded the time scale (ICS chart v${TIMESCALE_VERSION}, ${units} units).`);
    if (env.NODE_ENV === "production") return lines;
    const [{ n: userCount }] = await db.select({ n: count() }).from(users);
    if (userCount === 0) {
      const data = generateDemoStudy();
      const seeded = await seedDemo(db, { data, env });
      lines.push(
        `Seeded the demo study "${data.study.name}": ${seeded.counts.taxa.toLocaleString("en-US")} invented genera, ` +
          `${seeded.counts.modernSpecies} invented modern species, ${seeded.counts.threads} threads, ` +
          `${seeded.counts.runs} saved runs and ${seeded.counts.comparisons} modern comparison.`,
      );
    }
    const inUse = await demoAccountsInUse(db);
    if (inUse.length) lines.push(...demoAccountLines(inUse));
  } finally {
    await pool.end();
  }
  return lines;
}
