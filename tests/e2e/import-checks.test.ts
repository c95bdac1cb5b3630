// Browser journey: an occurrence file whose problems are not errors. The study declares "Indet." as
// missing; the preview shows what it read as missing, warns about an age that looks like an interval
// number (row and column named, the header being row 1), offers to read two spellings of one genus
// as one, and lists a qualified higher taxon; the finds are then written. Taxa and basin are invented.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { startTestServer } from "../support/server";
import { leadWithStudy } from "../support/leadWithStudy";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let fileDir: string;

// Rows 2-11 (header row 1). Row 3 spells Idiocrista in lower case; row 5's order is "Indet."; row 7's
// family is qualified; row 11 is dated "4" among ages of 450 to 470 Ma.
const CSV = [
  "taxon,higher_taxon,max_ma,min_ma",
  "Idiocrista,Strovelida,470,468",
  "idiocrista,Strovelida,466,464",
  "Ortambelites,Ortevida,468,466",
  "Platyvelia,Indet.,462,460",
  "Rafivelina,Strovelida,460,458",
  "Plaevomys,Anavelidae?,458,456",
  "Sowavella,Strovelida,456,454",
  "Dalvorella,Ortevida,454,452",
  "Hebrinella,Ortevida,452,450",
  "Glyptevis,Ortevida,4,3",
].join("\n");

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-import-checks-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

describe("import checks in the preview", () => {
  it("shows missing tokens read, age warnings by row, similar names with a choice, and qualified higher taxa", async () => {
    const { context } = browser;
    const { studyId } = await leadWithStudy(server.url, context.request, { label: "checks", name: "Invented Checks Lead" }, { name: "Invented checks", description: "Invented example." });
    const csvPath = join(fileDir, "invented-finds.csv");
    writeFileSync(csvPath, CSV);

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "import-checks", async () => {
      await page.goto(`${server.url}/studies/${studyId}/imports`);
      await page.getByRole("heading", { level: 1, name: "Imports" }).waitFor();
      // Declare the token in the Missing values card.
      await page.getByLabel("Missing-value tokens").fill("Indet.\n?");
      await page.getByRole("button", { name: "Save tokens" }).click();
      await page.getByText("Saved.").waitFor();

      await page.getByLabel("Occurrence file (CSV)").setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the occurrences" }).click();
      await page.getByRole("button", { name: "Check every row" }).click();

      const checks = page.getByRole("region", { name: "Warnings and name checks" });
      await checks.getByText("2 ages look implausible").waitFor();
      const warnings = checks.getByRole("table", { name: "Age warnings" });
      // Span from the file's own middle half: 20 ages, Q1 = 5th = 452, Q3 = 15th = 464 (nearest rank).
      expect(await warnings.textContent()).toMatch(/11max_maGlyptevis4 Ma looks like an interval number/);
      expect(await warnings.textContent()).toMatch(/11min_maGlyptevis3 Ma looks like an interval number/);
      expect(await checks.textContent()).toMatch(/1 cell read as missing.*Column higher_taxon: Indet\. 1 time \(row 5\)/);
      expect(await checks.textContent()).toMatch(/Anavelidae\? \(\? Anavelidae\): 1 row, first on row 7/);

      // Ten rows, ten names as written; reading "idiocrista" as "Idiocrista" leaves nine taxa.
      const taxa = page.locator("dt", { hasText: /^Taxa$/ }).locator("xpath=following-sibling::dd");
      expect(await taxa.textContent()).toBe("10");
      // The choice holds once the preview has been made again with it.
      await checks.getByLabel(/One taxon, spelt\s*Idiocrista$/).click();
      await page.waitForFunction(() => [...document.querySelectorAll("dt")].some((dt) => dt.textContent === "Taxa" && dt.nextElementSibling?.textContent === "9"));
      expect(await checks.getByLabel(/One taxon, spelt\s*Idiocrista$/).isChecked()).toBe(true);

      await page.getByRole("button", { name: /Write 10 occurrences/ }).click();
      await page.getByText("10 occurrences written").waitFor();
    });
    const list = await context.request.get(`${server.url}/api/studies/${studyId}/occurrences?taxon=idiocrista`);
    expect(((await list.json()) as { total: number }).total).toBe(0);
    const merged = await context.request.get(`${server.url}/api/studies/${studyId}/occurrences?taxon=Idiocrista`);
    expect(((await merged.json()) as { total: number }).total).toBe(2);
  });
});
