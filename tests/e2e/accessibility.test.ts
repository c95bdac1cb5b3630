// Every screen of Stratasieve checked with axe-core's automated rules in the real browser: signed
// out (sign-in, sign-up, password reset, an invitation), a new account (no studies yet, new study,
// account, an invitation while signed in), and the study lead of the invented demo study (the
// studies list, the outbox, and every screen inside the study, with a preview, results, a
// comparison, a thread and the notification menu open). No violation of "serious" or "critical"
// impact is allowed; the failure message lists each one with its rule, where it is, and axe's help.
// Then the keyboard alone: the trait table edited without a mouse, and forms completed with Tab,
// typing and Enter, the focus always drawn.
import { createRequire } from "node:module";
import { readFileSync } from "node:fs";
import { request as playwrightRequest, type Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { seedDemoStudy, signInAs, type DemoFixture } from "../support/demo";
import { linkIn, PASSWORD, startTestServer, uniqueEmail, waitForMail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");

let server: Server;
let demo: DemoFixture;
/** Signed out at first; later a new account with no study. */
let newcomer: Browser;
/** The demo study's lead. */
let lead: Browser;

beforeAll(async () => {
  server = await startTestServer();
  demo = await seedDemoStudy(server);
  newcomer = await launchBrowser();
  lead = await launchBrowser();
  await signInAs(lead.context, server.url, demo.account.owner);
});

// Each test opens its own pages; closed afterwards, so a failure's screenshots show only its own.
afterEach(async () => {
  for (const browser of [newcomer, lead]) for (const page of browser.context.pages().slice(1)) await page.close();
});

afterAll(async () => {
  await lead?.close();
  await newcomer?.close();
  await server?.close();
});

interface Finding {
  rule: string;
  impact: string | null;
  help: string;
  helpUrl: string;
  nodes: Array<{ target: string; html: string; summary: string }>;
}

/** Waits until the page has stopped loading: no skeleton, no spinner, no busy element. */
async function settled(page: Page): Promise<void> {
  await page.waitForFunction(() => !document.querySelector(".animate-pulse, .animate-spin, [aria-busy='true']"));
}

/** Runs axe-core on the whole page and returns what it found, serious or critical only. */
async function seriousViolations(page: Page): Promise<Finding[]> {
  await settled(page);
  // Evaluated through the DevTools protocol: the app's Content-Security-Policy forbids inline scripts,
  // so a <script> tag with axe's source would not run.
  if (!(await page.evaluate(() => "axe" in window))) await page.evaluate(AXE_SOURCE);
  const findings = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: Document, opts: object) => Promise<{ violations: AxeViolation[] }> } }).axe;
    interface AxeViolation {
      id: string;
      impact: string | null;
      help: string;
      helpUrl: string;
      nodes: Array<{ target: unknown[]; html: string; failureSummary?: string }>;
    }
    const result = await axe.run(document, { resultTypes: ["violations"] });
    return result.violations.map((v) => ({
      rule: v.id,
      impact: v.impact,
      help: v.help,
      helpUrl: v.helpUrl,
      nodes: v.nodes.map((n) => ({ target: n.target.map(String).join(" "), html: n.html.slice(0, 160), summary: (n.failureSummary ?? "").replace(/\s+/g, " ").trim() })),
    }));
  });
  return findings.filter((f) => f.impact === "serious" || f.impact === "critical");
}

function describeFindings(screen: string, findings: Finding[]): string {
  const lines = findings.flatMap((f) => [
    `  [${f.impact}] ${f.rule}: ${f.help} (${f.helpUrl})`,
    ...f.nodes.slice(0, 8).map((n) => `      at ${n.target}\n        ${n.html}${n.summary ? `\n        ${n.summary}` : ""}`),
    ...(f.nodes.length > 8 ? [`      … and ${f.nodes.length - 8} more`] : []),
  ]);
  return `${screen}: ${findings.length} serious or critical axe violation(s)\n${lines.join("\n")}`;
}

