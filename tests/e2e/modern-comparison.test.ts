// Browser journey through a modern comparison: an analyst of an invented crisis uploads a modern
// species list (one row with a category the standard lacks is left out explicitly), pairs the list's
// own words with the codebook in the crosswalk (one value is left without a state and listed), scores
// the list with a finished run, and reads the ROC curve and the species worth a look. Every taxon,
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
// The list's own words; row 6 (the header is row 1) has a category the standard does not have.
const LIST_CSV = [
  "species,family,red list category,position",
  "Tarsella alta (invented),Tarsellidae,CR,burrowing",
  "Tarsella brevis (invented),Tarsellidae,EN,burrowing",
  "Quenna rubra (invented),Quennidae,VU,swimming",
  "Quenna vitrea (invented),Quennidae,VU,on the bottom",
  "Morvia dubia (invented),Morviidae,rare,swimming",
  "Morvia lenta (invented),Morviidae,NT,swimming",
  "Morvia plana (invented),Morviidae,LC,on the bottom",
  "Morvia tenuis (invented),Morviidae,LC,on the bottom",
  "Zephyra lata (invented),Zephyridae,LC,burrowing",
  "Zephyra obscura (invented),Zephyridae,LC,unknown",
  "Aulora minuta (invented),Auloridae,DD,burrowing",
  "Aulora nova (invented),Auloridae,NE,swimming",
].join("\n");

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-modern-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

describe("modern comparison", () => {
  it("uploads a list, maps its words onto the codebook, compares it with a run and shows the ROC curve and the species worth a look", async () => {
    const { context } = browser;
    const { studyUrl } = await studyWithFinishedHabitRun(server, context);
    const csvPath = join(fileDir, "invented-coasts-species.csv");
    writeFileSync(csvPath, LIST_CSV);
    const page = await context.newPage();

    await withScreenshotOnFailure(context, "modern-comparison", async () => {
      await page.goto(studyUrl);
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Modern comparison" }).click();
      await page.getByRole("heading", { level: 1, name: "Modern comparison" }).waitFor();
      // The caution stands at the top of the screen.
      await page.getByRole("note").filter({ hasText: "does not replace a formal threat assessment" }).waitFor();

      // Upload, then say which column is which (the guesses are checked, not trusted).
      await page.getByRole("button", { name: "Upload a species list" }).first().click();
      await page.getByLabel("Species list (CSV)").setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the list" }).click();
      const mapping = page.getByRole("form", { name: "Which column is which" });
      await mapping.waitFor();
      expect(await mapping.getByLabel("Species name").inputValue()).toBe("species");
      expect(await mapping.getByLabel("Threat category").inputValue()).toBe("red list category");
      await mapping.getByLabel("Name of the list").fill("Invented coasts: modern species");
      await mapping.getByRole("button", { name: "Check every row" }).click();

      // The bad row is named by row and column; saving it needs an explicit choice.
      const check = page.getByRole("form", { name: "Check every row" });
      await check.getByText("1 problem in 1 row").waitFor();
      const problem = await check.getByRole("table", { name: "Problems by row and column" }).locator("tbody tr").first().locator("td").allInnerTexts();
      expect(problem[0]).toBe("6");
      expect(problem[1]).toBe("red list category");
      expect(problem[2]).toContain('Unknown threat category "rare"');
      await check.getByRole("button", { name: "Save the list of 11 species" }).click();
      await check.getByText("Tick the box to leave out the 1 invalid row").waitFor();
      await check.getByLabel(/Leave out the 1 invalid row/).check();
      await check.getByRole("button", { name: "Save the list of 11 species" }).click();

      // The crosswalk: nothing is paired yet; pair the list's "position" with Life habit.
      await page.getByRole("heading", { level: 1, name: "Crosswalk: Invented coasts: modern species" }).waitFor();
      await page.getByLabel("List column for Life habit").selectOption("position");
      const unmapped = page.getByRole("region", { name: "Values without a state" });
      await unmapped.waitFor();
      // Until states are chosen every value is listed, with its species.
      expect(await unmapped.getByRole("listitem").count()).toBe(4);
      await page.getByLabel("State of Life habit for “burrowing”").selectOption("infaunal");
      await page.getByLabel("State of Life habit for “on the bottom”").selectOption("epifaunal");
      await page.getByLabel("State of Life habit for “swimming”").selectOption("nektonic");
      // "unknown" is left without a state: listed, never dropped silently.
      const left = await unmapped.getByRole("listitem").allInnerTexts();
      expect(left).toHaveLength(1);
      expect(left[0]).toContain("Life habit ← “unknown”");
      expect(left[0]).toContain("1 species in the column position · no state chosen");
      await page.getByRole("button", { name: "Save the crosswalk" }).click();
      await page.getByText("Crosswalk saved; 1 species hold a value with no state").waitFor();
      await screenshot(page, "modern-comparison-crosswalk");

      // Compare with the finished run.
      await page.getByRole("link", { name: "Back to modern comparison" }).click();
      const form = page.getByRole("form", { name: "Compare a list with a run" });
      await form.waitFor();
      await screenshot(page, "modern-comparison-lists");
      await expect.poll(() => form.getByLabel("Boundary of the run").locator("option").first().innerText()).toContain("(66.0 Ma)");
      await form.getByLabel("Name of the comparison").fill("Life habit today");
      await form.getByRole("button", { name: "Compare and save" }).click();

      // The results: caution first, the ROC curve, the counts kept out, and the species worth a look.
      await page.getByRole("heading", { level: 1, name: "Life habit today" }).waitFor();
      await page.getByRole("note").filter({ hasText: "A screening aid, not an assessment" }).waitFor();
      const chart = page.getByTestId("roc-chart");
      await chart.locator("svg").waitFor();
      expect(await chart.locator("svg").getAttribute("aria-label")).toContain("area under the curve 0.66");
      // Worked by hand (as in the API test): U = 10.5 of 16 pairs, AUC = 0.65625.
      await page.getByText("10.5 of 16 pairs = AUC").waitFor();
      const keptOut = await page.getByRole("list", { name: "Kept out of the comparison" }).innerText();
      expect(keptOut).toMatch(/DD\s*1\s*Data Deficient/);
      expect(keptOut).toMatch(/NE\s*1\s*Not Evaluated/);
      const worth = page.getByRole("table", { name: "Worth a look" });
      const rows = await worth.locator("tbody tr").allInnerTexts();
      expect(rows).toHaveLength(2);
      expect(rows[0]).toContain("Aulora minuta (invented)");
      expect(rows[1]).toContain("Zephyra lata (invented)");
      expect(rows[1]).toContain("0.75");
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "modern-comparison");

      // The printable report carries the same results and the caution, without the app's frame.
      await page.getByRole("link", { name: "Printable report" }).click();
      await page.getByText("Stratasieve · Modern comparison report").waitFor();
      await page.getByRole("note").filter({ hasText: "does not replace a formal threat assessment" }).waitFor();
      expect(await page.getByRole("navigation", { name: "Study" }).count()).toBe(0);
      await page.getByTestId("roc-chart").locator("svg").waitFor();
      // On paper the print button goes; the results stay.
      await page.emulateMedia({ media: "print" });
      expect(await page.getByRole("button", { name: "Print or save as PDF" }).isVisible()).toBe(false);
      expect(await page.getByRole("table", { name: "Worth a look" }).isVisible()).toBe(true);
      await screenshot(page, "modern-comparison-report");
    });
  });
});
