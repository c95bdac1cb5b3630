// `npm start` and the PostgreSQL it runs (scripts/start.ts, db/local.ts): stopping it (Ctrl-C)
// stops the cluster it started, and leaves alone one it found running (a second terminal's
// `npm start`). Runs the real script in a folder of its own, so its .data/ (cluster, password,
// secrets) is this test's, on free ports; the client build is skipped (SKIP_BUILD=1).
import { spawn, type ChildProcess } from "node:child_process";
import { chmodSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PostgresCluster, freePort } from "../../db/cluster";

const START_SCRIPT = fileURLToPath(new URL("../../scripts/start.ts", import.meta.url));
const TSX = import.meta.resolve("tsx");

let dir: string;
let pgPort: number;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "stratasieve-start-"));
  chmodSync(dir, 0o755);
  pgPort = await freePort();
});

afterAll(() => {
  // Whatever a failed test left running is stopped before the folder goes.
  const cluster = clusterOf();
  if (cluster?.isRunning()) cluster.stop();
  rmSync(dir, { recursive: true, force: true });
});

/** The cluster npm start made in this test's folder (its password is in .data/pg-password once made). */
function clusterOf(): PostgresCluster | null {
  let password: string;
  try {
    password = readFileSync(join(dir, ".data", "pg-password"), "utf8").trim();
  } catch {
    return null;
  }
  return new PostgresCluster({ dataDir: join(dir, ".data", "pg"), runDir: join(dir, ".data", "run"), port: pgPort, throwaway: false, password }, () => {});
}

/** Runs `npm start`'s script until it says it is ready, then presses Ctrl-C (SIGINT) and waits for it to end. */
async function startAndInterrupt(): Promise<{ output: string; code: number | null }> {
  const env: Record<string, string | undefined> = {
    ...process.env,
    PGPORT: String(pgPort),
    PORT: String(await freePort()),
    HOST: "127.0.0.1",
    SKIP_BUILD: "1",
    NODE_ENV: "development",
    JOB_WORKERS: "0",
  };
  delete env.DATABASE_URL;
  delete env.APP_URL;
  const child: ChildProcess = spawn(process.execPath, ["--import", TSX, START_SCRIPT], { cwd: dir, env, stdio: ["ignore", "pipe", "pipe"] });
  let output = "";
  const exited = new Promise<number | null>((resolve) => child.once("exit", (code) => resolve(code)));
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`npm start did not get ready:\n${output}`)), 240_000);
    const read = (chunk: Buffer) => {
      output += String(chunk);
      if (output.includes("Stratasieve is ready")) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout!.on("data", read);
    child.stderr!.on("data", read);
    void exited.then(() => {
      clearTimeout(timer);
      reject(new Error(`npm start ended before it was ready:\n${output}`));
    });
  });
  child.kill("SIGINT");
  const code = await exited;
  return { output, code };
}

describe("npm start and its PostgreSQL", () => {
  it("stops the cluster it started when it is stopped with Ctrl-C", async () => {
    const { output, code } = await startAndInterrupt();
    expect(code).toBe(0);
    expect(output).toContain("Stopping PostgreSQL");
    const cluster = clusterOf()!;
    expect(cluster).not.toBeNull();
    expect(cluster.isRunning()).toBe(false);
  }, 300_000);

  it("leaves running a cluster it found running (another npm start), and says so", async () => {
    const cluster = clusterOf()!;
    cluster.start();
    try {
      const { output, code } = await startAndInterrupt();
      expect(code).toBe(0);
      expect(output).toContain("PostgreSQL was already running (another npm start?): it keeps running when this one stops.");
      expect(output).not.toContain("Stopping PostgreSQL");
      expect(cluster.isRunning()).toBe(true);
    } finally {
      cluster.stop();
    }
    expect(cluster.isRunning()).toBe(false);
  }, 300_000);
});
