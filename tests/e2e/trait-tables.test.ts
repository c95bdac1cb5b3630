// Browser journey through trait tables: a study lead imports a CSV file through the three steps
// (one row has a state the codebook does not know; the preview lists it by row and column, and
// leaving it out is an explicit choice), then fixes a wrong value in the grid from the keyboard
// with a reason, and reads that change in the cell's history. Every taxon, clade and value is
// invented.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { startTestServer } from "../support/server";
import { leadWithStudy } from "../support/leadWithStudy";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let fileDir: string;

// Row 5 (the header is row 1) holds a feeding mode outside the suggested codebook. Vessiraspis
// minor's body size of 120 mm is the slip fixed later in the grid (12 mm).
const CSV = [
  "taxon,clade,first,last,environment,habit,feeding,size_mm,notes",
  "Vessiraspis minor,Invented brachiopods,Cenomanian,Turonian,marine,epifaunal,suspension,120,invented example",
  "Tethyconcha lata,Invented bivalves,99.0,94.5,marine,infaunal,deposit,35,invented example",
  "Basinella profunda,Invented gastropods,Albian,Cenomanian,Marine,Epifaunal,grazer,NA,invented example",
  "Umbrachiton ignotus,Invented chitons,Cenomanian,Turonian,marine,epifaunal,photosynthetic,8,invented example",
].join("\n");

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-csv-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

/** A signed-in study lead (through the API, with the browser's cookie jar) and a new study. */
async function studyWithLead(name: string) {
  return leadWithStudy(
    server.url,
    browser.context.request,
    { label: "lead", name },
    { name: "Invented Vessiran Basin crisis", description: "Invented example study.", suggestedCodebook: true },
  );
}

