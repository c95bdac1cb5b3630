// The whole path from raw finds to a selectivity run, in a browser, starting from an empty study: a study
// lead uploads an invented occurrence table, previews the ranges it gives and applies them, opens one
// genus's finds from its trait-table row, codes a trait for every genus in the grid, reads survivors,
// victims and the sampling completeness of the stages around the base of the Danian on the Boundary
// screen (with the three-timer chart), and runs a selectivity test across that boundary with the sampling
// covariate (the number of occurrences, log scale), whose result says whether the trait's odds ratio holds.
// Every taxon and collection here is invented.
// Interval ages: ICS chart v2024/12 (Campanian 83.6-72.2, Maastrichtian 72.2-66.0, Danian 66.0-61.66 Ma).
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SUGGESTED_CODEBOOK } from "../../shared/codebook";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { startTestServer } from "../support/server";
import { leadWithStudy } from "../support/leadWithStudy";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let fileDir: string;

/**
 * Ten invented genera. Survivors (found in the Danian): Orvella, Pessina, Quarnia, Rostella, Sarnia.
 * Victims (last found in the Maastrichtian): Tumella, Ulvina, Varnia, Wessella, Xandra.
 * Maastrichtian three-timers (Campanian, Maastrichtian and Danian): Orvella, Quarnia; part-timer (Campanian
 * and Danian, not Maastrichtian): Pessina. Sampling completeness 2 / (2 + 1) = 0.67 (Alroy 2008).
 */
const CSV = [
  "genus,family,stage,site",
  "Orvella prima,Inventidae,Campanian,J1",
  "Orvella prima,Inventidae,Maastrichtian,J2",
  "Orvella prima,Inventidae,Danian,J3",
  "Pessina lata,Inventidae,Campanian,J1",
  "Pessina lata,Inventidae,Danian,J3",
  "Quarnia alta,Fictidae,Campanian,J1",
  "Quarnia alta,Fictidae,Maastrichtian,J4",
  "Quarnia alta,Fictidae,Danian,J5",
  "Rostella minor,Fictidae,Maastrichtian,J2",
  "Rostella minor,Fictidae,Danian,J5",
  "Sarnia nova,Inventidae,Maastrichtian,J4",
  "Sarnia nova,Inventidae,Danian,J3",
  "Tumella parva,Inventidae,Campanian,J1",
  "Tumella parva,Inventidae,Maastrichtian,J2",
  "Ulvina tenuis,Fictidae,Maastrichtian,J4",
  "Varnia plana,Fictidae,Campanian,J1",
  "Varnia plana,Fictidae,Maastrichtian,J2",
  "Wessella rara,Inventidae,Maastrichtian,J2",
  "Wessella rara,Inventidae,Maastrichtian,J4",
  "Xandra ultima,Fictidae,Campanian,J1",
  "Xandra ultima,Fictidae,Maastrichtian,J4",
].join("\n");

/** Feeding mode coded for each genus: mostly deposit feeders among the victims, suspension feeders among the survivors. */
const FEEDING: Record<string, string> = {
  "Orvella prima": "suspension",
  "Pessina lata": "suspension",
  "Quarnia alta": "suspension",
  "Rostella minor": "suspension",
  "Sarnia nova": "deposit",
  "Tumella parva": "deposit",
  "Ulvina tenuis": "deposit",
  "Varnia plana": "deposit",
  "Wessella rara": "deposit",
  "Xandra ultima": "suspension",
};

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  fileDir = mkdtempSync(join(tmpdir(), "stratasieve-finds-to-run-"));
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
  if (fileDir) rmSync(fileDir, { recursive: true, force: true });
});

const studyNav = (page: Page, name: string) => page.getByRole("navigation", { name: "Study" }).getByRole("link", { name, exact: true }).click();

