// Browser journey from raw finds: a study lead uploads an invented occurrence table on the Imports screen
// (one row's interval name is misspelt; the preview names its row and taxon and offers the chart's name, and
// leaving it out is an explicit choice), derives ranges from the finds, applies them, and reads the sampling
// completeness of the stages on both sides of the boundary on the Boundary screen, with its warning.
// Interval ages: ICS chart v2024/12 (Campanian 83.6-72.2, Maastrichtian 72.2-66.0, Danian 66.0-61.66 Ma).
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

// Vessicardia is found in all three stages; Basinopsis and Lentiella in the Campanian and Danian only
// (part-timers of the Maastrichtian); Tethyspira only in the Maastrichtian. Row 10 misspells its stage.
const CSV = [
  "taxon,clade,stage,locality",
  "Vessicardia alta,Invented bivalves,Campanian,V1",
  "Vessicardia alta,Invented bivalves,Maastrichtian,V2",
  "Vessicardia alta,Invented bivalves,Danian,V3",
  "Basinopsis lata,Invented gastropods,Campanian,V1",
  "Basinopsis lata,Invented gastropods,Danian,V3",
  "Lentiella minor,Invented gastropods,Campanian,V1",
  "Lentiella minor,Invented gastropods,Danian,V4",
  "Tethyspira ignota,Invented gastropods,Maastrichtian,V2",
  "Tethyspira ignota,Invented gastropods,Maastrichtain,V2",
].join("\n");

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-occurrences-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

describe("occurrences", () => {
  it("uploads finds, derives and applies ranges, and shows sampling completeness at the boundary", async () => {
    const { context } = browser;
    const { studyId } = await leadWithStudy(server.url, context.request, { label: "finds", name: "Invented Finds Lead" }, { name: "Invented Vessiran finds", description: "Invented example." });
    const csvPath = join(fileDir, "vessiran-finds.csv");
    writeFileSync(csvPath, CSV);

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "occurrences-journey", async () => {
      await page.goto(`${server.url}/studies/${studyId}/imports`);
      await page.getByRole("heading", { level: 1, name: "Imports" }).waitFor();
      await page.getByLabel("Occurrence file (CSV)").setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the occurrences" }).click();
      // The suggested mapping pairs taxon, clade (as higher taxon), stage (as early interval) and locality.
      await page.getByRole("button", { name: "Check every row" }).click();
      const problem = page.locator("[data-problem-row='10']");
      await problem.waitFor();
      expect(await problem.textContent()).toMatch(/Tethyspira ignota: Unknown interval name "Maastrichtain".*closest: .*Maastrichtian/);
      const write = page.getByRole("button", { name: /Write 8 occurrences/ });
      expect(await write.isDisabled()).toBe(true);
      await page.getByLabel(/Leave the 1 row with problems out/).check();
      await write.click();
      await page.getByText("8 occurrences written").waitFor();

      await page.getByRole("button", { name: "Preview the ranges" }).click();
      await page.locator("[data-range-taxon='Vessicardia alta']").waitFor();
      // Vessicardia alta: Campanian base 83.6 to Danian top 61.66.
      expect(await page.locator("[data-range-taxon='Vessicardia alta']").textContent()).toMatch(/new taxon.*83\.6.*61\.66/);
      // Its finds, drawn on the time axis under the range: three finds in three localities.
      await page.getByRole("button", { name: "Vessicardia alta" }).click();
      const finds = page.locator("[data-taxon-occurrences='Vessicardia alta']");
      await finds.waitFor();
      expect(await finds.textContent()).toMatch(/3 finds, 3 collections/);
      await page.getByRole("button", { name: "Apply 4 ranges" }).click();
      await page.getByText("Ranges applied").waitFor();

      await page.goto(`${server.url}/studies/${studyId}/boundary?unit=Danian`);
      const below = page.locator("[data-sampling-side='Stage below the boundary']");
      await below.waitFor();
      // Maastrichtian: 1 three-timer (Vessicardia), 2 part-timers: completeness 1 / 3 = 0.33.
      expect(await below.textContent()).toMatch(/Maastrichtian.*0\.33.*1 three-timers, 2 part-timers/);
      await page.getByText(/Sampling completeness of the Maastrichtian is low \(0\.33/).waitFor();
    });
  });
});
