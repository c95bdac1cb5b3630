// Browser test of a small modern comparison: seven invented species, 4 threatened and 3 not, which
// the run's model ranks perfectly (AUC 1). The screen must not claim certainty: no "better than
// chance" sentence, a small-sample caution, and an interval that is not 1.00 - 1.00. Every taxon,
// species and value is invented.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { studyWithFinishedHabitRun } from "../support/modernComparison";
import { startTestServer } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let fileDir: string;

// The crisis and its run: studyWithFinishedHabitRun (tests/support/modernComparison.ts); the
// run's model predicts 0.25 (epifaunal), 0.5 (nektonic) and 0.75 (infaunal).
// Seven species: the threatened ones burrow (model 0.75) or swim (0.5), the others live on the
// bottom (0.25), so every threatened species scores above every other one: U = 12 of 4 x 3 pairs, AUC 1.
const LIST_CSV = [
  "species,family,red list category,position",
  "Tarsella alta (invented),Tarsellidae,CR,burrowing",
  "Tarsella brevis (invented),Tarsellidae,EN,burrowing",
  "Quenna rubra (invented),Quennidae,VU,swimming",
  "Quenna vitrea (invented),Quennidae,VU,swimming",
  "Morvia lenta (invented),Morviidae,NT,on the bottom",
  "Morvia plana (invented),Morviidae,LC,on the bottom",
  "Zephyra lata (invented),Zephyridae,LC,on the bottom",
].join("\n");

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-modern-small-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

describe("a small modern comparison", () => {
  it("ranks 4 threatened above 3 not threatened perfectly and still gives no verdict, a small-sample caution and an interval wider than a point", async () => {
    const { context } = browser;
    const { studyUrl } = await studyWithFinishedHabitRun(server, context);
    const csvPath = join(fileDir, "invented-seven-species.csv");
    writeFileSync(csvPath, LIST_CSV);
    const page = await context.newPage();

    await withScreenshotOnFailure(context, "modern-comparison-small", async () => {
      await page.goto(studyUrl);
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Modern comparison" }).click();
      await page.getByRole("heading", { level: 1, name: "Modern comparison" }).waitFor();
      await page.getByRole("button", { name: "Upload a species list" }).first().click();
      await page.getByLabel("Species list (CSV)").setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the list" }).click();
      const mapping = page.getByRole("form", { name: "Which column is which" });
      await mapping.waitFor();
      await mapping.getByLabel("Name of the list").fill("Seven invented species");
      await mapping.getByRole("button", { name: "Check every row" }).click();
      const check = page.getByRole("form", { name: "Check every row" });
      await check.getByRole("button", { name: "Save the list of 7 species" }).click();

      await page.getByRole("heading", { level: 1, name: "Crosswalk: Seven invented species" }).waitFor();
      await page.getByLabel("List column for Life habit").selectOption("position");
      await page.getByLabel("State of Life habit for “burrowing”").selectOption("infaunal");
      await page.getByLabel("State of Life habit for “on the bottom”").selectOption("epifaunal");
      await page.getByLabel("State of Life habit for “swimming”").selectOption("nektonic");
      await page.getByRole("button", { name: "Save the crosswalk" }).click();
      await page.getByText("Crosswalk saved").waitFor();

      await page.getByRole("link", { name: "Back to modern comparison" }).click();
      const form = page.getByRole("form", { name: "Compare a list with a run" });
      await form.waitFor();
      await expect.poll(() => form.getByLabel("Boundary of the run").locator("option").first().innerText()).toContain("(66.0 Ma)");
      await form.getByLabel("Name of the comparison").fill("Seven species today");
      await form.getByRole("button", { name: "Compare and save" }).click();

      await page.getByRole("heading", { level: 1, name: "Seven species today" }).waitFor();
      const chart = page.getByTestId("roc-chart");
      await chart.locator("svg").waitFor();
      // Worked by hand: all 12 (threatened, not threatened) pairs in order, AUC = 12 / 12 = 1.
      expect(await chart.locator("svg").getAttribute("aria-label")).toContain("area under the curve 1.00");
      // The small-sample caution (a verdict needs at least 10 of each group; common practice, no source)...
      await page.getByText("Too few species for a verdict: 4 threatened and 3 not threatened are scored").first().waitFor();
      const text = await page.locator("main").innerText();
      // ...no verdict sentence...
      expect(text).not.toContain("ranks them better than chance");
      // ...and the score interval stays open below 1 (DeLong's would collapse to 1.00 - 1.00).
      expect(text).not.toMatch(/interval 1\.00 – 1\.00/);
      expect(text).toMatch(/interval 0\.\d\d – 1\.00/);
      await screenshot(page, "modern-comparison-small");
    });
  });
});
