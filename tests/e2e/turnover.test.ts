// Browser journey through the turnover section of the Boundary screen on the invented demo study: at the base
// of the Turonian the generator planted a crisis in extinction only (scripts/seed/demo/generator.ts: crisis
// odds far above the 13-16% background losses of the other stages, origination drawn from fixed weights), so
// the screen must say extinction departs from its background and origination does not; the diversity curve
// splits by life habit; the scorecard says which criteria this study cannot assess; and the printable report
// holds all of it.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { seedDemoStudy, signInAs, type DemoFixture } from "../support/demo";
import { startTestServer } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let demo: DemoFixture;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  demo = await seedDemoStudy(server);
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("turnover on the Boundary screen", () => {
  it("shows the demo crisis standing out in extinction not origination, diversity by life habit, and the scorecard", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "turnover", async () => {
      await signInAs(browser.context, server.url, demo.account.analyst);
      await page.goto(`${demo.studyUrl}/boundary?unit=Turonian`);
      await page.getByRole("heading", { level: 1, name: "Boundary" }).waitFor();

      // Origination beside extinction, with the finding in words.
      const section = page.getByRole("region", { name: "Turnover through time" });
      await section.getByRole("img", { name: /Per-capita extinction and origination per stage, Hauterivian to Campanian; boundary at 93\.9 Ma, closing the Cenomanian/ }).waitFor();
      const sentence = await section.getByTestId("turnover-sentence").innerText();
      expect(sentence).toMatch(/extinction departs from its background \(z = \d+\.\d, above the median of \d other stages\)/);
      expect(sentence).toMatch(/origination stays within its background/);

      // The background strips mark the Cenomanian against the other stages.
      const qStrip = section.getByTestId("background-strip-q");
      expect(await qStrip.innerText()).toMatch(/in the Cenomanian; median of \d other stages .* departs from its background/);
      expect(await section.getByTestId("background-strip-p").innerText()).toMatch(/within its background/);

      // Diversity through time, split by life habit: one small chart per habit, with the cautions.
      await section.getByLabel("Split by").selectOption("life_habit");
      await section.locator('[data-testid="diversity-panel"][data-group="infaunal"]').waitFor();
      const panels = await section.getByTestId("diversity-panel").evaluateAll((nodes) => nodes.map((n) => n.getAttribute("data-group")));
      expect(panels).toEqual(expect.arrayContaining(["infaunal", "epifaunal", "nektonic", "planktonic", "terrestrial"]));
      expect(await section.getByRole("note").filter({ hasText: "Range-through counts" }).innerText()).toMatch(/truncated/);

      // The numbers behind the charts: the Cenomanian row, with a column per life habit.
      await section.getByText("Numbers behind the charts").click();
      const table = section.getByTestId("turnover-table");
      const header = await table.locator("thead").innerText();
      expect(header).toMatch(/Infaunal/i);
      const cenomanian = await table.locator('tr[data-stage="Cenomanian"]').innerText();
      expect(cenomanian).toMatch(/^Cenomanian\s+100\.5–93\.9/);

      // The scorecard beside the outcome tiles: what is read and what this study cannot assess.
      const scorecard = page.getByRole("region", { name: "Boundary scorecard" });
      expect(await scorecard.getByTestId("scorecard-magnitude").getAttribute("data-status")).toBe("meets");
      expect(await scorecard.getByTestId("scorecard-standingOut").getAttribute("data-status")).toBe("meets");
      const geography = scorecard.getByTestId("scorecard-geography");
      expect(await geography.getAttribute("data-status")).toBe("not assessable");
      expect(await geography.innerText()).toMatch(/Not assessable from this study/);
      expect(await scorecard.innerText()).toMatch(/not a global verdict/);
      expect(await scorecard.innerText()).toMatch(/common practice, no single source/);

      // Both come as files for the same boundary and split.
      expect(await section.getByRole("link", { name: "Download the numbers (CSV)" }).getAttribute("href")).toMatch(/\/exports\/turnover\.csv\?boundaryUnit=Turonian&splitBy=life_habit$/);
      expect(await scorecard.getByRole("link", { name: "Download the scorecard (CSV)" }).getAttribute("href")).toMatch(/\/exports\/scorecard\.csv\?boundaryUnit=Turonian/);

      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "turnover");

      // The printable report carries the boundary and the split: scorecard, rates, diversity and their numbers.
      await page.getByRole("link", { name: "Printable report" }).click();
      await page.waitForURL(/\/boundary\/report\?.*unit=Turonian.*split=life_habit/);
      const report = page.getByTestId("boundary-report");
      await report.getByRole("heading", { level: 1, name: "Base of the Turonian stage, 93.9 Ma" }).waitFor();
      expect(await report.getByTestId("turnover-sentence").innerText()).toMatch(/extinction departs from its background/);
      expect(await report.getByTestId("scorecard-geography").getAttribute("data-status")).toBe("not assessable");
      await report.locator('[data-testid="diversity-panel"][data-group="infaunal"]').waitFor();
      // The numbers behind the charts are open in the report.
      expect(await report.getByTestId("turnover-table").locator('tr[data-stage="Cenomanian"]').isVisible()).toBe(true);
      await screenshot(page, "turnover-report");
    });
  });
});
