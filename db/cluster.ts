// Runs a PostgreSQL cluster from Debian's server binaries on loopback. Used by `npm start`
// (a persistent cluster under .data/pg) and by `npm test` (a throwaway cluster in a temp dir).
// PostgreSQL refuses to run as root, so when we are root the server runs as the `postgres`
// system user; otherwise it runs as the current user.
import { execFileSync, spawnSync } from "node:child_process";
import { chmodSync, chownSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import { join } from "node:path";
import { randomBytes } from "node:crypto";

export interface ClusterOptions {
  dataDir: string; // the cluster's data directory
  runDir: string; // socket directory and log file
  port: number;
  /** Throwaway clusters trade durability for speed and use trust authentication. */
  throwaway: boolean;
  password?: string; // required when not throwaway (scram-sha-256)
}

const isRoot = typeof process.getuid === "function" && process.getuid() === 0;

function newestBinDir(): string | null {
  const root = "/usr/lib/postgresql";
  if (!existsSync(root)) return null;
  const versions = readdirSync(root)
    .filter((v) => existsSync(join(root, v, "bin", "pg_ctl")))
    .sort((a, b) => Number(a) - Number(b));
  return versions.length ? join(root, versions[versions.length - 1], "bin") : null;
}

/** Finds the server binaries, installing Debian's postgresql package when missing and root. */
export function ensurePostgresBinaries(log: (msg: string) => void = console.log): string {
  const found = newestBinDir();
  if (found) return found;
  if (!isRoot) {
    throw new Error(
      "PostgreSQL server binaries were not found under /usr/lib/postgresql. Install them with " +
        "`sudo apt-get install -y postgresql` (Debian/Ubuntu) and run the command again.",
    );
  }
  log("PostgreSQL is not installed; installing Debian's postgresql package (apt-get)...");
  execFileSync("apt-get", ["update", "-qq"], { stdio: "inherit" });
  execFileSync("apt-get", ["install", "-y", "-qq", "postgresql"], {
    stdio: "inherit",
    env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" },
  });
  const installed = newestBinDir();
  if (!installed) throw new Error("apt-get finished but no PostgreSQL server binaries were found.");
  return installed;
}

function ownForServer(path: string): void {
  if (!isRoot) return;
  const uid = Number(execFileSync("id", ["-u", "postgres"]).toString().trim());
  const gid = Number(execFileSync("id", ["-g", "postgres"]).toString().trim());
  chownSync(path, uid, gid);
}

function runAsServerUser(bin: string, args: string[], cwd: string): { status: number | null; output: string } {
  const [cmd, cmdArgs] = isRoot ? ["runuser", ["-u", "postgres", "--", bin, ...args]] : [bin, args];
  const result = spawnSync(cmd, cmdArgs as string[], { cwd, encoding: "utf8" });
  return { status: result.status, output: `${result.stdout ?? ""}${result.stderr ?? ""}` };
}

/** Lets the postgres user enter every parent folder of `dir` (initdb and pg_ctl chdir there). */
function makeTraversable(dir: string): void {
  if (!isRoot) return;
  let current = dir;
  while (current !== "/" && current !== ".") {
    try {
      const mode = Number.parseInt(execFileSync("stat", ["-c", "%a", current]).toString().trim(), 8);
      if ((mode & 0o001) === 0) chmodSync(current, mode | 0o001);
    } catch {
      // A folder we cannot stat is left alone; initdb will then say what is wrong.
    }
    current = join(current, "..");
    if (current === join(current, "..")) break;
  }
}

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const address = srv.address();
      srv.close(() => resolve(typeof address === "object" && address ? address.port : 0));
    });
  });
}

export class PostgresCluster {
  readonly bin: string;
  constructor(readonly opts: ClusterOptions, log: (msg: string) => void = console.log) {
    this.bin = ensurePostgresBinaries(log);
  }

  private get logFile(): string {
    return join(this.opts.runDir, "postgres.log");
  }

