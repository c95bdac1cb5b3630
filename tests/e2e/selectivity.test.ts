// Browser journey through the Selectivity and Runs screens, on an invented study with planted
// effects: a study lead places the boundary at the base of the Danian, chooses two traits and their
// reference states, reads the design, runs the tests, leaves the screen and comes back, reads the
// forest plot and the flagged trait, downloads the CSV and a chart, opens the printable report,
// and re-runs the analysis on today's data. The basin, its clades and taxa are invented.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Download, Page } from "playwright-core";
import { eq } from "drizzle-orm";
import { runs, taxa } from "../../db/schema/index";
import type { Run } from "../../shared/schemas/runs";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { startTestServer } from "../support/server";
import { NO_HABIT, NOT_AT_RISK, plantedTaxa, SPARED } from "../support/plantedSelectivity";
import { leadWithStudy } from "../support/leadWithStudy";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

const CAUTION = "Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.";

// ---------------------------------------------------------------- the invented study (tests/support/plantedSelectivity.ts)
const PLANTED = plantedTaxa("Sieveria");

// Worked by hand from the plan above (per hard-hit clade: 40 infaunal = 20 suspension (16 lost) +
// 20 deposit (12 lost), 10 epifaunal = 5 (4 lost) + 5 (3 lost); per spared clade: 10 infaunal =
// 5 (2 lost) + 5 (1 lost), 40 epifaunal = 20 (8 lost) + 20 (4 lost); the 10 without habit: 5 (2) + 5 (1)):
//   infaunal: 2 x 28 + 6 x 3 = 74 victims of 2 x 40 + 6 x 10 = 140, so 66 survivors;
//   epifaunal: 2 x 7 + 6 x 12 = 86 victims of 2 x 10 + 6 x 40 = 260, so 174 survivors;
//   victims in all 74 + 86 + 3 (no habit) = 163 of 410 at risk, 247 survivors.
const AT_RISK = 410;
const VICTIMS = 163;
const SURVIVORS = 247;

async function buildStudy(page: Page): Promise<{ studyId: string; userId: string }> {
  const { studyId, userId } = await leadWithStudy(
    server.url,
    page.request,
    { label: "selectivity-lead", name: "Invented Selectivity Lead" },
    { name: "Invented Orrent Basin crisis", description: "Invented example data with planted effects.", suggestedCodebook: true },
  );
  // The study asked for the suggested codebook, which holds both traits (and states no taxon here has).
  const codebook = await page.request.get(`${server.url}/api/studies/${studyId}/traits`);
  expect(codebook.status()).toBe(200);
  const byKey = new Map(((await codebook.json()) as { traits: Array<{ id: string; key: string }> }).traits.map((t) => [t.key, t.id]));
  const feeding = { id: byKey.get("feeding")! };
  const habit = { id: byKey.get("life_habit")! };
  // Survivors range across 66 Ma; victims are last seen at 67 Ma, inside the default window (the
  // Maastrichtian, 72.2-66 Ma on the ICS chart v2024/12); the taxa not at risk were gone long before.
  await server.ctx.db.insert(taxa).values([
    ...PLANTED.map((t) => ({
      studyId,
      name: t.name,
      higherTaxon: t.clade,
      fadMa: 70,
      ladMa: t.victim ? 67 : 60,
      traitValues: { [feeding.id]: t.feeding, ...(t.habit ? { [habit.id]: t.habit } : {}) },
    })),
    ...Array.from({ length: NOT_AT_RISK }, (_, k) => ({
      studyId,
      name: `Priscaria ${k + 1} (invented)`,
      higherTaxon: SPARED[1],
      fadMa: 100,
      ladMa: 90,
      traitValues: { [feeding.id]: "deposit", [habit.id]: "epifaunal" },
    })),
  ]);
  return { studyId, userId };
}

const cellTexts = async (page: Page, selector: string) =>
  (await page.locator(selector).locator("th, td").allInnerTexts()).map((text) => text.replace(/\s+/g, " ").trim());

async function savedText(download: Download): Promise<string> {
  const path = await download.path();
  return readFileSync(path, "utf8");
}