describe("from finds to a selectivity run", () => {
  it("uploads occurrences, applies the ranges, codes a trait, reads the boundary with its sampling, and runs the test", async () => {
    const { context } = browser;
    const { studyId } = await leadWithStudy(
      server.url,
      context.request,
      { label: "finds-run", name: "Invented Finds Analyst" },
      { name: "Invented Jarrow finds", description: "Invented example." },
    );
    // The trait to code: the suggested feeding mode (added unless the new study's codebook already has it).
    const codebook = (await (await context.request.get(`${server.url}/api/studies/${studyId}/traits`)).json()) as { traits: Array<{ key: string }> };
    if (!codebook.traits.some((t) => t.key === "feeding")) {
      const feeding = SUGGESTED_CODEBOOK.find((t) => t.key === "feeding")!;
      const trait = await context.request.post(`${server.url}/api/studies/${studyId}/traits`, {
        data: { ...feeding, states: feeding.states.map((s) => ({ code: s.code, label: s.label })) },
      });
      expect(trait.status(), await trait.text()).toBe(201);
    }
    const csvPath = join(fileDir, "jarrow-finds-invented.csv");
    writeFileSync(csvPath, CSV);

    const page = await context.newPage();
    await withScreenshotOnFailure(context, "finds-to-run", async () => {
      // An empty study: no taxa yet.
      await page.goto(`${server.url}/studies/${studyId}/table`);
      await page.getByRole("heading", { level: 1, name: "Trait table" }).waitFor();
      expect(await page.getByRole("grid", { name: "Trait table" }).count()).toBe(0);

      // Upload the finds: the suggested mapping pairs genus, family, stage (early interval) and site (collection).
      await page.goto(`${server.url}/studies/${studyId}/imports`);
      await page.getByLabel("Occurrence file (CSV)").setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the occurrences" }).click();
      await page.getByRole("button", { name: "Check every row" }).click();
      await page.getByRole("button", { name: /Write 21 occurrences/ }).click();
      await page.getByText("21 occurrences written").waitFor();

      // Preview the ranges (ten new genera) and apply them all.
      await page.getByRole("button", { name: "Preview the ranges" }).click();
      const orvella = page.locator("[data-range-taxon='Orvella prima']");
      await orvella.waitFor();
      // Campanian base 83.6 to Danian top 61.66, from three finds in three sites.
      expect(await orvella.textContent()).toMatch(/new taxon.*83\.6.*61\.66.*3 · 3/);
      await page.getByRole("button", { name: "Apply 10 ranges" }).click();
      await page.getByText("Ranges applied").waitFor();

      // The trait table now holds the ten genera, each with its finds and collections counted.
      await studyNav(page, "Trait table");
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.waitFor();
      const cell = (taxon: string, column: string) => grid.locator(`[role=row][data-taxon="${taxon}"] [role=gridcell][data-column="${column}"]`);
      await expect.poll(() => cell("Wessella rara", "Finds").innerText()).toMatch(/^2/);
      expect(await cell("Wessella rara", "Collections").innerText()).toMatch(/^2/);
      // From the keyboard: Enter on a Finds cell opens that genus's finds on the time axis.
      await cell("Orvella prima", "Finds").click();
      await page.keyboard.press("Enter");
      const findsDialog = page.getByRole("dialog", { name: "Finds of Orvella prima" });
      await findsDialog.locator("[data-taxon-occurrences='Orvella prima']").getByText("Orvella prima: 3 finds, 3 collections").waitFor();
      await screenshot(page, "finds-to-run-taxon-finds");
      await findsDialog.getByRole("button", { name: "Close" }).click();
      await findsDialog.waitFor({ state: "hidden" });

      // Code the feeding mode of every genus in the grid (empty cells: no reason asked).
      for (const [taxon, state] of Object.entries(FEEDING)) {
        await cell(taxon, "Feeding mode").click();
        await page.keyboard.press("Enter");
        await page.getByLabel(`Feeding mode of ${taxon}`).fill(state);
        await page.keyboard.press("Enter");
        await expect.poll(() => cell(taxon, "Feeding mode").locator("[data-cell-value]").textContent(), { timeout: 10_000 }).toMatch(new RegExp(state, "i"));
      }

      // The base of the Danian: five survivors, five victims, and how well the Maastrichtian was sampled.
      await page.goto(`${server.url}/studies/${studyId}/boundary?unit=Danian`);
      const tiles = page.locator('[aria-label="Outcome counts"] > div');
      await tiles.first().waitFor();
      const count = async (label: string) => (await tiles.filter({ has: page.locator("dt", { hasText: label }) }).locator("dd").first().innerText()).trim();
      await expect.poll(() => count("Survivors")).toBe("5");
      expect(await count("Victims")).toBe("5");
      const below = page.locator("[data-sampling-side='Stage below the boundary']");
      await below.waitFor();
      expect(await below.textContent()).toMatch(/Maastrichtian.*0\.67.*2 three-timers, 1 part-timers/);
      const sampling = page.getByRole("region", { name: "Sampling and rates from the finds" });
      await sampling.getByText("Numbers behind the charts").click();
      const maastrichtian = sampling.locator("tr[data-stage='Maastrichtian']");
      expect(await maastrichtian.innerText()).toMatch(/0\.67/);
      await sampling.getByTestId("three-timer-completeness-chart").waitFor();
      await sampling.getByText("A poorly sampled stage inflates the apparent extinction before it").waitFor();
      await screenshot(page, "finds-to-run-boundary");

      // A selectivity run across the same boundary, testing the feeding mode.
      await studyNav(page, "Selectivity");
      const addForm = page.getByRole("form", { name: "Add a boundary" });
      await addForm.getByLabel("Period", { exact: true }).selectOption("Paleogene");
      await addForm.getByLabel("Epoch", { exact: true }).selectOption("Paleocene");
      await addForm.getByLabel("Stage", { exact: true }).selectOption("Danian");
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      await page.getByRole("list", { name: "Chosen boundaries" }).getByText("Base of the Danian").waitFor();
      await page.getByRole("checkbox", { name: /^Feeding mode/ }).check();
      await page.getByLabel("Reference state of Feeding mode").selectOption("suspension");
      await page.getByTestId("design-summary").getByText("5 victims and 5 survivors").first().waitFor();
      // With the sampling covariate: how often each genus was found, on a log scale.
      await page.getByRole("checkbox", { name: "Number of occurrences (log scale)" }).check();
      await page.getByLabel("Name of the run").fill("Feeding at the Danian from the finds (invented)");
      await page.getByRole("button", { name: "Run the tests" }).click();
      await page.waitForURL(/[?&]run=[0-9a-f-]{36}/);
      const forest = page.getByTestId("forest-plot");
      await forest.waitFor({ timeout: 60_000 });
      expect(await forest.locator('[data-contrast^="feeding:"]').count()).toBeGreaterThan(0);
      // The result says whether the feeding mode's odds ratio holds once sampling is allowed for (every genus here has finds).
      await page.getByTestId("sampling-check").waitFor();
      await page.getByText("Does it hold once sampling is allowed for?", { exact: false }).first().waitFor();
      await page.getByText("Every victim and survivor has at least one find.", { exact: false }).first().waitFor();
      await screenshot(page, "finds-to-run-run");
    });
  });
});
