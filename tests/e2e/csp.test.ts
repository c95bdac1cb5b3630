// The built client runs under the server's Content Security Policy (helmet: scripts, styles, fonts
// and connections from the app's own origin; inline styles allowed for charts). A person signs in
// through the form and opens every screen of the invented demo study, a run's results with their
// charts, a comparison with its ROC curve and the printable reports; the browser reports no
// policy violation (no `securitypolicyviolation` event, no console message about the policy).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { STUDY_NAV } from "../../src/app/studyNav";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { startTestServer, uniqueEmail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let demo: DemoSeedResult;
let lead: DemoAccount;

beforeAll(async () => {
  server = await startTestServer();
  // Addresses of its own: the test database is shared by every test file.
  const accounts = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`csp-${a.role}`) }));
  demo = await seedDemo(server.ctx.db, { accounts, env: { NODE_ENV: "test" } });
  lead = accounts.find((a) => a.role === "owner")!;
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

interface Violation {
  directive: string;
  blocked: string;
  source: string;
}

/** Waits until the page has had no request in flight for a moment (the screen has its data). */
async function settled(page: Page, inFlight: Set<unknown>): Promise<void> {
  for (let quiet = 0; quiet < 5; ) {
    await page.waitForTimeout(100);
    quiet = inFlight.size === 0 ? quiet + 1 : 0;
  }
}

describe("Content Security Policy", () => {
  it("signing in and opening every screen of a study raises no policy violation", async () => {
    const page = await browser.context.newPage();
    // Collected in the page from its first script on, before the app's own code runs.
    await page.addInitScript(() => {
      const store: Violation[] = [];
      (window as unknown as { __cspViolations: Violation[] }).__cspViolations = store;
      document.addEventListener("securitypolicyviolation", (e) => {
        store.push({ directive: e.effectiveDirective, blocked: e.blockedURI, source: `${e.sourceFile}:${e.lineNumber}` });
      });
    });
    const consoleComplaints: string[] = [];
    page.on("console", (msg) => {
      if (/Content Security Policy|Refused to (load|apply|execute|connect|frame|evaluate)/i.test(msg.text())) consoleComplaints.push(msg.text());
    });
    const pageErrors: string[] = [];
    page.on("pageerror", (err) => pageErrors.push(err.message));
    const inFlight = new Set<unknown>();
    page.on("request", (r) => inFlight.add(r));
    page.on("requestfinished", (r) => inFlight.delete(r));
    page.on("requestfailed", (r) => inFlight.delete(r));

    const visited: string[] = [];
    const violations = async (): Promise<Violation[]> => page.evaluate(() => (window as unknown as { __cspViolations: Violation[] }).__cspViolations);

    await withScreenshotOnFailure(browser.context, "csp", async () => {
      const response = await page.goto(`${server.url}/sign-in`);
      // The policy the browser enforces is the server's, on the page itself.
      expect(response!.headers()["content-security-policy"]).toMatch(/default-src 'self'/);
      expect(response!.headers()["content-security-policy"]).toMatch(/script-src 'self'/);
      await page.getByLabel("E-mail").fill(lead.email);
      await page.getByLabel("Password", { exact: true }).fill(lead.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      // The lead has one study: the form goes straight to it (src/lib/onlyStudy.ts).
      const studyUrl = `${server.url}/studies/${demo.studyId}`;
      await page.waitForURL(studyUrl);
      await settled(page, inFlight);
      visited.push("overview after signing in");
      await page.goto(`${server.url}/`);
      await page.getByRole("heading", { level: 1, name: "Studies" }).waitFor();
      await settled(page, inFlight);
      visited.push("studies");

      await page.goto(studyUrl);
      await settled(page, inFlight);
      const studyNav = page.getByRole("navigation", { name: "Study" });
      for (const item of STUDY_NAV) {
        await studyNav.getByRole("link", { name: item.label, exact: true }).click();
        await page.waitForURL(item.path ? `${studyUrl}/${item.path}` : studyUrl);
        await settled(page, inFlight);
        visited.push(item.label);
      }
      // Screens with the heaviest drawing: a run's results and charts, a comparison's ROC curve, the printable reports.
      for (const [label, path] of [
        ["run results", `/selectivity?run=${demo.analyses.crisisRunId}`],
        ["run over boundaries", `/selectivity?run=${demo.analyses.sweepRunId}`],
        ["comparison", `/modern-comparison/comparisons/${demo.analyses.comparisonId}`],
        ["run report", `/runs/${demo.analyses.crisisRunId}/report`],
        ["comparison report", `/modern-comparison/comparisons/${demo.analyses.comparisonId}/report`],
      ]) {
        await page.goto(`${studyUrl}${path}`);
        await page.locator("h1").first().waitFor();
        await settled(page, inFlight);
        visited.push(label);
      }
      for (const path of ["/account", "/outbox"]) {
        await page.goto(`${server.url}${path}`);
        await page.locator("h1").first().waitFor();
        await settled(page, inFlight);
        visited.push(path);
      }
      // A charted screen draws something: the run results hold SVG charts.
      await page.goto(`${studyUrl}/selectivity?run=${demo.analyses.crisisRunId}`);
      await page.locator("main svg").first().waitFor();
      expect(await page.locator("main svg").count()).toBeGreaterThan(0);
    });

    expect(visited).toHaveLength(2 + STUDY_NAV.length + 5 + 2);
    expect(await violations()).toEqual([]);
    expect(consoleComplaints).toEqual([]);
    expect(pageErrors).toEqual([]);
  });

  it("the event listener does catch a violation: an inline script is refused", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel("E-mail").waitFor();
    const caught = await page.evaluate(
      () =>
        new Promise<string>((resolve) => {
          document.addEventListener("securitypolicyviolation", (e) => resolve(e.effectiveDirective), { once: true });
          const script = document.createElement("script");
          script.textContent = "window.__ranInline = true";
          document.body.appendChild(script);
        }),
    );
    expect(caught).toMatch(/^script-src/);
    expect(await page.evaluate(() => (window as unknown as { __ranInline?: boolean }).__ranInline)).toBeUndefined();
  });
});
