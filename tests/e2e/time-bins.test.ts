// Browser journey on the study's own time bins: the empty screen explains what bins are for, a CSV file
// with an overlap shows the row and column at fault, a corrected file fills the table, saving stores the
// set, and the Codebook then counts the bins. Invented numbered slices of an invented basin.
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

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-time-bins-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

describe("time bins", () => {
  it("reads a file of slices, names the row at fault, saves the corrected set and counts it in the codebook", async () => {
    const { context } = browser;
    const { studyId } = await leadWithStudy(server.url, context.request, { label: "bins", name: "Invented Bins Lead" }, { name: "Invented slices", description: "Invented example." });
    const bad = join(fileDir, "slices-overlap.csv");
    writeFileSync(bad, "slice,base_ma,top_ma\n1,458.2,455\n2,456,452.8\n");
    const good = join(fileDir, "slices.csv");
    writeFileSync(good, "slice,base_ma,top_ma,chart_unit\n1,458.2,455,Sandbian\n2,455,452.8,Sandbian\n3,452.8,449,Katian\n");

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "time-bins-journey", async () => {
      await page.goto(`${server.url}/studies/${studyId}/codebook/time-bins`);
      await page.getByRole("heading", { name: "No time bins of this study's own" }).waitFor();
      await expect(page.getByText(/first among this study's time bins, then among the units of the ICS chart/).count()).resolves.toBeGreaterThan(0);

      await page.getByRole("button", { name: "Choose a CSV file…" }).click();
      await page.getByLabel("CSV file of time bins").setInputFiles(bad);
      await page.getByRole("button", { name: "Read the file" }).click();
      const problem = page.locator('[data-problem-row="3"]');
      await problem.waitFor();
      expect(await problem.textContent()).toMatch(/base_ma.*Overlaps row 2 “1”/);

      await page.getByRole("button", { name: "Choose a CSV file…" }).click();
      await page.getByLabel("CSV file of time bins").setInputFiles(good);
      await page.getByRole("button", { name: "Read the file" }).click();
      await page.getByText("3 bins read from slices.csv without problems").waitFor();
      expect(await page.locator("[data-bin-row]").count()).toBe(3);
      await page.getByRole("button", { name: "Save time bins" }).click();
      await page.getByText("3 time bins saved.").waitFor();

      await page.goto(`${server.url}/studies/${studyId}/codebook`);
      const summary = page.getByTestId("time-bins-summary");
      await summary.getByText(/3 bins, from 1 \(458\.2 Ma\) to 3 \(449\.0 Ma\)/).waitFor();
    });
  }, 120_000);
});