describe("trait tables", () => {
  it("imports a CSV in three steps, skipping the bad row explicitly, then fixes a value in the grid with a reason and reads it in the cell's history", async () => {
    const { context } = browser;
    // The session is made through the API; the screens are the subject here.
    const { studyUrl } = await studyWithLead("Invented Study Lead");
    const csvPath = join(fileDir, "vessiran-taxa.csv");
    writeFileSync(csvPath, CSV);

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "trait-tables-import", async () => {
      // The study was created with the suggested codebook.
      await page.goto(`${studyUrl}/codebook`);
      await page.getByRole("heading", { level: 1, name: "Codebook" }).waitFor();
      const inUse = page.getByRole("region", { name: "Traits in use" });
      for (const label of ["Environment", "Life habit", "Feeding mode", "Body size", "Geographic range"]) {
        await inUse.getByRole("heading", { level: 3, name: label }).waitFor();
      }

      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Imports" }).click();
      await page.getByRole("heading", { level: 1, name: "Imports" }).waitFor();
      expect(await page.getByText("Up to 50 MB").count()).toBe(1);
      await page.getByLabel("CSV file", { exact: true }).setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the file" }).click();

      // Step 1: map the columns (set explicitly; the suggestion is the server's guess).
      const mapping = page.getByRole("form", { name: "Map the columns" });
      await mapping.waitFor();
      await mapping.getByLabel("Name", { exact: true }).selectOption("taxon");
      await mapping.getByLabel("Higher taxon").selectOption("clade");
      await mapping.getByLabel("First appearance").selectOption("first");
      await mapping.getByLabel("Last appearance").selectOption("last");
      await mapping.getByLabel("Notes").selectOption("notes");
      await mapping.getByLabel("Environment").selectOption("environment");
      await mapping.getByLabel("Life habit").selectOption("habit");
      await mapping.getByLabel("Feeding mode").selectOption("feeding");
      await mapping.getByLabel("Body size").selectOption("size_mm");
      await mapping.getByLabel("Geographic range").selectOption("");
      await mapping.getByRole("button", { name: "Check every row" }).click();

      // Step 2: the bad cell is listed by spreadsheet row and CSV column.
      const problems = page.getByRole("region", { name: /1 problem in 1 row/ });
      await problems.waitFor();
      const problem = problems.locator("[data-problem-row='5']");
      const cells = await problem.locator("td").allInnerTexts();
      expect(cells[0]).toBe("5");
      expect(cells[1]).toBe("feeding");
      expect(cells[2]).toContain("photosynthetic");
      const counts = page.getByRole("definition");
      expect(await counts.allInnerTexts()).toEqual(["4", "3", "1", "3", "0", "0"]);
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "imports-preview");

      // Step 3: committing without choosing what happens to the bad row is refused in words.
      const commit = page.getByRole("form", { name: "Commit the import" });
      await commit.getByRole("button", { name: "Import 3 rows" }).click();
      await commit.getByText("Tick the box to leave out the 1 invalid row").waitFor();
      await commit.getByLabel(/Leave out the 1 invalid row listed above/).check();
      await commit.getByRole("button", { name: "Import 3 rows" }).click();
      await page.getByText("Imported vessiran-taxa.csv").waitFor();
      expect(await page.getByRole("status").filter({ hasText: "Imported vessiran-taxa.csv" }).innerText()).toContain("3 taxa added");

      // The import history names the file, who imported it, and its counts.
      const history = page.locator("[data-import-file='vessiran-taxa.csv']");
      await history.getByText("Committed").waitFor();
      const historyText = await history.innerText();
      expect(historyText).toContain("Invented Study Lead");
      expect(historyText).toContain("3 added");
      expect(historyText).toContain("1 invalid left out");
    });

    await withScreenshotOnFailure(context, "trait-tables-grid", async () => {
      await page.getByRole("link", { name: "Open the trait table" }).click();
      await page.waitForURL(`${studyUrl}/table`);
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.waitFor();
      await page.getByText("Taxa 1–3 of 3").waitFor();
      // The skipped row never reached the table; sorted by name.
      const names = await grid.locator("[role=row][data-taxon]").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-taxon")));
      expect(names).toEqual(["Basinella profunda", "Tethyconcha lata", "Vessiraspis minor"]);

      const cell = (taxon: string, column: string) => grid.locator(`[role=row][data-taxon="${taxon}"] [role=gridcell][data-column="${column}"]`);
      const shown = (taxon: string, column: string) => cell(taxon, column).locator("[data-cell-value]").textContent();
      // A missing value reads "missing" to a screen reader, not an empty cell.
      expect(await shown("Basinella profunda", "Body size")).toContain("missing");
      expect(await shown("Basinella profunda", "Life habit")).toBe("Epifaunal");
      expect(await shown("Vessiraspis minor", "First appearance")).toContain("Cenomanian");

      // Keyboard: arrows move the focused cell.
      await cell("Vessiraspis minor", "Feeding mode").click();
      await page.keyboard.press("ArrowRight");
      expect(await page.evaluate(() => document.activeElement?.getAttribute("data-column"))).toBe("Body size");
      expect(await shown("Vessiraspis minor", "Body size")).toBe("120 mm");
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "trait-table");

      // Enter edits; a value outside the codebook's rule is refused in the cell, Esc cancels.
      await page.keyboard.press("Enter");
      const editor = page.getByLabel("Body size of Vessiraspis minor");
      await editor.fill("-4");
      await page.keyboard.press("Enter");
      await page.getByRole("alert").filter({ hasText: "below the minimum" }).waitFor();
      await page.keyboard.press("Escape");
      expect(await shown("Vessiraspis minor", "Body size")).toBe("120 mm");

      // Replacing a recorded value asks why; giving up there leaves the value, and the focus on
      // the cell (Enter would otherwise have moved it to the row below).
      await cell("Tethyconcha lata", "Body size").click();
      await page.keyboard.press("Enter");
      await page.getByLabel("Body size of Tethyconcha lata").fill("3.5");
      await page.keyboard.press("Enter");
      const ask = page.getByRole("dialog", { name: "Why change this value?" });
      await ask.waitFor();
      await page.keyboard.press("Escape");
      await ask.waitFor({ state: "hidden" });
      const focused = () =>
        page.evaluate(() => ({ column: document.activeElement?.getAttribute("data-column"), row: document.activeElement?.closest("[role=row]")?.textContent ?? "" }));
      await expect.poll(async () => (await focused()).column).toBe("Body size");
      expect((await focused()).row).toContain("Tethyconcha lata");
      expect(await shown("Tethyconcha lata", "Body size")).toBe("35 mm");

      await cell("Vessiraspis minor", "Body size").click();
      await page.keyboard.press("Enter");
      await editor.fill("12");
      await page.keyboard.press("Enter");
      await ask.waitFor();
      expect(await ask.innerText()).toContain("120 mm");
      await ask.getByRole("button", { name: "Save change" }).click();
      await ask.getByText("A reason is required").waitFor();
      await ask.getByLabel("Reason").fill("Decimal slip: the invented source gives 12 mm");
      await ask.getByRole("button", { name: "Save change" }).click();
      await ask.waitFor({ state: "hidden" });
      await expect.poll(() => shown("Vessiraspis minor", "Body size")).toBe("12 mm");

      // The cell's history: who, when, from what, to what, and why; the import's value below it.
      await cell("Vessiraspis minor", "Body size").click();
      await page.getByRole("button", { name: "History of Body size for Vessiraspis minor" }).click();
      const panel = page.getByRole("dialog", { name: "Body size of Vessiraspis minor" });
      await panel.getByText("Decimal slip: the invented source gives 12 mm").waitFor();
      const entries = await panel.getByRole("list", { name: "Changes, newest first" }).getByRole("listitem").allInnerTexts();
      expect(entries).toHaveLength(2);
      expect(entries[0]).toContain("Changed · Invented Study Lead");
      expect(entries[0]).toMatch(/120 mm\s*→\s*to\s*12 mm|120 mm\s*→\s*12 mm/);
      expect(entries[1]).toContain("Recorded · Invented Study Lead");
      expect(entries[1]).toContain("From the import of vessiran-taxa.csv");
      // Only the value's own change is reverted from a cell; adding the taxon is undone with its import.
      expect(entries[0]).toContain("Revert this change…");
      expect(entries[1]).toContain("Recorded when the taxon was added.");
      expect(entries[1]).not.toContain("Revert this change…");
      await screenshot(page, "trait-table-history");
    });
  });

  it("moves the values of a removed state where the codebook editor is told, filters by state, edits a selection with one reason, and settles a conflicting edit", async () => {
    const { context } = browser;
    const { studyId, studyUrl } = await studyWithLead("Invented Second Lead");
    const api = `${server.url}/api/studies/${studyId}`;
    const traits = ((await (await context.request.get(`${api}/traits`)).json()) as { traits: Array<{ id: string; key: string }> }).traits;
    const traitId = (key: string) => traits.find((t) => t.key === key)!.id;
    const habit = traitId("life_habit");
    const feeding = traitId("feeding");
    const taxa = [
      ["Nektoteuthis vaga", "nektonic", "predator"],
      ["Planctella levis", "planktonic", "suspension"],
      ["Fossorina alta", "infaunal", "deposit"],
    ] as const;
    const ids: Record<string, string> = {};
    for (const [name, lifeHabit, feedingMode] of taxa) {
      const res = await context.request.post(`${api}/taxa`, { data: { name, higherTaxon: "Invented clade", values: { [habit]: lifeHabit, [feeding]: feedingMode } } });
      expect(res.status()).toBe(201);
      ids[name] = ((await res.json()) as { taxon: { id: string } }).taxon.id;
    }

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "trait-tables-codebook", async () => {
      // Removing a state that a taxon holds: the editor names the taxon and asks where its value goes.
      await page.goto(`${studyUrl}/codebook`);
      await page.getByRole("button", { name: "Edit Life habit" }).click();
      const editor = page.getByRole("form", { name: "Edit “Life habit”" });
      const nektonicRow = await editor.getByLabel(/^Code of state \d+$/).evaluateAll((inputs) => inputs.findIndex((i) => (i as HTMLInputElement).value === "nektonic"));
      await editor.getByRole("button", { name: `Remove state ${nektonicRow + 1}` }).click();
      await editor.getByRole("button", { name: "Save trait" }).click();
      const remap = editor.locator("[data-removed-state='nektonic']");
      await remap.waitFor();
      expect(await remap.innerText()).toContain("held by 1 taxon");
      expect(await remap.innerText()).toContain("Nektoteuthis vaga");
      await editor.getByRole("button", { name: "Save and move the values" }).click();
      await editor.getByText("Choose where the values “nektonic” go").waitFor();
      await editor.getByLabel("Move the values “nektonic” to").selectOption("planktonic");
      await editor.getByLabel("Reason for moving these values").fill("Invented review: nektonic merged into planktonic");
      await editor.getByRole("button", { name: "Save and move the values" }).click();
      await page.getByText("Saved “Life habit”; 1 value moved.").waitFor();
      const states = await page.getByRole("list", { name: "States of Life habit" }).innerText();
      expect(states).not.toContain("nektonic");
    });

    await withScreenshotOnFailure(context, "trait-tables-filter-bulk", async () => {
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Trait table" }).click();
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.waitFor();
      const filters = page.getByRole("region", { name: "Filters" });
      await filters.getByLabel("Filter column").selectOption({ label: "Life habit" });
      await filters.getByLabel("Value").selectOption({ label: "Planktonic" });
      await filters.getByRole("button", { name: "Add filter" }).click();
      await page.getByText("Taxa 1–2 of 2").waitFor();
      const names = () => grid.locator("[role=row][data-taxon]").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-taxon")));
      expect(await names()).toEqual(["Nektoteuthis vaga", "Planctella levis"]);

      // Both shown taxa get one feeding mode, with one reason. They can be selected by the page's
      // checkbox, or as every taxon the filter matches (which reaches beyond the page).
      await grid.getByRole("checkbox", { name: "Select every taxon on this page" }).check();
      await page.getByText("2 taxa selected").waitFor();
      await page.getByRole("button", { name: "Clear selection" }).click();
      await page.getByRole("button", { name: "Select all 2 matching" }).click();
      await page.getByText("2 taxa selected").waitFor();
      await page.getByRole("button", { name: "Edit selected…" }).click();
      const bulk = page.getByRole("dialog", { name: "Edit 2 selected taxa" });
      await bulk.getByLabel("Column").selectOption({ label: "Feeding mode" });
      await bulk.getByLabel("New value").selectOption("grazer");
      await bulk.getByLabel("Reason").fill("Invented re-reading of radula wear");
      await bulk.getByRole("button", { name: "Apply to 2 taxa" }).click();
      await page.getByText("Changed 2 taxa.").waitFor();
      const feedingOf = (taxon: string) => grid.locator(`[role=row][data-taxon="${taxon}"] [data-column="Feeding mode"] [data-cell-value]`).textContent();
      await expect.poll(() => feedingOf("Planctella levis")).toBe("Grazer");
      expect(await feedingOf("Nektoteuthis vaga")).toBe("Grazer");

      await filters.getByRole("button", { name: "Clear all filters" }).click();
      await page.getByText("Taxa 1–3 of 3").waitFor();
    });

    await withScreenshotOnFailure(context, "trait-tables-conflict", async () => {
      // Someone else changes Fossorina alta's feeding mode after the page loaded it.
      const grid = page.getByRole("grid", { name: "Trait table" });
      const current = (await (await context.request.get(`${api}/taxa/${ids["Fossorina alta"]}`)).json()) as { version: number };
      const other = await context.request.patch(`${api}/taxa/${ids["Fossorina alta"]}`, {
        data: { version: current.version, changes: { values: { [feeding]: "suspension" } }, reason: "Invented second opinion" },
      });
      expect(other.status()).toBe(200);

      const cell = grid.locator('[role=row][data-taxon="Fossorina alta"] [data-column="Feeding mode"]');
      await cell.click();
      await page.keyboard.press("Enter");
      await page.getByLabel("Feeding mode of Fossorina alta").fill("predator");
      await page.keyboard.press("Enter");
      const ask = page.getByRole("dialog", { name: "Why change this value?" });
      await ask.getByLabel("Reason").fill("Invented: teeth of a predator");
      await ask.getByRole("button", { name: "Save change" }).click();

      const conflict = page.getByRole("dialog", { name: "This value was changed meanwhile" });
      await conflict.waitFor();
      const row = await conflict.getByRole("row", { name: /Feeding mode/ }).innerText();
      expect(row).toContain("Predator");
      expect(row).toContain("Suspension feeder");
      expect(row).toContain("Invented Second Lead");
      expect(row).toContain("Invented second opinion");
      await conflict.getByRole("button", { name: "Keep my value" }).click();
      await conflict.waitFor({ state: "hidden" });
      await expect.poll(() => cell.locator("[data-cell-value]").textContent()).toBe("Predator");
      const saved = (await (await context.request.get(`${api}/taxa/${ids["Fossorina alta"]}`)).json()) as { values: Record<string, string> };
      expect(saved.values[feeding]).toBe("predator");
    });
  });
});