/** The screen passes axe-core's automated rules with no serious or critical violation. */
async function expectAccessible(page: Page, screen: string): Promise<void> {
  const findings = await seriousViolations(page);
  // Soft: one run lists every screen's findings, not only the first screen's.
  expect.soft(findings.map((f) => f.rule), describeFindings(screen, findings)).toEqual([]);
}

const h1 = (page: Page, name: string | RegExp) => page.getByRole("heading", { level: 1, name }).waitFor();

describe("accessibility of every screen (axe-core)", () => {
  it("signed out: sign-in, sign-up, forgot password, reset password and an invitation", async () => {
    const page = await newcomer.context.newPage();
    await withScreenshotOnFailure(newcomer.context, "a11y-signed-out", async () => {
      await page.goto(`${server.url}/sign-in`);
      await h1(page, "Sign in");
      await expectAccessible(page, "Sign in");

      // The same form after a refused attempt, with its error messages shown.
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.locator("[aria-invalid='true']").first().waitFor();
      await expectAccessible(page, "Sign in, with errors");

      await page.goto(`${server.url}/sign-up`);
      await h1(page, "Create an account");
      await expectAccessible(page, "Sign up");

      await page.goto(`${server.url}/forgot-password`);
      await h1(page, "Reset your password");
      await expectAccessible(page, "Forgot password");

      // A real reset link, from the fake mailbox.
      const since = new Date();
      const asked = await page.request.post(`${server.url}/api/auth/password-reset/request`, { data: { email: demo.account.viewer.email } });
      expect(asked.ok()).toBe(true);
      const resetMail = await waitForMail(server, demo.account.viewer.email, { since });
      await page.goto(linkIn(resetMail.text, "/reset-password/"));
      await h1(page, "Choose a new password");
      await expectAccessible(page, "Reset password");

      const invitee = uniqueEmail("a11y-invitee");
      const invited = await lead.context.request.post(`${server.url}/api/studies/${demo.studyId}/invitations`, { data: { email: invitee, role: "reviewer" } });
      expect(invited.status()).toBe(201);
      const invitationMail = await waitForMail(server, invitee);
      await page.goto(linkIn(invitationMail.text, "/invitations/"));
      await h1(page, /^Join/);
      await expectAccessible(page, "Invitation, signed out");

      await page.goto(`${server.url}/no-such-page`);
      await page.getByRole("heading", { level: 1 }).waitFor();
      await expectAccessible(page, "Page not found");
    });
  });

  it("a new account: no studies yet, new study, account settings, and an invitation while signed in", async () => {
    const page = await newcomer.context.newPage();
    await withScreenshotOnFailure(newcomer.context, "a11y-newcomer", async () => {
      const email = uniqueEmail("a11y-newcomer");
      const signup = await page.request.post(`${server.url}/api/auth/signup`, { data: { email, password: PASSWORD, name: "Invented Newcomer" } });
      expect(signup.status()).toBe(201);

      await page.goto(`${server.url}/`);
      await page.getByRole("heading", { level: 2, name: "No studies yet" }).waitFor();
      await expectAccessible(page, "Studies, empty");

      await page.goto(`${server.url}/studies/new`);
      await h1(page, "New study");
      await expectAccessible(page, "New study");
      await page.getByRole("button", { name: "Create study" }).click();
      await page.locator("[aria-invalid='true']").first().waitFor();
      await expectAccessible(page, "New study, with errors");

      await page.goto(`${server.url}/account`);
      await h1(page, "Account settings");
      await expectAccessible(page, "Account settings");

      await page.getByRole("button", { name: "Account" }).click();
      await page.getByRole("button", { name: "Sign out" }).waitFor();
      await expectAccessible(page, "Account menu open");

      const invited = await lead.context.request.post(`${server.url}/api/studies/${demo.studyId}/invitations`, { data: { email, role: "analyst" } });
      expect(invited.status()).toBe(201);
      const mail = await waitForMail(server, email);
      await page.goto(linkIn(mail.text, "/invitations/"));
      await page.getByRole("button", { name: "Accept and open the study" }).waitFor();
      await expectAccessible(page, "Invitation, signed in");
    });
  });

  it("the study lead's own screens: studies, outbox, and the notification menu with a mention", async () => {
    // A reviewer mentions the lead on the demo's crisis run, so the bell has something to show.
    const reviewer = await playwrightRequest.newContext({ baseURL: server.url });
    const login = await reviewer.post("/api/auth/login", { data: { email: demo.account.reviewer.email, password: demo.account.reviewer.password } });
    expect(login.status()).toBe(200);
    const posted = await reviewer.post(`/api/studies/${demo.studyId}/threads`, {
      data: {
        target: { type: "run", id: demo.analyses.crisisRunId },
        title: "Does the life habit signal survive the clade adjustment?",
        body: `@${demo.account.owner.name} the flagged trait deserves a sentence in the write-up (invented).`,
        mentions: [demo.userIds.owner],
      },
    });
    expect(posted.status()).toBe(201);
    await reviewer.dispose();

    // A second study, so that the list shows (a person with one study may be taken straight to it).
    const second = await lead.context.request.post(`${server.url}/api/studies`, { data: { name: "Invented second study for the list", description: "" } });
    expect(second.status()).toBe(201);

    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "a11y-lead-home", async () => {
      await page.goto(`${server.url}/`);
      await h1(page, "Studies");
      await page.getByRole("link", { name: /Vessiran/ }).first().waitFor();
      await expectAccessible(page, "Studies, with a study");

      // The Outbox shows the lead's own mail only: a reset link asked for their address gives it one.
      const reset = await playwrightRequest.newContext({ baseURL: server.url });
      expect((await reset.post("/api/auth/password-reset/request", { data: { email: demo.account.owner.email } })).status()).toBe(202);
      await reset.dispose();
      await waitForMail(server, demo.account.owner.email, { subject: "Reset" });
      await page.goto(`${server.url}/outbox`);
      await h1(page, "Outbox");
      await page.getByRole("article").first().waitFor();
      await expectAccessible(page, "Outbox");

      await page.getByRole("button", { name: /^Notifications, \d+ unread/ }).click();
      await page.getByRole("heading", { name: "Mentions", exact: true }).waitFor();
      await page.getByText("Does the life habit signal survive the clade adjustment?").first().waitFor();
      await expectAccessible(page, "Notification menu open");
    });
  });

  it("inside the demo study: overview, trait table, codebook, imports with a preview, and boundary", async () => {
    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "a11y-study-data", async () => {
      await page.goto(demo.studyUrl);
      await page.getByRole("list", { name: "Activity, newest first" }).waitFor();
      await expectAccessible(page, "Study overview");

      await page.goto(`${demo.studyUrl}/table`);
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.locator("[role=row][data-taxon]").first().waitFor();
      await expectAccessible(page, "Trait table");

      // A cell's history panel, and the editor in a cell.
      const firstCell = grid.locator("[role=row][data-taxon] [role=gridcell][data-column='Body size']").first();
      await firstCell.click();
      await page.getByRole("button", { name: /^History of Body size for / }).click();
      await page.getByRole("list", { name: "Changes, newest first" }).waitFor();
      await expectAccessible(page, "Trait table, a cell's history");
      await page.keyboard.press("Escape");
      await firstCell.click();
      await page.keyboard.press("Enter");
      await page.getByLabel(/^Body size of /).waitFor();
      await expectAccessible(page, "Trait table, editing a cell");
      await page.keyboard.press("Escape");

      await page.goto(`${demo.studyUrl}/codebook`);
      await page.getByRole("region", { name: "Traits in use" }).waitFor();
      await expectAccessible(page, "Codebook");
      await page.getByRole("button", { name: "Edit Life habit" }).click();
      await page.getByRole("form", { name: "Edit “Life habit”" }).waitFor();
      await expectAccessible(page, "Codebook, editing a trait");

      await page.goto(`${demo.studyUrl}/imports`);
      await h1(page, "Imports");
      await page.locator("[data-import-file]").first().waitFor();
      await expectAccessible(page, "Imports");
      const csv = ["name,higher_taxon,first_appearance,last_appearance,life_habit", "Accessia prima,Invented family,Cenomanian,Turonian,burrowing", "Accessia secunda,Invented family,96,93,epifaunal"].join("\n");
      await page.getByLabel("CSV file", { exact: true }).setInputFiles({ name: "a11y-invented.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
      await page.getByRole("button", { name: "Upload and read the file" }).click();
      const mapping = page.getByRole("form", { name: "Map the columns" });
      await mapping.waitFor();
      await expectAccessible(page, "Imports, mapping the columns");
      await mapping.getByRole("button", { name: "Check every row" }).click();
      await page.getByRole("form", { name: "Commit the import" }).waitFor();
      await expectAccessible(page, "Imports, the preview");

      await page.goto(`${demo.studyUrl}/boundary?unit=Turonian`);
      await h1(page, "Boundary");
      await page.locator('[aria-label="Outcome counts"]').waitFor();
      await page.getByRole("region", { name: "Extinction through time" }).getByRole("img").first().waitFor();
      await expectAccessible(page, "Boundary, base of the Turonian");
    });
  });

  it("inside the demo study: selectivity with results, runs, a run's report, and two runs compared", async () => {
    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "a11y-study-runs", async () => {
      await page.goto(`${demo.studyUrl}/selectivity`);
      await h1(page, "Selectivity");
      await expectAccessible(page, "Selectivity, setting up");

      // The set-up with a boundary and a trait chosen, and the design read back in words and numbers.
      const addForm = page.getByRole("form", { name: "Add a boundary" });
      await addForm.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await addForm.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await addForm.getByLabel("Stage", { exact: true }).selectOption("Turonian");
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      await page.getByRole("checkbox", { name: /^Feeding mode/ }).check();
      await page.getByTestId("design-summary").locator("[data-design-boundary]").first().waitFor();
      await expectAccessible(page, "Selectivity, the design of a run");

      await page.goto(`${demo.studyUrl}/selectivity?run=${demo.analyses.crisisRunId}`);
      await page.getByTestId("forest-plot").waitFor();
      await expectAccessible(page, "Selectivity, a run's results");

      // The run's threads in the side panel, and the form that starts one.
      await page.getByRole("button", { name: /^Discuss/ }).click();
      const panel = page.getByRole("dialog", { name: /^The run “/ });
      await panel.getByText(/\d+ open · \d+ resolved/).waitFor();
      await expectAccessible(page, "A run's threads in the side panel");
      await panel.getByRole("button", { name: "Start a thread" }).click();
      await panel.getByRole("form", { name: "Start a thread" }).waitFor();
      await expectAccessible(page, "Starting a thread about a run");
      await page.keyboard.press("Escape");

      await page.goto(`${demo.studyUrl}/selectivity?run=${demo.analyses.sweepRunId}`);
      await page.getByTestId("log-odds-heat-map").waitFor();
      await expectAccessible(page, "Selectivity, results across four boundaries");

      await page.goto(`${demo.studyUrl}/runs`);
      await h1(page, "Runs");
      await page.locator("tr[data-run-id]").first().waitFor();
      await expectAccessible(page, "Runs");

      await page.goto(`${demo.studyUrl}/runs/compare?base=${demo.analyses.crisisRunId}&run=${demo.analyses.sweepRunId}`);
      await page.getByTestId("run-comparison").waitFor();
      await expectAccessible(page, "Runs compared");

      await page.goto(`${demo.studyUrl}/runs/${demo.analyses.crisisRunId}/report`);
      await page.getByTestId("run-report").getByTestId("forest-plot").waitFor();
      await expectAccessible(page, "Run report");
    });
  });

  it("inside the demo study: modern comparison lists, crosswalk, results and report", async () => {
    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "a11y-study-modern", async () => {
      await page.goto(`${demo.studyUrl}/modern-comparison`);
      await h1(page, "Modern comparison");
      await page.getByRole("form", { name: "Compare a list with a run" }).waitFor();
      await expectAccessible(page, "Modern comparison");

      await page.getByRole("button", { name: "Upload a species list" }).first().click();
      await page.getByLabel("Species list (CSV)").waitFor();
      await expectAccessible(page, "Modern comparison, uploading a list");

      await page.goto(`${demo.studyUrl}/modern-comparison/lists/${demo.listId}`);
      await h1(page, /^Crosswalk: /);
      await page.getByRole("button", { name: "Save the crosswalk" }).waitFor();
      await expectAccessible(page, "Crosswalk");

      await page.goto(`${demo.studyUrl}/modern-comparison/comparisons/${demo.analyses.comparisonId}`);
      await page.getByTestId("roc-chart").locator("svg").waitFor();
      await expectAccessible(page, "Modern comparison results");
      await page.getByRole("button", { name: /^Discuss/ }).click();
      await page.getByRole("dialog", { name: /^The comparison “/ }).getByText(/\d+ open · \d+ resolved/).waitFor();
      await expectAccessible(page, "A comparison's threads in the side panel");
      await page.keyboard.press("Escape");

      await page.goto(`${demo.studyUrl}/modern-comparison/comparisons/${demo.analyses.comparisonId}/report`);
      await page.getByTestId("roc-chart").locator("svg").waitFor();
      await expectAccessible(page, "Modern comparison report");
    });
  });

  it("inside the demo study: threads, one thread, and members", async () => {
    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "a11y-study-people", async () => {
      await page.goto(`${demo.studyUrl}/threads`);
      await h1(page, "Threads");
      const first = page.getByRole("link", { name: /^Is the Turonian record of .* reworked\?$/ });
      await first.waitFor();
      await expectAccessible(page, "Threads");

      await first.click();
      await h1(page, /^Is the Turonian record of .* reworked\?$/);
      await expectAccessible(page, "One thread");

      await page.goto(`${demo.studyUrl}/members`);
      await h1(page, "Members");
      await page.locator("[data-member-email]").first().waitFor();
      await expectAccessible(page, "Members");
      await page.getByRole("button", { name: `Remove ${demo.account.viewer.name}` }).click();
      await page.getByRole("dialog", { name: `Remove ${demo.account.viewer.name}?` }).waitFor();
      await expectAccessible(page, "Members, confirming a removal");
      await page.keyboard.press("Escape");
    });
  });
});

