// The local database of `npm start`: a persistent cluster under .data/pg on 127.0.0.1:PGPORT,
// with a password generated once into .data/pg-password (scram-sha-256 authentication).
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { randomBytes } from "node:crypto";
import { join } from "node:path";
import { PostgresCluster } from "./cluster";

export const DATA_DIR = join(process.cwd(), ".data");
export const LOCAL_DATABASE = "stratasieve";

function localPassword(): string {
  const file = join(DATA_DIR, "pg-password");
  if (existsSync(file)) return readFileSync(file, "utf8").trim();
  mkdirSync(DATA_DIR, { recursive: true });
  const password = randomBytes(24).toString("base64url");
  writeFileSync(file, password, { mode: 0o600 });
  return password;
}

export function localCluster(log: (msg: string) => void = console.log): PostgresCluster {
  const port = Number(process.env.PGPORT ?? 54329);
  return new PostgresCluster(
    { dataDir: join(DATA_DIR, "pg"), runDir: join(DATA_DIR, "run"), port, throwaway: false, password: localPassword() },
    log,
  );
}

/**
 * Starts (creating the first time) the local cluster and returns the app database's URL;
 * `startedHere` is false when it was already running (another `npm start` runs on it).
 */
export function startLocalDatabase(log: (msg: string) => void = console.log): { url: string; cluster: PostgresCluster; startedHere: boolean } {
  const cluster = localCluster(log);
  if (cluster.init()) log(`Created a PostgreSQL cluster in ${cluster.opts.dataDir}`);
  const startedHere = !cluster.isRunning();
  cluster.start();
  cluster.createDatabase(LOCAL_DATABASE);
  return { url: cluster.url(LOCAL_DATABASE), cluster, startedHere };
}
