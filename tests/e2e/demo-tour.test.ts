// The README's tour, taken by the browser so its pictures stay current: the invented demo study is
// seeded as `npm start` seeds it, the demo analyst signs in through the sign-in form and lands on
// the study, then reads the trait table, the crisis boundary and the saved crisis run. Each screen
// is checked for what it must show before its picture is saved into docs/tour/. A second journey
// checks the first start of a new account: three steps, each with a button, and a CSV template.
import { mkdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { DEMO_CRISIS_RUN_NAME, DEMO_SWEEP_RUN_NAME } from "../../scripts/seed/demo/analyses";
import { generateDemoStudy } from "../../scripts/seed/demo/generator";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { PASSWORD, startTestServer, uniqueEmail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

const TOUR_DIR = join(process.cwd(), "docs", "tour");
const CAUTION = "Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.";

const data = generateDemoStudy();
// The demo's names and passwords; addresses of this file's own, since the test database is shared
// by every test file (the analyst must have exactly one study to be taken straight to it).
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`tour-${a.role}`) }));
const analyst = accounts.find((a) => a.role === "analyst")!;

let server: Server;
let browser: Browser;
let seeded: DemoSeedResult;

beforeAll(async () => {
  // As `npm start` runs on a local machine, so the pictures show what a first user sees.
  server = await startTestServer({ environment: "development" });
  browser = await launchBrowser();
  seeded = await seedDemo(server.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** A picture of the visible window (1280 x 860) for the README. */
async function tourPicture(page: Page, name: string): Promise<void> {
  mkdirSync(TOUR_DIR, { recursive: true });
  await page.screenshot({ path: join(TOUR_DIR, `${name}.png`) });
}

/**
 * Outcomes at the base of the Turonian, 93.9 Ma, with the Cenomanian (100.5-93.9 Ma) as window
 * (ICS chart v2024/12), from the generated ranges by the rule itself: a survivor's range crosses
 * the boundary (fad > 93.9 > lad); a victim was there before it and was last seen in the window
 * (fad > 93.9 and 93.9 <= lad <= 100.5); anything else, a range not compiled included, is not at risk.
 */
function expectedTuronianCounts(): { survivors: number; victims: number; notAtRisk: number } {
  let survivors = 0;
  let victims = 0;
  for (const t of data.taxa) {
    if (t.fadMa === null || t.ladMa === null || !(t.fadMa > 93.9)) continue;
    if (t.ladMa < 93.9) survivors++;
    else if (t.ladMa <= 100.5) victims++;
  }
  return { survivors, victims, notAtRisk: data.taxa.length - survivors - victims };
}

const count = (n: number) => n.toLocaleString("en-US");

/** Sample odds ratio of extinction at the base of the Turonian, one state of a trait against another, from the generated data. */
function crudeOddsRatio(traitKey: string, state: string, reference: string): number {
  const cell = { victims: { [state]: 0, [reference]: 0 }, survivors: { [state]: 0, [reference]: 0 } };
  for (const t of data.taxa) {
    const value = t.values[traitKey];
    if (t.fadMa === null || t.ladMa === null || !(t.fadMa > 93.9) || (value !== state && value !== reference)) continue;
    if (t.ladMa < 93.9) cell.survivors[value]++;
    else if (t.ladMa <= 100.5) cell.victims[value]++;
  }
  return (cell.victims[state] * cell.survivors[reference]) / (cell.survivors[state] * cell.victims[reference]);
}

describe("the demo tour", () => {
  it("signs the demo analyst in onto the demo study, and shows the trait table, the crisis boundary and the saved crisis run", async () => {
    const page = await browser.context.newPage();
    const studyUrl = `${server.url}/studies/${seeded.studyId}`;
    await withScreenshotOnFailure(browser.context, "demo-tour", async () => {
      // Sign in through the form; a person with one study lands on it.
      await page.goto(`${server.url}/`);
      await page.waitForURL(/\/sign-in$/);
      await page.getByLabel("E-mail").fill(analyst.email);
      await page.getByLabel("Password", { exact: true }).fill(analyst.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(studyUrl);
      await page.getByRole("heading", { level: 1, name: data.study.name }).waitFor();
      // The study has taxa, so the first steps of an empty study are not offered.
      await page.getByRole("heading", { name: "About this study" }).waitFor();
      expect(await page.getByRole("heading", { name: "First steps" }).count()).toBe(0);

      // "All studies" still lists the studies.
      await page.getByRole("link", { name: "All studies" }).click();
      await page.waitForURL(`${server.url}/`);
      await page.getByRole("heading", { level: 1, name: "Studies" }).waitFor();
      await page.getByRole("link", { name: new RegExp(data.study.name.replace(/[()]/g, "\\$&")) }).click();
      await page.waitForURL(studyUrl);

      // The trait table: every invented genus, with the five traits of the codebook as columns.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Trait table" }).click();
      await page.getByRole("heading", { level: 1, name: "Trait table" }).waitFor();
      await page.getByText(new RegExp(`of ${count(data.taxa.length)}$`)).waitFor();
      const header = await page.getByRole("columnheader").allInnerTexts();
      for (const trait of data.traits) expect(header.some((h) => h.includes(trait.label)), trait.label).toBe(true);
      const firstRow = await page.locator('[role="row"][aria-rowindex="2"]').innerText();
      expect(data.taxa.some((t) => firstRow.includes(t.name)), firstRow).toBe(true);
      // The two age columns write every age alike: the generator rounds ages to hundredths, so a
      // round one reads "94.00 Ma" beside "94.41 Ma", never "94 Ma" (shared/format/ages.ts).
      const ages = (await page.getByRole("gridcell").allInnerTexts()).map((t) => t.trim()).filter((t) => / Ma$/.test(t));
      expect(ages.length).toBeGreaterThan(10);
      expect(new Set(ages.map((t) => /\.(\d+) Ma$/.exec(t)?.[1]?.length ?? 0)), ages.join(" | ")).toEqual(new Set([2]));
      await tourPicture(page, "trait-table");

      // The Boundary screen at the base of the Turonian, picked with the time scale picker.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
      await page.getByRole("heading", { level: 1, name: "Boundary" }).waitFor();
      await page.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await page.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await page.getByLabel("Stage", { exact: true }).selectOption("Turonian");
      await page.waitForURL(/[?&]unit=Turonian(&|$)/);
      await page.getByTestId("boundary-headline").filter({ hasText: "base of the Turonian stage, 93.9 Ma" }).waitFor();
      const expected = expectedTuronianCounts();
      await page.waitForFunction(
        (want) => Array.from(document.querySelectorAll('[aria-label="Outcome counts"] > div > dd:first-of-type')).map((dd) => dd.textContent?.trim()).join(",") === want,
        [expected.survivors, expected.victims, expected.notAtRisk].map(count).join(","),
      );
      expect(await page.getByTestId("proportional-extinction").innerText()).toContain(`${count(expected.victims)} of ${count(expected.victims + expected.survivors)} taxa at risk`);
      await page.getByRole("note").filter({ hasText: "not proof of a kill mechanism" }).waitFor();
      // The picture starts at the outcomes, under the sticky top bar.
      await page.getByRole("region", { name: "Outcomes across the boundary" }).evaluate((el) => el.scrollIntoView({ block: "start" }));
      await page.evaluate(() => window.scrollBy(0, -90));
      await tourPicture(page, "boundary-turonian");

      // The Runs list holds the two invented demo runs; the crisis run opens on the Selectivity screen.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Runs" }).click();
      await page.getByRole("heading", { level: 1, name: "Runs" }).waitFor();
      await page.locator(`tr[data-run-id="${seeded.analyses.sweepRunId}"]`).getByText(DEMO_SWEEP_RUN_NAME).waitFor();
      await page.locator(`tr[data-run-id="${seeded.analyses.crisisRunId}"]`).getByRole("link", { name: DEMO_CRISIS_RUN_NAME, exact: true }).click();
      await page.waitForURL(new RegExp(`/selectivity\\?run=${seeded.analyses.crisisRunId}`));
      await page.getByTestId("run-name").filter({ hasText: DEMO_CRISIS_RUN_NAME }).waitFor();
      const forest = page.getByTestId("forest-plot");
      await forest.waitFor({ timeout: 60_000 });
      await page.getByTestId("run-cautions").getByText(CAUTION).waitFor();

      // What the generator planted: deposit feeding raises the odds; the infaunal habit only shares
      // the hard-hit family with extinction, and the confounding check flags it.
      const deposit = forest.locator('[data-contrast="feeding:Deposit feeder vs Suspension feeder"]');
      expect(await deposit.count()).toBe(1);
      const infaunal = forest.locator('[data-contrast="life_habit:Infaunal vs Epifaunal"]');
      expect(await infaunal.getAttribute("data-flagged")).toBe("true");
      expect(await infaunal.textContent()).toContain("possible confounding");
      const habitRow = page.locator('tr[data-confounding="life_habit"]').filter({ hasText: "Infaunal vs Epifaunal" });
      expect(await habitRow.getAttribute("data-flagged")).toBe("true");
      // Crude odds ratio from the generated data (worked by hand, Woolf's sample odds ratio ad / bc over
      // the genera at risk): a, b = infaunal victims and survivors; c, d = epifaunal victims and survivors.
      const habitCells = (await habitRow.locator("td").allInnerTexts()).map((t) => t.trim());
      expect(habitCells[0].split(/\s+/)[0]).toBe(crudeOddsRatio("life_habit", "infaunal", "epifaunal").toPrecision(3));
      const habitNote = await page.getByTestId("confounding-note-life_habit").innerText();
      expect(habitNote).toContain("Infaunal");
      // Two life habits are flagged in the demo; the reading they share is said once, after both.
      expect(habitNote.split("a shared cause, not necessarily an effect of the trait").length - 1, habitNote).toBe(1);

      for (const dismiss of await page.getByRole("button", { name: "Dismiss" }).all()) await dismiss.click();
      await forest.evaluate((el) => el.scrollIntoView({ block: "start" }));
      // Leave room for the sticky top bar and the card's title above the plot.
      await page.evaluate(() => window.scrollBy(0, -180));
      await tourPicture(page, "crisis-run");
    });
    await page.close();
  }, 180_000);
});

describe("first start of a new account", () => {
  it("shows three steps with a button each and a CSV template, and a new study's overview offers the same steps", async () => {
    const newcomer = await launchBrowser();
    const page = await newcomer.context.newPage();
    try {
      await withScreenshotOnFailure(newcomer.context, "demo-first-steps", async () => {
        const signup = await page.request.post(`${server.url}/api/auth/signup`, {
          data: { email: uniqueEmail("newcomer"), password: PASSWORD, name: "Invented Newcomer" },
        });
        expect(signup.status()).toBe(201);
        await page.goto(`${server.url}/`);
        await page.getByRole("heading", { level: 2, name: "No studies yet" }).waitFor();
        const steps = page.getByRole("listitem").filter({ has: page.getByRole("heading", { level: 3 }) });
        expect((await steps.getByRole("heading", { level: 3 }).allInnerTexts()).map((t) => t.replace(/^Step \d:\s*/, ""))).toEqual([
          "Define the codebook",
          "Import taxa",
          "Pick a boundary",
        ]);
        await page.getByRole("link", { name: "Create your first study" }).waitFor();
        await screenshot(page, "demo-first-steps-no-studies");

        // The template is written in the browser: the taxon columns, then the suggested traits.
        const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Download the CSV template" }).click()]);
        expect(download.suggestedFilename()).toBe("stratasieve-taxa-template.csv");
        const template = readFileSync((await download.path())!, "utf8");
        expect(template).toBe("name,higher_taxon,first_appearance,last_appearance,notes,environment,life_habit,feeding,body_size,geographic_range\r\n");

        // "Pick a boundary" creates the study first, then opens its Boundary screen.
        await page.getByRole("link", { name: "Create a study and pick a boundary" }).click();
        await page.getByText("Once it is created, the study opens on its Boundary screen.").waitFor();
        await page.getByLabel("Name").fill("Invented first study");
        // The suggested codebook is a choice, not a default.
        await page.getByRole("checkbox", { name: /Start from the suggested codebook/ }).check();
        await page.getByRole("button", { name: "Create study" }).click();
        await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/boundary$/);
        const studyPath = new URL(page.url()).pathname.replace(/\/boundary$/, "");
        await page.getByRole("heading", { level: 1, name: "Boundary" }).waitFor();

        // The study's own template has the same columns as the one written in the browser.
        const own = await page.request.get(`${server.url}/api${studyPath}/exports/template.csv`);
        expect(await own.text()).toBe(template);

        // The new study's overview offers the three steps, each with its button.
        await page.goto(`${server.url}${studyPath}`);
        const firstSteps = page.getByRole("region", { name: "First steps" });
        await firstSteps.waitFor();
        expect(await firstSteps.innerText()).toContain("5 traits in the codebook");
        expect(await firstSteps.innerText()).toContain("No taxa yet");
        await firstSteps.getByRole("link", { name: "Edit the codebook" }).waitFor();
        await firstSteps.getByRole("link", { name: "Download the CSV template" }).waitFor();
        await firstSteps.getByRole("link", { name: "Open the Boundary screen" }).waitFor();
        await screenshot(page, "demo-first-steps-overview");
        await firstSteps.getByRole("link", { name: "Import taxa" }).click();
        await page.waitForURL(`${server.url}${studyPath}/imports`);
      });
    } finally {
      await newcomer.close();
    }
  }, 120_000);
});