describe("accessibility of the read-only screens (axe-core)", () => {
  it("the demo study's guest: overview, trait table, imports, selectivity, modern comparison and members, each with its read-only notes", async () => {
    await newcomer.context.request.post(`${server.url}/api/auth/logout`);
    await signInAs(newcomer.context, server.url, demo.account.viewer);
    const page = await newcomer.context.newPage();
    await withScreenshotOnFailure(newcomer.context, "a11y-guest", async () => {
      const screens: Array<[string, string, (p: Page) => Promise<unknown>]> = [
        ["Study overview, guest", "", (p) => p.getByRole("list", { name: "Activity, newest first" }).waitFor()],
        ["Trait table, guest", "/table", (p) => p.getByRole("grid", { name: "Trait table" }).locator("[role=row][data-taxon]").first().waitFor()],
        ["Imports, guest", "/imports", (p) => p.locator("[data-import-file]").first().waitFor()],
        ["Selectivity, guest", "/selectivity", (p) => h1(p, "Selectivity")],
        ["Modern comparison, guest", "/modern-comparison", (p) => p.getByRole("heading", { name: "Saved comparisons" }).waitFor()],
        ["Members, guest", "/members", (p) => p.locator("[data-member-email]").first().waitFor()],
      ];
      for (const [screen, path, ready] of screens) {
        await page.goto(`${demo.studyUrl}${path}`);
        await ready(page);
        await expectAccessible(page, screen);
      }
    });
  });
});

