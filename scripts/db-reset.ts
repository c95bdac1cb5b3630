// `npm run db:reset`: drops the local database of `npm start` (the cluster under .data/pg) and
// creates it again: migrated, with the time scale and the invented demo study. Everything people
// entered in the local database is lost; it never touches a database named by DATABASE_URL.
import { LOCAL_DATABASE, localCluster } from "../db/local";
import { runMigrations } from "../db/migrate";
import { seedIfEmpty } from "./seed/seed";

const log = (msg: string) => console.log(`[db:reset] ${msg}`);

async function main() {
  if (process.env.NODE_ENV === "production") {
    throw new Error("db:reset drops the database and loads invented demo data; it does not run with NODE_ENV=production.");
  }
  if (process.env.DATABASE_URL) {
    throw new Error("DATABASE_URL is set, but db:reset only resets the local database of npm start (.data/pg). Unset DATABASE_URL to reset that one.");
  }
  const cluster = localCluster(log);
  if (cluster.init()) log(`Created a PostgreSQL cluster in ${cluster.opts.dataDir}`);
  const wasRunning = cluster.isRunning();
  cluster.start();
  try {
    cluster.dropDatabase(LOCAL_DATABASE);
    cluster.createDatabase(LOCAL_DATABASE);
    log(`Dropped and re-created the database "${LOCAL_DATABASE}".`);
    const url = cluster.url(LOCAL_DATABASE);
    await runMigrations(url);
    log("Applied the migrations.");
    for (const line of await seedIfEmpty(url)) log(line);
  } finally {
    // Leave the cluster as it was found: a running `npm start` keeps its server.
    if (!wasRunning) cluster.stop();
  }
}

main().catch((err) => {
  console.error(`[db:reset] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
