// A real app process (server/index.ts, loaded through tsx) on a free loopback port, for tests that must stop
// a process the hard way or read what it prints. It shares the test database (DATABASE_URL).
import { spawn, type ChildProcess } from "node:child_process";
import { freePort } from "../../db/cluster";
import { PASSWORD, uniqueEmail } from "./server";

export interface AppProcess {
  url: string;
  child: ChildProcess;
  /** Everything the process printed on stdout and stderr, in order. */
  output: string[];
  /** Stops it with SIGKILL (no shutdown code runs) and waits for the exit. */
  kill(): Promise<void>;
  /** Asks it to stop (SIGTERM) and waits for the exit. */
  stop(): Promise<void>;
}

const exited = (child: ChildProcess) =>
  child.exitCode !== null || child.signalCode !== null ? Promise.resolve() : new Promise<void>((resolve) => child.once("exit", () => resolve()));

export async function startAppProcess(env: Record<string, string> = {}): Promise<AppProcess> {
  const port = await freePort();
  const output: string[] = [];
  // Node itself runs the server with tsx as a loader: the tsx command would start the server in a
  // child process of its own, which a SIGKILL to the command leaves running.
  const child = spawn(process.execPath, ["--import", "tsx", "server/index.ts"], {
    // Every test app counts its sign-ups and failed sign-ins against the same address (127.0.0.1)
    // in the shared store: the limits per address are as high as createTestApp's.
    env: {
      ...process.env,
      PORT: String(port),
      HOST: "127.0.0.1",
      APP_URL: `http://127.0.0.1:${port}`,
      SIGNUP_LIMIT_PER_IP: "100000",
      LOGIN_LIMIT_PER_IP: "100000",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout!.on("data", (d) => output.push(String(d)));
  child.stderr!.on("data", (d) => output.push(String(d)));
  const url = `http://127.0.0.1:${port}`;
  const handle: AppProcess = {
    url,
    child,
    output,
    async kill() {
      child.kill("SIGKILL");
      await exited(child);
    },
    async stop() {
      child.kill("SIGTERM");
      await exited(child);
    },
  };
  for (let i = 0; i < 300; i++) {
    const ok = await fetch(`${url}/api/health`).then((r) => r.ok, () => false);
    if (ok) return handle;
    if (child.exitCode !== null) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  child.kill("SIGKILL");
  throw new Error(`The app process did not start:\n${output.join("")}`);
}

export interface ApiAnswer {
  status: number;
  body: any; // JSON of many shapes
  headers: Headers;
}

/** One JSON request to a process, with the session cookie. */
export async function call(base: string, method: string, path: string, cookie: string, body?: unknown): Promise<ApiAnswer> {
  const res = await fetch(`${base}${path}`, {
    method,
    headers: { cookie, ...(body === undefined ? {} : { "content-type": "application/json" }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? JSON.parse(text) : null, headers: res.headers };
}

/** Signs a new account up through the process; returns its session cookie ("ss_session=...") and e-mail. */
export async function signUpThrough(base: string, label = "person"): Promise<{ cookie: string; email: string; id: string }> {
  const email = uniqueEmail(label);
  const res = await fetch(`${base}/api/auth/signup`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password: PASSWORD, name: `Test ${label}` }),
  });
  if (res.status !== 201) throw new Error(`signup failed: ${res.status} ${await res.text()}`);
  const cookie = res.headers.get("set-cookie")!.split(";")[0];
  return { cookie, email, id: ((await res.json()) as { id: string }).id };
}

/** Polls `read` until `done` holds for its answer; throws with the last answer when it never does. */
export async function pollUntil<T>(read: () => Promise<T>, done: (value: T) => boolean, opts: { everyMs?: number; tries?: number; what?: string } = {}): Promise<T> {
  let last: T | undefined;
  for (let i = 0; i < (opts.tries ?? 300); i++) {
    last = await read();
    if (done(last)) return last;
    await new Promise((r) => setTimeout(r, opts.everyMs ?? 100));
  }
  throw new Error(`${opts.what ?? "condition"} never held; last answer: ${JSON.stringify(last)?.slice(0, 2000)}`);
}
