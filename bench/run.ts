// `npm run bench`: every speed figure the project promises, printed as one table and written to
// bench/results.json with the machine's core count. Starts its own throwaway PostgreSQL.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync, chmodSync } from "node:fs";
import { cpus, tmpdir } from "node:os";
import { join } from "node:path";
import { PostgresCluster, freePort } from "../db/cluster";
import { runMigrations } from "../db/migrate";
import { seedIfEmpty } from "../scripts/seed/seed";
import { BENCHMARKS, type BenchFigure } from "./suites";

async function main() {
  const dir = mkdtempSync(join(tmpdir(), "stratasieve-bench-"));
  chmodSync(dir, 0o755);
  const port = await freePort();
  const cluster = new PostgresCluster({ dataDir: join(dir, "pg"), runDir: join(dir, "run"), port, throwaway: true });
  const figures: Array<BenchFigure & { suite: string }> = [];
  try {
    cluster.init();
    cluster.start();
    cluster.createDatabase("stratasieve_bench");
    process.env.DATABASE_URL = cluster.url("stratasieve_bench");
    process.env.NODE_ENV = "test"; // no demo seeding
    await runMigrations(process.env.DATABASE_URL);
    await seedIfEmpty(process.env.DATABASE_URL);
    const only = process.argv[2];
    for (const [suite, run] of Object.entries(BENCHMARKS)) {
      if (only && suite !== only) continue;
      console.log(`[bench] ${suite}...`);
      for (const figure of await run()) figures.push({ suite, ...figure });
    }
  } finally {
    cluster.stop();
    rmSync(dir, { recursive: true, force: true });
  }
  const cores = cpus().length;
  const width = Math.max(...figures.map((f) => f.name.length), 10);
  console.log(`\n${"figure".padEnd(width)}  ${"value".padStart(12)}  unit      note`);
  for (const f of figures) {
    const value = f.unit === "count" || f.value >= 100 ? f.value.toFixed(0) : f.value.toPrecision(4);
    console.log(`${f.name.padEnd(width)}  ${value.padStart(12)}  ${f.unit.padEnd(8)}  ${f.note ?? ""}`);
  }
  console.log(`\nmachine: ${cores} cores, ${cpus()[0]?.model ?? "unknown CPU"}, node ${process.version}`);
  mkdirSync("bench", { recursive: true });
  writeFileSync(
    join("bench", "results.json"),
    JSON.stringify({ measuredAt: new Date().toISOString(), cores, node: process.version, figures: figures.map((f) => ({ ...f, cores })) }, null, 2),
  );
  console.log("written: bench/results.json");
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
