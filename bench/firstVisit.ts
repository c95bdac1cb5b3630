// First-visit figures, measured in Debian's chromium (playwright-core) against the built client
// (`vite build` runs first) served by the real app on the bench database with the invented demo
// study: the bytes a cold browser moves for the sign-in page and for the first visit of every
// screen (encoded sizes as they crossed the wire, headers included, from the DevTools protocol's
// Network.loadingFinished), and how long the screens take to settle: the Overview after signing in
// through the form, the Boundary screen, the first trait-table page of the study.
// Needs DATABASE_URL (bench/run.ts starts a throwaway cluster).
import { spawnSync } from "node:child_process";
import type { CDPSession, Page } from "playwright-core";
import { launchBrowser } from "../tests/support/browser";
import { seedDemoStudy, signInAs } from "../tests/support/demo";
import { startTestServer } from "../tests/support/server";

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
  requests: Array<{ path: string; bytes: number; ms: number; serverTiming: string }>;
  total(): number;
  /** Resolves once no request has been in flight for `quietMs`. */
  idle(quietMs?: number, timeoutMs?: number): Promise<void>;
}

/** Counts what the page receives over the network, from the DevTools protocol's own figures. */
async function watchTraffic(page: Page): Promise<Traffic> {
  const cdp: CDPSession = await page.context().newCDPSession(page);
  await cdp.send("Network.enable");
  // The browser's cache stays on: a chunk two screens share is fetched once, as for a person.
  const started = new Map<string, { path: string; at: number }>();
  const timing = new Map<string, string>();
  const requests: Traffic["requests"] = [];
  let lastActivity = Date.now();
  cdp.on("Network.requestWillBeSent", (e) => {
    started.set(e.requestId, { path: new URL(e.request.url).pathname + new URL(e.request.url).search, at: e.timestamp });
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
    requests.push({ path: req.path, bytes, ms: (timestamp - req.at) * 1000, serverTiming: timing.get(requestId) ?? "" });
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

/** Waits until the page shows no loading state (LoadingState and the skeletons carry role=status with "Loading"). */
async function settled(page: Page): Promise<void> {
  await page.waitForFunction(
    () => {
      const main = document.querySelector("main");
      if (!main) return false;
      return ![...document.querySelectorAll('[role="status"]')].some((el) => /Loading|Opening/.test(el.textContent ?? ""));
    },
    undefined,
    { timeout: 30_000, polling: 25 },
  );
}

const kb = (bytes: number) => bytes / 1024;

export async function benchFirstVisit(): Promise<FirstVisitFigure[]> {
  // The bench process runs with NODE_ENV=test, which would give React's development build.
  const build = spawnSync("npx", ["vite", "build", "--logLevel", "error"], { stdio: "inherit", env: { ...process.env, NODE_ENV: "production" } });
  if (build.status !== 0) throw new Error("bench: vite build failed");

  const server = await startTestServer({ environment: "development" });
  const figures: FirstVisitFigure[] = [];
  try {
    const demo = await seedDemoStudy(server);
    const analyst = demo.account.analyst;

    // A cold browser opens the sign-in page, then signs in through the form; the demo analyst has
    // one study and lands on its Overview.
    {
      const browser = await launchBrowser();
      try {
        const page = await browser.context.newPage();
        const traffic = await watchTraffic(page);
        await page.goto(`${server.url}/sign-in`);
        await page.getByRole("button", { name: "Sign in" }).waitFor();
        await traffic.idle();
        const bytes = traffic.total();
        if (process.env.BENCH_VERBOSE) for (const r of traffic.requests) console.log(`[bench] sign-in: ${r.path} ${r.bytes} B ${r.ms.toFixed(0)} ms`);
        figures.push({
          name: "first visit: sign-in page, cold cache",
          value: kb(bytes),
          unit: "KB",
          note: `${traffic.requests.length} requests, brotli; target <= ${SIGN_IN_TARGET_KB} KB`,
        });
        await page.getByLabel("E-mail").fill(analyst.email);
        await page.getByLabel("Password", { exact: true }).fill(analyst.password);
        const clicked = performance.now();
        await page.getByRole("button", { name: "Sign in" }).click();
        await page.waitForURL(`${demo.studyUrl}`);
        await settled(page);
        if (process.env.BENCH_VERBOSE) {
          for (const r of traffic.requests) console.log(`[bench] after sign-in: ${r.path} ${r.bytes} B ${r.ms.toFixed(0)} ms ${r.serverTiming}`);
        }
        figures.push({
          name: "Overview shown after signing in",
          value: performance.now() - clicked,
          unit: "ms",
          note: "from the click on Sign in to the Overview without a loading state (demo study); target ~300 ms",
        });
        // The Boundary screen from there, as a person goes on: it opens at the study's main boundary
        // (the demo's crisis run), so the outcomes, turnover and sampling of that boundary are in the figure.
        const toBoundary = performance.now();
        await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
        await page.waitForURL(/\/boundary\?/);
        await page.getByRole("region", { name: "Outcomes across the boundary" }).waitFor({ timeout: 30_000 });
        await settled(page);
        figures.push({
          name: "Boundary screen settled from the Overview",
          value: performance.now() - toBoundary,
          unit: "ms",
          note: "click on Boundary in the study's navigation to no loading state, at the main boundary (demo study); target ~300 ms",
        });
        // The charts are drawn after the numbers (src/components/DeferredChart.tsx): when the last one is in.
        await page.waitForFunction(
          () => document.querySelectorAll('main [data-chart-drawn="false"]').length === 0 && document.querySelectorAll("main svg[role='img']").length > 0,
          undefined,
          { timeout: 30_000, polling: 25 },
        );
        figures.push({
          name: "Boundary screen: every chart drawn, from the Overview",
          value: performance.now() - toBoundary,
          unit: "ms",
          note: "the same click to the last of the screen's charts drawn (they are drawn one by one after the numbers show)",
        });
      } finally {
        await browser.close();
      }
    }

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
    const visits: Array<{ name: string; bytes: number; settleMs: number; slowest: Traffic["requests"][number] | undefined; api: Traffic["requests"] }> = [];
    for (const screen of screens) {
      const browser = await launchBrowser();
      try {
        await signInAs(browser.context, server.url, analyst);
        const page = await browser.context.newPage();
        const traffic = await watchTraffic(page);
        const url = screen.path === "/" ? `${server.url}/` : `${demo.studyUrl}${screen.path}`;
        const started = performance.now();
        await page.goto(url);
        await settled(page);
        const settleMs = performance.now() - started;
        await traffic.idle();
        const api = traffic.requests.filter((r) => r.path.startsWith("/api/"));
        const slowest = api.sort((a, b) => b.ms - a.ms)[0];
        visits.push({ name: screen.name, bytes: traffic.total(), settleMs, slowest, api });
        if (process.env.BENCH_VERBOSE) {
          for (const r of traffic.requests) console.log(`[bench] ${screen.name}: ${r.path} ${r.bytes} B ${r.ms.toFixed(0)} ms ${r.serverTiming}`);
        }
      } finally {
        await browser.close();
      }
    }
    const largest = visits.reduce((a, b) => (b.bytes > a.bytes ? b : a));
    figures.push({
      name: "first visit: largest screen, cold cache",
      value: kb(largest.bytes),
      unit: "KB",
      note: `${largest.name}; target <= ${ROUTE_TARGET_KB} KB for every screen`,
    });
    for (const v of visits) {
      figures.push({
        name: `first visit: ${v.name}`,
        value: kb(v.bytes),
        unit: "KB",
        note: `settled in ${v.settleMs.toFixed(0)} ms${v.slowest ? `; slowest API ${v.slowest.path.replace(/[0-9a-f-]{36}/g, ":id")} ${v.slowest.ms.toFixed(0)} ms${v.slowest.serverTiming ? ` (${v.slowest.serverTiming})` : ""}` : ""}`,
      });
    }
    // The Overview asked for one row; the table's page of rows is the first real grid read.
    const gridPage = visits.find((v) => v.name === "trait table")?.api.find((r) => /\/taxa\?.*pageSize=(?!1\b)/.test(r.path));
    if (gridPage) {
      figures.push({
        name: "trait table: first grid page of the study",
        value: gridPage.ms,
        unit: "ms",
        note: `as the browser saw it${gridPage.serverTiming ? ` (${gridPage.serverTiming})` : ""}; target ~300 ms`,
      });
    }
    const boundary = visits.find((v) => v.name === "boundary");
    if (boundary) figures.push({ name: "Boundary screen settled, cold cache", value: boundary.settleMs, unit: "ms", note: "from navigation in an empty browser to no loading state, at the main boundary (demo study); scripts fetched and started" });
  } finally {
    await server.close();
  }
  return figures;
}
