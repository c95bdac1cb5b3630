// The web process keeps no state of its own: two app processes on different ports, sharing one
// database, serve the same signed-in person, and a job queued through one is worked by the other.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawn, type ChildProcess } from "node:child_process";
import pg from "pg";
import { freePort } from "../../db/cluster";
import { PASSWORD, uniqueEmail } from "../support/server";

interface AppProcess {
  url: string;
  child: ChildProcess;
  output: string[];
}

async function startProcess(env: Record<string, string>): Promise<AppProcess> {
  const port = await freePort();
  const output: string[] = [];
  const child = spawn(process.execPath, ["node_modules/tsx/dist/cli.mjs", "server/index.ts"], {
    // Every test app counts its sign-ups against the same address (127.0.0.1) in the shared store.
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", APP_URL: `http://127.0.0.1:${port}`, SIGNUP_LIMIT_PER_IP: "100000", ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => output.push(String(d)));
  child.stderr!.on("data", (d) => output.push(String(d)));
  const url = `http://127.0.0.1:${port}`;
  for (let i = 0; i < 200; i++) {
    const ok = await fetch(`${url}/api/health`).then((r) => r.ok, () => false);
    if (ok) return { url, child, output };
    if (child.exitCode !== null) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`The app process did not start:\n${output.join("")}`);
}

let web: AppProcess; // serves requests but takes no jobs
let worker: AppProcess; // serves requests and takes jobs
const db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });

beforeAll(async () => {
  [web, worker] = await Promise.all([startProcess({ JOB_WORKERS: "0" }), startProcess({ JOB_WORKERS: "1" })]);
}, 60_000);

afterAll(async () => {
  for (const p of [web, worker]) p?.child.kill("SIGTERM");
  await db.end();
});

async function call(base: string, method: string, path: string, cookie: string, body?: unknown) {
  const res = await fetch(`${base}${path}`, {
    method,
    headers: { cookie, ...(body ? { "content-type": "application/json" } : {}) },
    body: body ? JSON.stringify(body) : undefined,
  });
  return { status: res.status, body: res.status === 204 ? null : await res.json(), headers: res.headers };
}

describe("two app processes on one database", () => {
  it("a session from one process is valid on the other, and sign-out on one ends it on both", async () => {
    const res = await fetch(`${web.url}/api/auth/signup`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ email: uniqueEmail("two"), password: PASSWORD, name: "Two processes" }),
    });
    expect(res.status).toBe(201);
    const cookie = res.headers.get("set-cookie")!.split(";")[0];
    expect((await call(worker.url, "GET", "/api/auth/me", cookie)).status).toBe(200);
    expect((await call(worker.url, "POST", "/api/auth/logout", cookie)).status).toBe(204);
    expect((await call(web.url, "GET", "/api/auth/me", cookie)).status).toBe(401);
  });

  it("a run queued through the web-only process waits for a working process, which then computes it", async () => {
    const res = await fetch(`${web.url}/api/auth/signup`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ email: uniqueEmail("queue"), password: PASSWORD, name: "Queue" }),
    });
    const cookie = res.headers.get("set-cookie")!.split(";")[0];
    const study = (await call(web.url, "POST", "/api/studies", cookie, { name: "Invented two-process study", suggestedCodebook: true })).body;
    const traits = (await call(web.url, "GET", `/api/studies/${study.id}/traits`, cookie)).body.traits as Array<{ id: string; key: string }>;
    const environment = traits.find((t) => t.key === "environment")!;
    // 40 invented taxa across a boundary at 93.9 Ma: 20 marine (12 victims), 20 non-marine (6 victims).
    const rows = Array.from({ length: 40 }, (_, i) => {
      const marine = i < 20;
      const victim = marine ? i < 12 : i < 26;
      return [study.id, `Inventa${i}`, "Inventidae", 99, victim ? 95 : 90, JSON.stringify({ [environment.id]: marine ? "marine" : "nonmarine" })];
    });
    for (const r of rows) {
      await db.query("INSERT INTO taxa (study_id, name, higher_taxon, fad_ma, lad_ma, trait_values) VALUES ($1, $2, $3, $4, $5, $6)", r);
    }
    // With no process taking jobs, the run stays queued...
    worker.child.kill("SIGTERM");
    await new Promise((r) => worker.child.once("exit", r));
    const created = await call(web.url, "POST", `/api/studies/${study.id}/runs`, cookie, {
      name: "Queued through the web-only process",
      boundaries: [{ boundaryMa: 93.9 }],
      traits: [{ traitId: environment.id }],
    });
    expect(created.status).toBe(202);
    await new Promise((r) => setTimeout(r, 2500));
    let run = (await call(web.url, "GET", `/api/studies/${study.id}/runs/${created.body.id}`, cookie)).body;
    expect(run.status).toBe("queued");
    // ...until another process starts and takes it from the shared queue.
    worker = await startProcess({ JOB_WORKERS: "1" });
    for (let i = 0; i < 150 && (run.status === "queued" || run.status === "running"); i++) {
      await new Promise((r) => setTimeout(r, 200));
      run = (await call(web.url, "GET", `/api/studies/${study.id}/runs/${run.id}`, cookie)).body;
    }
    expect(run.status, run.error ?? "").toBe("succeeded");
    const table = run.results.boundaries[0].result.traits[0].table;
    // worked by hand: marine 12 victims / 8 survivors, non-marine 6 victims / 14 survivors
    expect(table.map((r: { state: string; victims: number; survivors: number }) => [r.state, r.victims, r.survivors])).toEqual([
      ["marine", 12, 8],
      ["nonmarine", 6, 14],
    ]);
  });
});
