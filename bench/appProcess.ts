// The app as `npm start` runs it: the server in a process of its own, serving the built client, on a
// free loopback port. A bench that drives a browser measures against this rather than an app inside
// its own process, where the browser driver's protocol traffic and polling would share the server's
// one thread and delay its answers (by tens of milliseconds on 2 cores).
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { freePort } from "../db/cluster";

export interface AppProcess {
  url: string;
  stop(): Promise<void>;
}

/** Starts `server/index.ts` (as `npm start` does once the database is ready) on DATABASE_URL; resolves when it serves. */
export async function startAppProcess(databaseUrl: string): Promise<AppProcess> {
  const port = await freePort();
  const uploads = mkdtempSync(join(tmpdir(), "stratasieve-bench-uploads-"));
  const profile = process.env.BENCH_CPU_PROF ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_CPU_PROF}`] : [];
  const child = spawn(process.execPath, [...profile, "--import", "tsx", "server/index.ts"], {
    env: {
      ...process.env,
      NODE_ENV: "development",
      DATABASE_URL: databaseUrl,
      HOST: "127.0.0.1",
      PORT: String(port),
      APP_URL: `http://127.0.0.1:${port}`,
      SESSION_SECRET: randomBytes(32).toString("hex"),
      UPLOAD_DIR: uploads,
    },
    stdio: ["ignore", "pipe", "inherit"],
  });
  await new Promise<void>((resolve, reject) => {
    let said = "";
    child.stdout.on("data", (chunk: Buffer) => {
      said += chunk.toString();
      if (said.includes("is serving on")) resolve();
    });
    child.once("exit", (code) => reject(new Error(`bench: the app exited (${code}) before serving: ${said}`)));
  });
  child.stdout.resume();
  return {
    url: `http://127.0.0.1:${port}`,
    stop: async () => {
      if (child.exitCode === null) {
        const exited = new Promise((resolve) => child.once("exit", resolve));
        child.kill("SIGTERM");
        await exited;
      }
      rmSync(uploads, { recursive: true, force: true });
    },
  };
}
