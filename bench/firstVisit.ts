// First-visit figures, measured in Debian's chromium (playwright-core) against the built client
// (`vite build` runs first) served by the app in a process of its own, as `npm start` runs it
// (bench/appProcess.ts), on the bench database with the invented demo study: the bytes a cold browser moves for the sign-in page and for the first visit of every
// screen (encoded sizes as they crossed the wire, headers included, from the DevTools protocol's
// Network.loadingFinished), and how long the screens take to settle: the Overview after signing in
// through the form, the Boundary screen, the first trait-table page of the study.
// BENCH_VERBOSE=1 prints every request as a waterfall (start after the click, duration, Server-Timing).
// Needs DATABASE_URL (bench/run.ts starts a throwaway cluster).
import { spawnSync } from "node:child_process";
import type { CDPSession, Page } from "playwright-core";
import { DEMO_ACCOUNTS, seedDemo } from "../scripts/seed/demo/seed";
import { connectDatabase } from "../server/db";
import { launchBrowser } from "../tests/support/browser";
import { signInAs } from "../tests/support/demo";
import { startAppProcess } from "./appProcess";
import { quantile } from "./quantile";

export interface FirstVisitFigure {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const SIGN_IN_TARGET_KB = 200;
const ROUTE_TARGET_KB = 500;

interface Traffic {
  /** Bytes received per request, by URL path. */
  /** `startedAt`: Date.now() when the DevTools protocol reported the request (a few ms late at most). */
  requests: Array<{ path: string; bytes: number; ms: number; serverTiming: string; startedAt: number }>;
  total(): number;
  /** Resolves once no request has been in flight for `quietMs`. */
  idle(quietMs?: number, timeoutMs?: number): Promise<void>;
}

/** Counts what the page receives over the network, from the DevTools protocol's own figures. */
async function watchTraffic(page: Page): Promise<Traffic> {
  const cdp: CDPSession = await page.context().newCDPSession(page);
  await cdp.send("Network.enable");
  // The browser's cache stays on: a chunk two screens share is fetched once, as for a person.
  const started = new Map<string, { path: string; at: number; wallAt: number }>();
  const timing = new Map<string, string>();
  const requests: Traffic["requests"] = [];
  let lastActivity = Date.now();
  cdp.on("Network.requestWillBeSent", (e) => {
    started.set(e.requestId, { path: new URL(e.request.url).pathname + new URL(e.request.url).search, at: e.timestamp, wallAt: Date.now() });
    lastActivity = Date.now();
  });
  cdp.on("Network.responseReceived", (e) => {
    const headers = e.response.headers as Record<string, string>;
    const value = Object.entries(headers).find(([k]) => k.toLowerCase() === "server-timing")?.[1];
    if (value) timing.set(e.requestId, value);
  });
  const finish = (requestId: string, timestamp: number, bytes: number) => {
    const req = started.get(requestId);
    if (!req) return;
    started.delete(requestId);
    requests.push({ path: req.path, bytes, ms: (timestamp - req.at) * 1000, serverTiming: timing.get(requestId) ?? "", startedAt: req.wallAt });
    lastActivity = Date.now();
  };
  cdp.on("Network.loadingFinished", (e) => finish(e.requestId, e.timestamp, e.encodedDataLength));
  cdp.on("Network.loadingFailed", (e) => finish(e.requestId, e.timestamp, 0));
  return {
    requests,
    total: () => requests.reduce((sum, r) => sum + r.bytes, 0),
    async idle(quietMs = 800, timeoutMs = 30_000) {
      const deadline = Date.now() + timeoutMs;
      while (Date.now() < deadline) {
        if (started.size === 0 && Date.now() - lastActivity >= quietMs) return;
        await new Promise((r) => setTimeout(r, 50));
      }
      throw new Error(`bench: the page never went quiet; still waiting for ${[...started.values()].map((s) => s.path).join(", ")}`);
    },
  };
}

/**
 * Times in the page itself, so that the automation's own checks before a click (is the button
 * visible, stable for two frames, not covered) are not counted: the click event's timestamp, and
 * the first animation frame at which the screen is shown (below).
 */
const CLICK_RECORDER = () => window.addEventListener("click", (event) => ((window as unknown as { benchClickAt: number }).benchClickAt = event.timeStamp), true);

/**
 * Waits for the first animation frame at which the page is at `path`, shows `text` (the screen's own
 * words: the address changes before the screen is drawn) and no loading state (LoadingState and the
 * skeletons carry role=status with "Loading"); answers the page's clock at that frame.
 */
async function screenShownAt(page: Page, { path = /./, text }: { path?: RegExp; text?: string } = {}): Promise<number> {
  const handle = await page.waitForFunction(
    ({ path, text }) => {
      const main = document.querySelector("main");
      if (!main || !new RegExp(path).test(location.pathname + location.search)) return false;
      if (text && !main.textContent?.includes(text)) return false;
      if ([...document.querySelectorAll('[role="status"]')].some((el) => /Loading|Opening/.test(el.textContent ?? ""))) return false;
      return performance.now();
    },
    { path: path.source, text },
    { timeout: 30_000, polling: "raf" },
  );
  return (await handle.jsonValue()) as number;
}

/** Milliseconds from the last click (CLICK_RECORDER) to the screen shown, as screenShownAt. */
async function msFromClickToShown(page: Page, path: RegExp, text: string): Promise<number> {
  const shownAt = await screenShownAt(page, { path, text });
  return shownAt - (await page.evaluate(() => (window as unknown as { benchClickAt: number }).benchClickAt));
}

const kb = (bytes: number) => bytes / 1024;

/** BENCH_VERBOSE=1: every request as a waterfall, its start in ms after `origin` (a Date.now(), the click). */
function printWaterfall(label: string, requests: Traffic["requests"], origin = Math.min(...requests.map((r) => r.startedAt))): void {
  if (!process.env.BENCH_VERBOSE) return;
  for (const r of [...requests].sort((a, b) => a.startedAt - b.startedAt)) {
    const start = r.startedAt - origin;
    console.log(`[bench] ${label}: +${start.toFixed(0)} ms ${r.path} ${r.bytes} B, ${r.ms.toFixed(0)} ms ${r.serverTiming}`);
  }
}

/**
 * Sign-in visits measured: the first after the server started, then warm ones (their medians are
 * reported), which go on to the Boundary screen in turn as soon as the Overview shows or once it has
 * gone quiet (a person reads the Overview first, while it fetches what the Boundary screen needs).
 */
const SIGN_IN_VISITS = 9;

interface SignInVisit {
  /** Cold sign-in page: bytes and requests. */
  signInBytes: number;
  signInRequests: number;
  overviewMs: number;
  /** Whether the Boundary was clicked once the Overview had gone quiet (else as soon as it showed). */
  afterReading: boolean;
  boundaryMs: number;
  chartsMs: number;
}

/**
 * A cold browser opens the sign-in page, then signs in through the form; the demo analyst has one
 * study and lands on its Overview. From there, the Boundary screen, as a person goes on: it opens at
 * the study's main boundary (the demo's crisis run), so that boundary's outcomes, turnover and
 * sampling are in the figure.
 */
async function signInAndOpenBoundary(
  url: string,
  studyUrl: string,
  analyst: { email: string; password: string },
  afterReading: boolean,
  verbose: boolean,
): Promise<SignInVisit> {
  const browser = await launchBrowser();
  try {
    const page = await browser.context.newPage();
    await page.addInitScript(CLICK_RECORDER);
    const traffic = await watchTraffic(page);
    await page.goto(`${url}/sign-in`);
    await page.getByRole("button", { name: "Sign in" }).waitFor();
    await traffic.idle();
    const signInBytes = traffic.total();
    const signInRequests = traffic.requests.length;
    if (verbose) printWaterfall("sign-in page", traffic.requests);
    await page.getByLabel("E-mail").fill(analyst.email);
    await page.getByLabel("Password", { exact: true }).fill(analyst.password);
    await traffic.idle(300);
    const beforeClick = traffic.requests.length;
    const clickedAt = Date.now();
    await page.getByRole("button", { name: "Sign in" }).click();
    const overviewMs = await msFromClickToShown(page, new RegExp(`^${new URL(studyUrl).pathname}$`), "Study overview");
    if (verbose) printWaterfall("after sign-in", traffic.requests.slice(beforeClick), clickedAt);

    if (afterReading) await traffic.idle(300);
    const beforeBoundary = traffic.requests.length;
    const toBoundaryAt = Date.now();
    await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
    const boundaryMs = await msFromClickToShown(page, /\/boundary\?/, "Outcomes across the boundary");
    if (verbose) printWaterfall("boundary from the Overview", traffic.requests.slice(beforeBoundary), toBoundaryAt);
    // The charts are drawn after the numbers (src/components/DeferredChart.tsx): when the last one is in.
    const chartsDrawn = await page.waitForFunction(
      () =>
        document.querySelectorAll('main [data-chart-drawn="false"]').length === 0 &&
        document.querySelectorAll("main svg[role='img']").length > 0 &&
        performance.now() - (window as unknown as { benchClickAt: number }).benchClickAt,
      undefined,
      { timeout: 30_000, polling: "raf" },
    );
    const chartsMs = (await chartsDrawn.jsonValue()) as number;
    return { signInBytes, signInRequests, overviewMs, afterReading, boundaryMs, chartsMs };
  } finally {
    await browser.close();
  }
}

const ms = (values: number[]) => values.map((v) => v.toFixed(0)).join(", ");

export async function benchFirstVisit(): Promise<FirstVisitFigure[]> {
  // The bench process runs with NODE_ENV=test, which would give React's development build.
  const build = spawnSync("npx", ["vite", "build", "--logLevel", "error"], { stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
  if (build.status !== 0) throw new Error("bench: vite build failed");

  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error("bench: DATABASE_URL is not set");
  const database = connectDatabase(databaseUrl);
  const accounts = DEMO_ACCOUNTS.map((a) => ({ ...a, email: `bench-${a.role}@example.test` }));
  const demo = await seedDemo(database.db, { accounts, env: { NODE_ENV: "test" } }).finally(() => database.close());
  const analyst = accounts.find((a) => a.role === "analyst");
  if (!analyst) throw new Error("bench: the demo has no analyst");

  const app = await startAppProcess(databaseUrl);
  const studyUrl = `${app.url}/studies/${demo.studyId}`;
  const figures: FirstVisitFigure[] = [];
  try {
    const visits: SignInVisit[] = [];
    for (let i = 0; i < SIGN_IN_VISITS; i++) visits.push(await signInAndOpenBoundary(app.url, studyUrl, analyst, i % 2 === 0, Boolean(process.env.BENCH_VERBOSE) && i < 3));
    const [first, ...warm] = visits;
    const middle = (values: number[]) => quantile([...values].sort((a, b) => a - b), 0.5);
    const read = warm.filter((v) => v.afterReading);
    const atOnce = warm.filter((v) => !v.afterReading);
    figures.push({
      name: "first visit: sign-in page, cold cache",
      value: kb(first.signInBytes),
      unit: "KB",
      note: `${first.signInRequests} requests, brotli; target <= ${SIGN_IN_TARGET_KB} KB`,
    });
    figures.push({
      name: "Overview shown after signing in",
      value: middle(warm.map((v) => v.overviewMs)),
      unit: "ms",
      note: `median of ${warm.length} sign-ins (${ms(warm.map((v) => v.overviewMs))}), each in a cold browser; in the page, from the click event on Sign in to the first frame of the Overview without a loading state (demo study); target ~300 ms`,
    });
    figures.push({
      name: "Overview shown after signing in, first after the server started",
      value: first.overviewMs,
      unit: "ms",
      note: "the same, for the first person after the server started: its code and connections are still cold",
    });
    figures.push({
      name: "Boundary screen settled from the Overview",
      value: middle(read.map((v) => v.boundaryMs)),
      unit: "ms",
      note: `median of ${read.length} (${ms(read.map((v) => v.boundaryMs))}); in the page, from the click event on Boundary in the study's navigation, once the Overview has gone quiet, to the first frame without a loading state at the main boundary (demo study); target ~300 ms`,
    });
    figures.push({
      name: "Boundary screen settled from the Overview, clicked at once",
      value: middle(atOnce.map((v) => v.boundaryMs)),
      unit: "ms",
      note: `median of ${atOnce.length} (${ms(atOnce.map((v) => v.boundaryMs))}); the same, clicked as soon as the Overview shows; first after the server started: ${first.boundaryMs.toFixed(0)} ms`,
    });
    figures.push({
      name: "Boundary screen: every chart drawn, from the Overview",
      value: middle(read.map((v) => v.chartsMs)),
      unit: "ms",
      note: "median; the same click (once the Overview has gone quiet) to the last of the screen's charts drawn (they are drawn one by one after the numbers show)",
    });

    // Every screen's first visit in a cold browser (signed in through the API beforehand).
    const screens: Array<{ name: string; path: string }> = [
      { name: "studies", path: "/" },
      { name: "overview", path: "" },
      { name: "trait table", path: "/table" },
      { name: "codebook", path: "/codebook" },
      { name: "imports", path: "/imports" },
      { name: "boundary", path: "/boundary" },
      { name: "selectivity (crisis run)", path: `/selectivity?run=${demo.analyses.crisisRunId}` },
      { name: "runs", path: "/runs" },
      { name: "modern comparison", path: "/modern-comparison" },
      { name: "comparison results", path: `/modern-comparison/comparisons/${demo.analyses.comparisonId}` },
      { name: "threads", path: "/threads" },
      { name: "members", path: "/members" },
    ];
    const screenVisits: Array<{ name: string; bytes: number; settleMs: number; slowest: Traffic["requests"][number] | undefined; api: Traffic["requests"] }> = [];
    for (const screen of screens) {
      const browser = await launchBrowser();
      try {
        await signInAs(browser.context, app.url, analyst);
        const page = await browser.context.newPage();
        const traffic = await watchTraffic(page);
        const url = screen.path === "/" ? `${app.url}/` : `${studyUrl}${screen.path}`;
        const started = performance.now();
        await page.goto(url);
        await screenShownAt(page);
        const settleMs = performance.now() - started;
        await traffic.idle();
        const api = traffic.requests.filter((r) => r.path.startsWith("/api/"));
        const slowest = [...api].sort((a, b) => b.ms - a.ms)[0];
        screenVisits.push({ name: screen.name, bytes: traffic.total(), settleMs, slowest, api });
        printWaterfall(screen.name, traffic.requests);
      } finally {
        await browser.close();
      }
    }
    const largest = screenVisits.reduce((a, b) => (b.bytes > a.bytes ? b : a));
    figures.push({
      name: "first visit: largest screen, cold cache",
      value: kb(largest.bytes),
      unit: "KB",
      note: `${largest.name}; target <= ${ROUTE_TARGET_KB} KB for every screen`,
    });
    for (const v of screenVisits) {
      figures.push({
        name: `first visit: ${v.name}`,
        value: kb(v.bytes),
        unit: "KB",
        note: `settled in ${v.settleMs.toFixed(0)} ms${v.slowest ? `; slowest API ${v.slowest.path.replace(/[0-9a-f-]{36}/g, ":id")} ${v.slowest.ms.toFixed(0)} ms${v.slowest.serverTiming ? ` (${v.slowest.serverTiming})` : ""}` : ""}`,
      });
    }
    // The Overview asked for one row; the table's page of rows is the first real grid read.
    const gridPage = screenVisits.find((v) => v.name === "trait table")?.api.find((r) => /\/taxa\?.*pageSize=(?!1\b)/.test(r.path));
    if (gridPage) {
      figures.push({
        name: "trait table: first grid page of the study",
        value: gridPage.ms,
        unit: "ms",
        note: `as the browser saw it${gridPage.serverTiming ? ` (${gridPage.serverTiming})` : ""}; target ~300 ms`,
      });
    }
    const boundary = screenVisits.find((v) => v.name === "boundary");
    if (boundary) figures.push({ name: "Boundary screen settled, cold cache", value: boundary.settleMs, unit: "ms", note: "from navigation in an empty browser to no loading state, at the main boundary (demo study); scripts fetched and started" });
  } finally {
    await app.stop();
  }
  return figures;
}