  /** Creates the data directory with initdb unless it already holds a cluster. */
  init(): boolean {
    const { dataDir, runDir, throwaway } = this.opts;
    if (existsSync(join(dataDir, "PG_VERSION"))) return false;
    mkdirSync(dataDir, { recursive: true, mode: 0o700 });
    mkdirSync(runDir, { recursive: true });
    chmodSync(dataDir, 0o700);
    ownForServer(dataDir);
    ownForServer(runDir);
    makeTraversable(runDir);
    makeTraversable(dataDir);
    const args = ["-D", dataDir, "-U", "postgres", "--encoding=UTF8", "--locale=C.UTF-8"];
    let pwFile: string | null = null;
    if (throwaway) {
      args.push("--auth=trust");
    } else {
      if (!this.opts.password) throw new Error("A persistent cluster needs a password.");
      pwFile = join(runDir, `pw-${randomBytes(6).toString("hex")}`);
      writeFileSync(pwFile, this.opts.password, { mode: 0o600 });
      ownForServer(pwFile);
      args.push("--auth-local=scram-sha-256", "--auth-host=scram-sha-256", `--pwfile=${pwFile}`);
    }
    const result = runAsServerUser(join(this.bin, "initdb"), args, runDir);
    if (pwFile) rmSync(pwFile, { force: true });
    if (result.status !== 0) throw new Error(`initdb failed:\n${result.output}`);
    return true;
  }

  isRunning(): boolean {
    const result = runAsServerUser(join(this.bin, "pg_ctl"), ["status", "-D", this.opts.dataDir], this.opts.runDir);
    return result.status === 0;
  }

  start(): void {
    const { dataDir, runDir, port, throwaway } = this.opts;
    mkdirSync(runDir, { recursive: true });
    ownForServer(runDir);
    if (this.isRunning()) {
      const pid = readFileSync(join(dataDir, "postmaster.pid"), "utf8").split("\n");
      const runningPort = Number(pid[3]);
      if (runningPort === port) return;
      throw new Error(`PostgreSQL for ${dataDir} already runs on port ${runningPort}, not ${port}. Stop it or set PGPORT=${runningPort}.`);
    }
    // pg_ctl status says "not running", so a postmaster.pid left by a crash is stale; PostgreSQL
    // itself also checks it, but removing it avoids a failed start when the PID was reused.
    rmSync(join(dataDir, "postmaster.pid"), { force: true });
    const serverOptions = [
      "-c listen_addresses=127.0.0.1",
      `-p ${port}`,
      `-k ${runDir}`,
      ...(throwaway ? ["-c fsync=off", "-c synchronous_commit=off", "-c full_page_writes=off"] : []),
    ].join(" ");
    const result = runAsServerUser(
      join(this.bin, "pg_ctl"),
      ["start", "-w", "-t", "60", "-D", dataDir, "-l", this.logFile, "-o", serverOptions],
      runDir,
    );
    if (result.status !== 0) {
      const log = existsSync(this.logFile) ? readFileSync(this.logFile, "utf8").split("\n").slice(-20).join("\n") : "";
      throw new Error(`PostgreSQL did not start on 127.0.0.1:${port}.\n${result.output}\n${log}`);
    }
  }

  stop(): void {
    runAsServerUser(join(this.bin, "pg_ctl"), ["stop", "-D", this.opts.dataDir, "-m", "fast", "-w"], this.opts.runDir);
  }

  /** Creates a database unless it exists (connecting through the socket as the superuser). */
  createDatabase(name: string): void {
    const psql = join(this.bin, "psql");
    const env = { PGPASSWORD: this.opts.password ?? "" };
    const base = ["-h", "127.0.0.1", "-p", String(this.opts.port), "-U", "postgres", "-d", "postgres", "-tAc"];
    const exists = spawnSync(psql, [...base, `SELECT 1 FROM pg_database WHERE datname='${name}'`], {
      encoding: "utf8",
      env: { ...process.env, ...env },
    });
    if (exists.status !== 0) throw new Error(`Could not query PostgreSQL: ${exists.stderr}`);
    if (exists.stdout.trim() === "1") return;
    const created = spawnSync(psql, [...base, `CREATE DATABASE "${name}"`], { encoding: "utf8", env: { ...process.env, ...env } });
    if (created.status !== 0) throw new Error(`Could not create database ${name}: ${created.stderr}`);
  }

  dropDatabase(name: string): void {
    const psql = join(this.bin, "psql");
    const result = spawnSync(
      psql,
      ["-h", "127.0.0.1", "-p", String(this.opts.port), "-U", "postgres", "-d", "postgres", "-tAc", `DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`],
      { encoding: "utf8", env: { ...process.env, PGPASSWORD: this.opts.password ?? "" } },
    );
    if (result.status !== 0) throw new Error(`Could not drop database ${name}: ${result.stderr}`);
  }

  url(database: string): string {
    const auth = this.opts.password ? `postgres:${encodeURIComponent(this.opts.password)}` : "postgres";
    return `postgres://${auth}@127.0.0.1:${this.opts.port}/${database}`;
  }
}