// ---------------------------------------------------------------- keyboard alone

/** Presses Tab until the focused element passes `isTarget` (at most `limit` presses); fails if it never does. */
async function tabUntil(page: Page, isTarget: (el: Element) => boolean, what: string, limit = 150): Promise<void> {
  for (let presses = 0; presses < limit; presses++) {
    await page.keyboard.press("Tab");
    if (await page.evaluate(`(${isTarget.toString()})(document.activeElement ?? document.body)`)) return;
  }
  throw new Error(`Tab never reached ${what} in ${limit} presses`);
}

/** The focused element draws a visible focus indicator: an outline or a ring (box-shadow). */
async function focusIndicator(page: Page): Promise<string> {
  return page.evaluate(() => {
    const el = document.activeElement;
    if (!el || el === document.body) return "";
    const style = getComputedStyle(el);
    const outline = style.outlineStyle !== "none" && parseFloat(style.outlineWidth) > 0 ? `outline ${style.outlineWidth} ${style.outlineStyle}` : "";
    const ring = style.boxShadow && style.boxShadow !== "none" ? `box-shadow ${style.boxShadow}` : "";
    return [outline, ring].filter(Boolean).join("; ");
  });
}

const focused = (page: Page) =>
  page.evaluate(() => {
    const el = document.activeElement as HTMLElement | null;
    return {
      role: el?.getAttribute("role") ?? null,
      tag: el?.tagName.toLowerCase() ?? null,
      column: el?.getAttribute("data-column") ?? null,
      taxon: el?.closest("[data-taxon]")?.getAttribute("data-taxon") ?? null,
      label: el?.getAttribute("aria-label") ?? (el?.id ? (document.querySelector(`label[for="${el.id}"]`)?.textContent ?? null) : null),
      text: el?.querySelector("[data-cell-value]")?.textContent ?? null,
    };
  });