describe("selectivity screen", () => {
  it("configures a run, shows the design, runs it, shows the forest plot with the flagged trait, exports it, and re-runs it", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "selectivity", async () => {
      const { studyId, userId } = await buildStudy(page);
      await page.goto(`${server.url}/studies/${studyId}`);
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Selectivity" }).click();
      await page.getByRole("heading", { level: 1, name: "Selectivity" }).waitFor();
      await page.getByText("No boundary chosen yet.").waitFor();

      // A custom age the schema refuses names the field; then the base of the Danian from the chart.
      const addForm = page.getByRole("form", { name: "Add a boundary" });
      await addForm.getByText("Custom age", { exact: true }).click();
      await addForm.getByLabel("Boundary age (Ma)").fill("sixty-six");
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      await addForm.getByText("Boundary must be an age in Ma").waitFor();
      await addForm.getByText("Unit of the chart", { exact: true }).click();
      await addForm.getByLabel("Period", { exact: true }).selectOption("Paleogene");
      await addForm.getByLabel("Epoch", { exact: true }).selectOption("Paleocene");
      await addForm.getByLabel("Stage", { exact: true }).selectOption("Danian");
      await addForm.getByTestId("pending-boundary").filter({ hasText: "Base of the Danian stage, 66.0 Ma" }).waitFor();
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      const chosen = page.getByRole("list", { name: "Chosen boundaries" });
      // Default window: the Maastrichtian, 72.2 - 66 = 6.2 Myr (ICS chart v2024/12).
      expect(await chosen.innerText()).toContain("Base of the Danian");
      expect(await chosen.innerText()).toContain("the default, the Maastrichtian, 6.2 Myr");
      // The same boundary with a narrower window, to read the traits across two columns of the heat map.
      await addForm.getByLabel("Period", { exact: true }).selectOption("Paleogene");
      await addForm.getByLabel("Epoch", { exact: true }).selectOption("Paleocene");
      await addForm.getByLabel("Stage", { exact: true }).selectOption("Danian");
      await addForm.getByLabel(/^Window below the boundary/).fill("3");
      await addForm.getByLabel(/^Name in tables and figures/).fill("Danian, 3 Myr window");
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      expect(await chosen.locator("li").count()).toBe(2);
      expect(await chosen.innerText()).toContain("Window: 3.0 Myr"); // at least one decimal, as every age and duration (shared/format/ages.ts)

      // Both traits, each against the reference the planted effects were built on.
      await page.getByRole("checkbox", { name: /^Feeding mode/ }).check();
      await page.getByRole("checkbox", { name: /^Life habit/ }).check();
      await page.getByLabel("Reference state of Feeding mode").selectOption("deposit");
      await page.getByLabel("Reference state of Life habit").selectOption("epifaunal");

      // The design in words and numbers before running: 10 taxa without a life habit are dropped from its test.
      const design = page.getByTestId("design-summary");
      // Victims were last seen at 67 Ma, inside both windows (66-72.2 and 66-69 Ma), so both boundaries hold the same taxa.
      await design.getByText(`${AT_RISK} taxa at risk enter, ${VICTIMS} victims and ${SURVIVORS} survivors; ${NOT_AT_RISK} taxa not at risk stay out.`).first().waitFor();
      expect(await design.locator("[data-design-boundary]").count()).toBe(2);
      expect(await design.innerText()).toContain(`Life habit: ${AT_RISK - NO_HABIT} taxa (${VICTIMS - 3} victims, ${SURVIVORS - 7} survivors), ${NO_HABIT} taxa dropped for missing values.`);
      // Columns: trait, enter, victims, survivors, missing, unusable, reference.
      expect(await cellTexts(page, '[data-design-boundary] >> nth=0 >> tr[data-design-trait="life_habit"]')).toEqual(["Life habit Categorical", "400", "160", "240", "10", "0", "Epifaunal"]);

      // Run it under a name of its own.
      await page.getByLabel("Name of the run").fill("Planted effects (invented)");
      await page.getByRole("button", { name: "Run the tests" }).click();
      await page.waitForURL(/[?&]run=[0-9a-f-]{36}/);
      const runUrl = page.url();
      await page.getByTestId("run-name").filter({ hasText: "Planted effects (invented)" }).waitFor();

      // The screen stays usable: leave for the Boundary screen and come back to the same run.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
      await page.getByRole("heading", { level: 1, name: "Boundary" }).waitFor();
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Selectivity" }).click();
      await page.waitForURL(runUrl);
      await page.getByTestId("run-name").filter({ hasText: "Planted effects (invented)" }).waitFor();

      // The results: the caution first, then the forest plot with life habit flagged.
      const forest = page.getByTestId("forest-plot");
      await forest.waitFor({ timeout: 60_000 });
      await page.getByTestId("run-cautions").getByText(CAUTION).waitFor();
      expect(await forest.locator('[data-contrast="life_habit:Infaunal vs Epifaunal"]').getAttribute("data-flagged")).toBe("true");
      expect(await forest.locator('[data-contrast="life_habit:Infaunal vs Epifaunal"]').textContent()).toContain("Moves on adjustment: possible confounding");
      expect(await page.getByRole("img", { name: /Forest plot of odds ratios of extinction at Base of the Danian/ }).count()).toBe(1);

      // Life habit's table (worked by hand above): infaunal 74 of 140 lost = 52.9%, Wilson (1927) 95%
      // interval with z = 1.95996: centre (p + z²/2n)/(1 + z²/n) = 0.52781, half-width
      // z·sqrt(p(1-p)/n + z²/4n²)/(1 + z²/n) = 0.08158 -> 44.6% to 60.9%; epifaunal 86 of 260 = 33.1%.
      const habitCard = page.locator('[data-trait="life_habit"]');
      expect(await cellTexts(page, '[data-trait="life_habit"] tr[data-state="infaunal"]')).toEqual(["Infaunal", "74", "66", "52.9%", "44.6% to 60.9%"]);
      expect(await cellTexts(page, '[data-trait="life_habit"] tr[data-state="epifaunal"]')).toEqual(["Epifaunal reference", "86", "174", "33.1%", "27.6% to 39.0%"]);
      expect(await habitCard.getByText(/Fisher/).first().isVisible()).toBe(true);
      await page.getByTestId("proportion-chart-life_habit").locator("svg").waitFor();

      // The confounding check: crude odds ratio (74 x 174)/(66 x 86) = 2.27 (worked by hand, Woolf's
      // sample odds ratio); adjusted for clade it falls to 1.00, since both habits die alike in every
      // clade; flagged. Feeding mode keeps its within-clade odds ratio 8/3 = 2.67 on clade adjustment.
      const habitRow = page.locator('tr[data-confounding="life_habit"]');
      expect(await habitRow.getAttribute("data-flagged")).toBe("true");
      const habitCells = await cellTexts(page, 'tr[data-confounding="life_habit"]');
      expect(habitCells[0]).toBe("Life habit Flagged Infaunal vs Epifaunal");
      expect(habitCells[1]).toMatch(/^2\.27 /);
      expect(habitCells[2]).toMatch(/^1\.00 /);
      expect((await cellTexts(page, 'tr[data-confounding="feeding"]'))[2]).toMatch(/^2\.67 /);
      expect(await page.getByTestId("confounding-note-life_habit").innerText()).toContain("a shared cause, not necessarily an effect of the trait");

      // Two boundaries: the heat map of log odds ratios, traits by boundary. ln 2.2685 = 0.819 in both columns.
      const heat = page.locator("figure").filter({ has: page.getByTestId("log-odds-heat-map") });
      await heat.getByRole("img", { name: /Heat map of natural log odds ratios \(crude\), traits by boundary/ }).waitFor();
      await heat.getByText("Numbers behind the chart").click();
      const heatRow = heat.locator("tr").filter({ hasText: "Life habit: Infaunal vs Epifaunal" });
      expect((await heatRow.locator("td").allInnerTexts()).map((t) => t.trim())).toEqual(["OR 2.27 (ln 0.819)", "OR 2.27 (ln 0.819)"]);

      // The multiple regression is there with its numbers.
      const model = page.getByTestId("model");
      expect(await model.innerText()).toContain("AIC");
      expect(await model.locator("tr[data-term]").count()).toBe(2);

      // From the top, so the sticky bar sits above the page in the picture; without the passing notices.
      for (const dismiss of await page.getByRole("button", { name: "Dismiss" }).all()) await dismiss.click();
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "selectivity");

      // Export: the CSV of every table, with the parameters, the data hash and the caution.
      const [csv] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download CSV" }).click()]);
      expect(csv.suggestedFilename()).toMatch(/^planted-effects-invented_\d{4}-\d\d-\d\d_[0-9a-f]{12}\.csv$/);
      const csvText = await savedText(csv);
      expect(csvText.split("\r\n")[0].startsWith("table,field,value,")).toBe(true);
      expect(csvText).toMatch(/run,data_hash_sha256,[0-9a-f]{64}/);
      expect(csvText).toContain(CAUTION);
      expect(csvText).toContain("contrasts,,,66,");

      // The forest plot as an SVG file and as a PNG drawn in the browser.
      const forestFigure = page.locator("figure").filter({ has: forest });
      const [svgFile] = await Promise.all([page.waitForEvent("download"), forestFigure.getByRole("button", { name: "Download SVG" }).click()]);
      expect(svgFile.suggestedFilename()).toMatch(/_forest-plot\.svg$/);
      const svgText = await savedText(svgFile);
      expect(svgText.startsWith('<?xml version="1.0" encoding="UTF-8"?>')).toBe(true);
      expect(svgText).toContain('xmlns="http://www.w3.org/2000/svg"');
      expect(svgText).toContain("Life habit");
      const [pngFile] = await Promise.all([page.waitForEvent("download"), forestFigure.getByRole("button", { name: "Download PNG" }).click()]);
      expect(pngFile.suggestedFilename()).toMatch(/_forest-plot\.png$/);
      const png = readFileSync(await pngFile.path());
      // The PNG signature (ISO/IEC 15948, 5.2): 137 80 78 71 13 10 26 10.
      expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);

      // The printable report: parameters, the full data hash, the cautions and the figures; printing hides its navigation.
      const runId = new URL(runUrl).searchParams.get("run")!;
      const report = await browser.context.newPage();
      await report.goto(`${server.url}/studies/${studyId}/runs/${runId}/report`);
      const body = report.getByTestId("run-report");
      // Every boundary in full, one after the other, after the heat map.
      await body.getByTestId("forest-plot").nth(1).waitFor();
      expect(await body.getByTestId("forest-plot").count()).toBe(2);
      await body.getByTestId("log-odds-heat-map").locator("svg").first().waitFor();
      expect(await body.innerText()).toContain(CAUTION);
      expect(await body.getByTestId("run-parameters").innerText()).toMatch(/SHA-256 [0-9a-f]{64}/);
      await report.emulateMedia({ media: "print" });
      expect(await report.getByRole("navigation", { name: "Report" }).isVisible()).toBe(false);
      await report.emulateMedia({ media: "screen" });
      expect(await report.getByRole("navigation", { name: "Report" }).isVisible()).toBe(true);
      await report.close();

      // Runs: the run is listed as finished; a re-run on unchanged data reads the same data and moves nothing.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Runs" }).click();
      await page.getByRole("heading", { level: 1, name: "Runs" }).waitFor();
      const listed = page.locator('tr[data-run="Planted effects (invented)"]');
      expect(await listed.locator("[data-status]").getAttribute("data-status")).toBe("succeeded");
      await listed.getByRole("button", { name: "Re-run “Planted effects (invented)” on today’s data" }).click();
      await page.waitForURL((url) => url.searchParams.get("run") !== null && url.searchParams.get("run") !== runId);
      const rerunId = new URL(page.url()).searchParams.get("run")!;
      const changes = page.getByTestId("rerun-changes");
      await changes.waitFor({ timeout: 60_000 });
      expect(await changes.innerText()).toContain("Same data");
      expect(await changes.innerText()).toContain("No test result, odds ratio or verdict moved.");

      // The two runs side by side, chosen in the list.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Runs" }).click();
      await page.locator(`tr[data-run-id="${runId}"]`).getByRole("checkbox").check();
      await page.locator(`tr[data-run-id="${rerunId}"]`).getByRole("checkbox").check();
      await page.getByRole("button", { name: "Compare side by side" }).click();
      await page.waitForURL((url) => url.pathname.endsWith("/runs/compare") && url.searchParams.get("base") === runId && url.searchParams.get("run") === rerunId);
      const comparison = page.getByTestId("run-comparison");
      expect(await comparison.getByTestId("data-change").innerText()).toContain("Same data");
      await comparison.getByText("Same parameters.").waitFor();
      expect(await comparison.locator('[data-compare-trait][data-changed="true"]').count()).toBe(0);
      // The checks of the findings: both runs hold a robustness panel at each boundary, with the same verdicts.
      expect(await comparison.locator('[data-compare-check="robustness"]').count()).toBe(2);
      expect(await comparison.locator('[data-compare-check="robustness"]').first().innerText()).toBe("Same verdicts in both runs.");

      // A stored copy of the run with one robustness verdict turned and a sampling check the first
      // run lacks (invented for this test): the comparison names the turned verdict, and says the
      // sampling check is not in the earlier run rather than calling it a change.
      const stored = ((await (await page.request.get(`${server.url}/api/studies/${studyId}/runs/${runId}`)).json()) as Run).results!;
      if (stored.robustness?.status !== "computed") throw new Error("The run has no robustness panel");
      const habitContrast = stored.robustness.boundaries[0]!.panel!.contrasts.find((c) => c.traitKey === "life_habit")!;
      const before = habitContrast.verdict.crude.status;
      const turned = before === "holds" ? "never-there" : "holds";
      const edited = structuredClone(stored);
      if (edited.robustness?.status !== "computed") throw new Error("The run has no robustness panel");
      edited.robustness.boundaries[0]!.panel!.contrasts.find((c) => c.traitKey === "life_habit")!.verdict.crude = { status: turned, changedUnder: [], sentence: "Invented for this test." };
      edited.boundaries[0]!.sampling = {
        covariates: ["occurrences"],
        taxa: AT_RISK,
        withoutOccurrences: 0,
        covariateTerms: [],
        contrasts: [{ traitKey: "life_habit", traitLabel: "Life habit", state: "infaunal", contrast: habitContrast.contrast, withoutSampling: null, withSampling: null, verdict: "holds", words: "Invented for this test." }],
        note: null,
        method: "Invented for this test.",
        caution: "Invented for this test.",
      };
      const storedRun = (await (await page.request.get(`${server.url}/api/studies/${studyId}/runs/${runId}`)).json()) as Run;
      const [copy] = await server.ctx.db
        .insert(runs)
        .values({
          studyId,
          name: "Planted effects, verdicts invented",
          params: storedRun.params as unknown as Record<string, unknown>,
          appVersion: "invented",
          status: "succeeded",
          progress: 1,
          dataHash: storedRun.dataHash,
          rowCount: storedRun.rowCount,
          results: edited as unknown as Record<string, unknown>,
          createdBy: userId,
        })
        .returning();
      await page.goto(`${server.url}/studies/${studyId}/runs/compare?base=${runId}&run=${copy!.id}`);
      const turnedCheck = page.getByTestId("run-comparison").locator('[data-compare-check="robustness"]').first();
      await turnedCheck.waitFor();
      expect(await turnedCheck.getAttribute("data-changed")).toBe("true");
      const verdictWords = { holds: "holds", fragile: "fragile", "never-there": "never there", "not-estimated": "not estimated" } as const;
      expect(await turnedCheck.innerText()).toContain(`Life habit, ${habitContrast.contrast} (crude): ${verdictWords[before]} → ${verdictWords[turned]}`);
      const samplingCheck = page.getByTestId("run-comparison").locator('[data-compare-check="sampling"]');
      expect(await samplingCheck.innerText()).toBe("Not in the earlier run: it added no sampling covariates, or was saved before runs could.");
      expect(await samplingCheck.getAttribute("data-changed")).toBe("false");
      expect(await page.getByText("No test result, odds ratio or verdict differs between the two runs.").count()).toBe(0);
      // Show only what changed keeps the turned verdict and drops the boundary whose verdicts stand.
      await page.getByLabel("Show only what changed").check();
      expect(await page.getByTestId("run-comparison").locator('[data-compare-check="robustness"]').count()).toBe(1);
      await server.ctx.db.delete(runs).where(eq(runs.id, copy!.id));

      // A run that failed shows why, and a Retry computes it.
      const params = ((await (await page.request.get(`${server.url}/api/studies/${studyId}/runs/${runId}`)).json()) as { params: Record<string, unknown> }).params;
      const [failed] = await server.ctx.db
        .insert(runs)
        .values({
          studyId,
          name: "Planted effects, interrupted (invented)",
          params: { ...params, name: "Planted effects, interrupted (invented)" },
          appVersion: "invented",
          status: "failed",
          error: "Interrupted: the process computing this run stopped before it finished (invented for this test). Retry to compute it again.",
          createdBy: userId,
        })
        .returning();
      await page.goto(`${server.url}/studies/${studyId}/selectivity?run=${failed.id}`);
      const failure = page.getByTestId("run-failed");
      expect(await failure.innerText()).toContain("invented for this test");
      await failure.getByRole("button", { name: "Retry" }).click();
      await page.getByTestId("forest-plot").waitFor({ timeout: 60_000 });
      expect(await page.getByTestId("run-failed").count()).toBe(0);
    });
  });
});
