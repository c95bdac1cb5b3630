import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "../db/schema/index";
import { timeQueries } from "./http/serverTiming";

export type Database = NodePgDatabase<typeof schema>;
export type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];
export type DbOrTx = Database | Transaction;

export interface DatabaseHandle {
  db: Database;
  pool: pg.Pool;
  close(): Promise<void>;
}

export function connectDatabase(url: string): DatabaseHandle {
  const pool = new pg.Pool({ connectionString: url, max: 10, connectionTimeoutMillis: 3000 });
  // An idle client losing its connection (database restarted) must not crash the process.
  pool.on("error", (err) => console.error(`database pool: ${err.message}`));
  pool.on("connect", timeQueries);
  const db = drizzle(pool, { schema });
  return { db, pool, close: () => pool.end() };
}
