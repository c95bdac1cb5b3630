// `npm start`: PostgreSQL on loopback (installed and created when missing), migrations, seed
// data when the database is empty, a fresh client build, then the server on 127.0.0.1:PORT.
import { spawnSync } from "node:child_process";
import { startLocalDatabase } from "../db/local";
import { runMigrations } from "../db/migrate";
import { seedIfEmpty } from "./seed/seed";

const log = (msg: string) => console.log(`[start] ${msg}`);

async function main() {
  let databaseUrl = process.env.DATABASE_URL;
  if (databaseUrl) {
    log("Using the database named by DATABASE_URL.");
  } else {
    const local = startLocalDatabase(log);
    databaseUrl = local.url;
    log(`PostgreSQL is running on 127.0.0.1:${local.cluster.opts.port} (data in .data/pg).`);
    if (local.startedHere) {
      // Ctrl-C (or any exit) stops the cluster this run started; one it found running is left alone.
      process.once("exit", () => {
        log("Stopping PostgreSQL...");
        local.cluster.stop();
      });
    } else {
      log("PostgreSQL was already running (another npm start?): it keeps running when this one stops.");
    }
  }
  process.env.DATABASE_URL = databaseUrl;
  await runMigrations(databaseUrl);
  log("Database schema is up to date.");
  const seeded = await seedIfEmpty(databaseUrl);
  if (seeded.length) for (const line of seeded) log(line);

  if (process.env.SKIP_BUILD !== "1") {
    log("Building the client...");
    const build = spawnSync(process.execPath, ["node_modules/vite/bin/vite.js", "build", "--logLevel", "warn"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("The client build failed.");
  }
  const { startServer } = await import("../server/index");
  const { config } = await startServer();
  console.log(`\n  Stratasieve is ready: ${config.appUrl}\n`);
}

main().catch((err) => {
  console.error(`[start] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
