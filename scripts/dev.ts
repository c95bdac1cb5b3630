// `npm run dev`: the local database as in `npm start`, the API server restarting on change
// (tsx watch) on API_PORT, and Vite's dev server proxying /api to it.
import { spawn } from "node:child_process";
import { startLocalDatabase } from "../db/local";
import { runMigrations } from "../db/migrate";
import { seedIfEmpty } from "./seed/seed";

async function main() {
  const databaseUrl = process.env.DATABASE_URL ?? startLocalDatabase().url;
  await runMigrations(databaseUrl);
  for (const line of await seedIfEmpty(databaseUrl)) console.log(`[dev] ${line}`);
  const apiPort = process.env.API_PORT ?? "5181";
  const vitePort = process.env.VITE_PORT ?? "5173";
  const env = { ...process.env, DATABASE_URL: databaseUrl, PORT: apiPort, API_PORT: apiPort, VITE_PORT: vitePort, APP_URL: process.env.APP_URL ?? `http://127.0.0.1:${vitePort}` };
  const children = [
    spawn(process.execPath, ["node_modules/tsx/dist/cli.mjs", "watch", "server/index.ts"], { stdio: "inherit", env }),
    spawn(process.execPath, ["node_modules/vite/bin/vite.js"], { stdio: "inherit", env }),
  ];
  const stop = () => children.forEach((c) => c.kill("SIGTERM"));
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