describe("keyboard alone", () => {
  it("edits the trait table: Tab into the grid, arrows, Enter to edit, Enter to save, the reason by keyboard, Escape to cancel", async () => {
    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "keyboard-grid", async () => {
      await page.goto(`${demo.studyUrl}/table`);
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.locator("[role=row][data-taxon]").first().waitFor();
      await settled(page);

      await tabUntil(page, (el) => el.getAttribute("role") === "gridcell", "a cell of the trait table");
      expect(await focusIndicator(page)).not.toBe("");

      // Right along the row to Body size, then down to a taxon with a recorded size.
      for (let step = 0; step < 20 && (await focused(page)).column !== "Body size"; step++) await page.keyboard.press("ArrowRight");
      expect((await focused(page)).column).toBe("Body size");
      const first = await focused(page);
      await page.keyboard.press("ArrowDown");
      const below = await focused(page);
      expect(below.column).toBe("Body size");
      expect(below.taxon).not.toBe(first.taxon);
      await page.keyboard.press("ArrowUp");
      expect((await focused(page)).taxon).toBe(first.taxon);
      for (let step = 0; step < 30 && !/^\d/.test((await focused(page)).text ?? ""); step++) await page.keyboard.press("ArrowDown");
      const start = await focused(page);
      expect(start.text).toMatch(/^\d[\d.,]* mm$/);
      expect(await focusIndicator(page)).not.toBe("");
      const taxon = start.taxon!;
      const shown = () => grid.locator(`[role=row][data-taxon="${taxon}"] [role=gridcell][data-column="Body size"] [data-cell-value]`).textContent();

      // Escape in the editor leaves the value as it was, and the cell keeps the focus.
      await page.keyboard.press("Enter");
      expect(await focused(page)).toMatchObject({ tag: "input", label: `Body size of ${taxon}` });
      await page.keyboard.press("ControlOrMeta+A");
      await page.keyboard.type("999");
      await page.keyboard.press("Escape");
      expect(await focused(page)).toMatchObject({ role: "gridcell", column: "Body size", taxon });
      expect(await shown()).toBe(start.text);

      // Escape in the reason dialog cancels the change too.
      await page.keyboard.press("Enter");
      await page.keyboard.press("ControlOrMeta+A");
      await page.keyboard.type("73");
      await page.keyboard.press("Enter");
      const ask = page.getByRole("dialog", { name: "Why change this value?" });
      await ask.waitFor();
      expect((await focused(page)).label?.trim()).toBe("Reason");
      await expectAccessible(page, "Trait table, asking why a value changes");
      await page.keyboard.press("Escape");
      await ask.waitFor({ state: "hidden" });
      expect(await shown()).toBe(start.text);
      // Enter in a cell saves and steps down, as in a spreadsheet; the focus stays in the grid either way.
      const cancelled = await focused(page);
      expect(cancelled).toMatchObject({ role: "gridcell", column: "Body size" });
      if (cancelled.taxon !== taxon) await page.keyboard.press("ArrowUp");
      expect((await focused(page)).taxon).toBe(taxon);

      // The whole change by keyboard: Enter, the new size, Enter, the reason, Enter.
      await page.keyboard.press("Enter");
      await page.keyboard.press("ControlOrMeta+A");
      await page.keyboard.type("73");
      await page.keyboard.press("Enter");
      await ask.waitFor();
      await page.keyboard.type("Re-measured on the figured specimen (invented), by keyboard alone");
      await page.keyboard.press("Enter");
      await ask.waitFor({ state: "hidden" });
      await expect.poll(shown).toBe("73 mm");
      // Focus is back in the grid, on the cell just changed or the one below it.
      const after = await focused(page);
      expect(after.role).toBe("gridcell");
      expect(after.column).toBe("Body size");
      expect(await focusIndicator(page)).not.toBe("");

      // The cell's history opens from the keyboard (Alt+H) and has the reason.
      if (after.taxon !== taxon) await page.keyboard.press("ArrowUp");
      await page.keyboard.press("Alt+KeyH");
      const history = page.getByRole("dialog", { name: `Body size of ${taxon}` });
      await history.getByText("Re-measured on the figured specimen (invented), by keyboard alone").waitFor();
      await page.keyboard.press("Escape");
      await history.waitFor({ state: "hidden" });
    });
  });

  it("completes forms with Tab, typing and Enter, with the focus always visible: signing in, and inviting a member", async () => {
    const guest = await newcomer.context.newPage();
    await withScreenshotOnFailure(newcomer.context, "keyboard-sign-in", async () => {
      await newcomer.context.request.post(`${server.url}/api/auth/logout`);
      await guest.goto(`${server.url}/sign-in`);
      await h1(guest, "Sign in");
      await tabUntil(guest, (el) => el.matches("input[type=email]"), "the e-mail field");
      expect(await focusIndicator(guest)).not.toBe("");
      await guest.keyboard.type(demo.account.viewer.email);
      await tabUntil(guest, (el) => el.matches("input[type=password]"), "the password field");
      expect(await focusIndicator(guest)).not.toBe("");
      await guest.keyboard.type(demo.account.viewer.password);
      await guest.keyboard.press("Enter");
      await guest.waitForURL((url) => url.pathname === "/" || url.pathname.startsWith("/studies/"));
      await guest.getByRole("button", { name: "Account" }).waitFor();
    });

    const page = await lead.context.newPage();
    await withScreenshotOnFailure(lead.context, "keyboard-invite", async () => {
      const email = uniqueEmail("keyboard-invitee");
      await page.goto(`${demo.studyUrl}/members`);
      await page.locator("[data-member-email]").first().waitFor();
      await settled(page);

      await tabUntil(page, (el) => el.matches("input[type=email]"), "the invitation's e-mail field");
      expect(await focusIndicator(page)).not.toBe("");
      await page.keyboard.type(email);
      await page.keyboard.press("Tab");
      expect(await focused(page)).toMatchObject({ tag: "select" });
      expect(await focusIndicator(page)).not.toBe("");
      // A closed select takes arrow keys: from the default role (the last, Guest) up to the one before.
      const before = await page.evaluate(() => (document.activeElement as HTMLSelectElement).value);
      await page.keyboard.press("ArrowUp");
      const role = await page.evaluate(() => (document.activeElement as HTMLSelectElement).value);
      expect(role).not.toBe(before);
      await tabUntil(page, (el) => el.matches("button[type=submit]"), "the Send invitation button", 5);
      expect(await focusIndicator(page)).not.toBe("");
      await page.keyboard.press("Enter");
      await page.getByText(`Invitation sent to ${email}`).waitFor();
      const pending = await page.getByRole("region", { name: "Pending invitations" }).innerText();
      expect(pending).toContain(email);
      expect(await page.getByRole("region", { name: "Pending invitations" }).getByRole("listitem").filter({ hasText: email }).innerText()).toContain("Reviewer");
    });
  });
});
