// `npm test`: typecheck, lint, build the client, then every Vitest suite (unit, API, browser)
// against a throwaway PostgreSQL cluster in a temp directory on a free loopback port. The
// cluster is stopped and removed even when a step fails; the exit code is non-zero on failure.
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, chmodSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { PostgresCluster, freePort } from "../db/cluster";
import { runMigrations } from "../db/migrate";
import { seedIfEmpty } from "./seed/seed";

const log = (msg: string) => console.log(`[test] ${msg}`);

function step(name: string, cmd: string, args: string[], env: NodeJS.ProcessEnv = process.env): boolean {
  log(`${name}...`);
  const result = spawnSync(cmd, args, { stdio: "inherit", env });
  if (result.status !== 0) {
    console.error(`[test] ${name} failed.`);
    return false;
  }
  return true;
}

async function main(): Promise<number> {
  const node = process.execPath;
  const vitestArgs = process.argv.slice(2); // e.g. `npm test -- --project api`
  const quick = vitestArgs.length > 0;
  if (!quick) {
    if (!step("Typecheck", node, ["node_modules/typescript/bin/tsc", "--noEmit", "-p", "tsconfig.json"])) return 1;
    if (!step("Lint", node, ["node_modules/eslint/bin/eslint.js", "."])) return 1;
  }
  // SKIP_BUILD=1 is for a quick local re-run of API or unit tests against an existing build.
  if (process.env.SKIP_BUILD !== "1" && !step("Client build", node, ["node_modules/vite/bin/vite.js", "build", "--logLevel", "warn"])) return 1;

  const dir = mkdtempSync(join(tmpdir(), "stratasieve-test-"));
  chmodSync(dir, 0o755);
  const port = await freePort();
  const cluster = new PostgresCluster({ dataDir: join(dir, "pg"), runDir: join(dir, "run"), port, throwaway: true }, log);
  try {
    cluster.init();
    cluster.start();
    cluster.createDatabase("stratasieve_test");
    const databaseUrl = cluster.url("stratasieve_test");
    await runMigrations(databaseUrl);
    await seedIfEmpty(databaseUrl);
    log(`Throwaway PostgreSQL on 127.0.0.1:${port}`);
    const env = {
      ...process.env,
      NODE_ENV: "test",
      NO_COLOR: "1",
      DATABASE_URL: databaseUrl,
      TEST_PG_PORT: String(port),
      TEST_PG_DATA: join(dir, "pg"),
      TEST_PG_RUN: join(dir, "run"),
      SESSION_SECRET: "test-secret-that-is-long-enough-for-hs256-signing",
    };
    const ok = step("Tests", node, ["node_modules/vitest/vitest.mjs", "run", ...vitestArgs], env);
    return ok ? 0 : 1;
  } finally {
    cluster.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

main().then(
  (code) => process.exit(code),
  (err) => {
    console.error(`[test] ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
