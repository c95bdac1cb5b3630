// How results read and look, on the invented demo study (scripts/seed/demo): one meaning per colour
// (clay red: more extinction than the reference, teal: less, grey: the reference), heat-map row
// labels whole, the regression's fit in the app's own words, confounding notes said once, units as
// a scientist writes them, the modern comparison's mini-plots with ticks, and the "queued" toast
// leaving as soon as the results show. Colours are checked against src/components/chartColours.ts.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { COMPARISON_COLOUR, REFERENCE_COLOUR, RISK_COLOUR } from "../../src/components/chartColours";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
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
  await signInAs(browser.context, server.url, demo.account.owner);
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** A "#rrggbb" colour as nivo writes it into the SVG: "rgba(r, g, b, 1)". */
function rgba(hex: string): string {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16));
  return `rgba(${r}, ${g}, ${b}, 1)`;
}

/** Fills of a chart's bars, left to right (nivo draws each bar as a rect; grid lines are lines). */
async function barFills(page: Page, testId: string): Promise<string[]> {
  return page.getByTestId(testId).locator("svg").first().evaluate((svg) =>
    [...svg.querySelectorAll("rect")]
      .filter((r) => Number(r.getAttribute("width")) > 0 && Number(r.getAttribute("height")) > 0 && r.getAttribute("fill") && r.getAttribute("fill") !== "transparent")
      .map((r) => ({ x: r.getBoundingClientRect().x, fill: (r.getAttribute("fill") ?? "").toLowerCase() }))
      .sort((a, b) => a.x - b.x)
      .map((r) => r.fill),
  );
}

describe("results and charts", () => {
  it("shows the sweep run's heat map with whole row labels and a colour legend, and the regression's fit in plain words", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "results-look-sweep", async () => {
      await page.goto(`${demo.studyUrl}/selectivity?run=${demo.analyses.sweepRunId}`);
      const heat = page.getByTestId("log-odds-heat-map");
      await heat.locator("svg").first().waitFor({ timeout: 60_000 });

      // Every row label is whole (no "…"), wraps inside the room left of the map, and carries its full text as a tooltip.
      const labels = await heat.locator("[data-row-label]").evaluateAll((nodes) =>
        nodes.map((n) => ({ full: n.getAttribute("data-row-label") ?? "", shown: n.querySelector("text")?.textContent ?? "", title: n.querySelector("title")?.textContent ?? "", left: n.getBoundingClientRect().left })),
      );
      expect(labels.length).toBeGreaterThan(5);
      const box = (await heat.boundingBox())!;
      for (const label of labels) {
        expect(label.shown.includes("…"), label.full).toBe(false);
        expect(label.shown.replace(/\s+/g, ""), label.full).toBe(label.full.replace(/^◆\s*/, "◆").replace(/\s+/g, ""));
        expect(label.title).toBe(label.full);
        expect(label.left).toBeGreaterThanOrEqual(box.x - 1);
      }
      const deposit = labels.find((l) => l.full.includes("Deposit feeder vs Suspension feeder"));
      expect(deposit, "the row that was cut before").toBeDefined();
      // The whole label is in the chart's accessible name too.
      expect(await heat.locator("svg[role='img']").first().getAttribute("aria-label")).toContain("Feeding mode: Deposit feeder vs Suspension feeder");
      // Boundary names over the columns carry their full name as a tooltip.
      expect(await heat.locator("[data-column-label] title").allTextContents()).toContain("Base of the Upper Cretaceous (100.5 Ma)");

      // The heat map says what its colours mean, with the colours of the one palette.
      const legend = page.getByRole("list", { name: "Colours of the heat map" });
      expect(await legend.locator(`[data-colour="${RISK_COLOUR.higher}"]`).innerText()).toContain("Raised the odds");
      expect(await legend.locator(`[data-colour="${RISK_COLOUR.lower}"]`).innerText()).toContain("Lowered");

      // The regression's fit: plain labels first, the technical names beside them; every number kept.
      const fit = page.getByTestId("model-fit");
      const fitText = await fit.innerText();
      for (const words of ["Model fit", "Taxa in the model", "Misfit with no traits", "null deviance", "Misfit left with the traits", "residual deviance", "Akaike information criterion (AIC)"]) {
        expect(fitText).toContain(words);
      }
      const model = page.getByTestId("model");
      const headings = (await model.locator("thead th").allInnerTexts()).map((t) => t.replace(/\s+/g, " ").trim().toLowerCase());
      expect(headings.slice(0, 5)).toEqual(["term", "what the term does to the odds of extinction", "on the log-odds scale", "odds ratio", "95% interval"]);
      expect(headings.some((h) => h.includes("standard error"))).toBe(true);
      expect(headings.some((h) => h.includes("wald z"))).toBe(true);

      // A note shared by every contrast (the regression being Firth's at this boundary) is said once.
      const check = page.getByTestId("confounding-check");
      const firth = await check.getByText("The multiple regression is Firth's", { exact: false }).count();
      expect(firth).toBe(1);
      expect(await check.getByText(/^Every contrast: The multiple regression is Firth's/).count()).toBe(1);

      // Units: one region is "1 region", a span "3–4 regions"; a step is "per 1 region".
      const range = page.locator('[data-trait="geographic_range"]');
      const rows = (await range.locator("tbody tr th").allInnerTexts()).map((t) => t.trim());
      expect(rows[0]).toBe("1 region");
      expect(rows.some((r) => /^\d+–\d+ regions$/.test(r))).toBe(true);
      expect(await range.innerText()).not.toMatch(/\b1 regions\b/);
      expect(await page.locator("body").innerText()).not.toMatch(/per 1 regions|per 1 count|\.: /);
    });
    await page.close();
  }, 120_000);

  it("colours each per-trait bar by what the state did against the reference, as the heat map does", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "results-look-bars", async () => {
      await page.goto(`${demo.studyUrl}/selectivity?run=${demo.analyses.crisisRunId}`);
      const chart = page.getByTestId("proportion-chart-life_habit");
      await chart.locator("svg").first().waitFor({ timeout: 60_000 });
      // The shares lost, from the table beside the chart (reference first).
      const table = page.locator('[data-trait="life_habit"] tbody tr[data-state]');
      const shares = (await table.evaluateAll((rows) => rows.map((r) => ({ reference: r.textContent?.includes("reference") ?? false, share: Number(r.querySelectorAll("td")[2]?.textContent?.replace("%", "")) })))) as Array<{ reference: boolean; share: number }>;
      const reference = shares.find((s) => s.reference)!;
      const expected = shares.map((s) => rgba(s.reference ? REFERENCE_COLOUR : s.share > reference.share ? RISK_COLOUR.higher : RISK_COLOUR.lower));
      expect(await barFills(page, "proportion-chart-life_habit")).toEqual(expected);
      // Infaunal lost far more than epifaunal at this crisis: clay red, never the teal of "lowered the odds".
      const infaunal = shares.findIndex((_, i) => i > 0 && expected[i] === rgba(RISK_COLOUR.higher));
      expect(infaunal).toBeGreaterThan(0);
      const legend = chart.getByRole("list", { name: "Colours of the bars of Life habit" });
      expect(await legend.innerText()).toContain("Reference state");
      expect(await legend.innerText()).toContain("More lost than the reference");
      // A numeric trait's quarters have no reference: neutral bars, neither red nor teal.
      const sizeFills = await barFills(page, "proportion-chart-body_size");
      expect(sizeFills.length).toBeGreaterThan(0);
      for (const fill of sizeFills) expect([RISK_COLOUR.higher, RISK_COLOUR.lower, REFERENCE_COLOUR].map(rgba)).not.toContain(fill);
    });
    await page.close();
  }, 120_000);

  it("draws the modern comparison's mini-plots with tick labels, arrows where an interval runs off, and reasons read as sentences", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "results-look-comparison", async () => {
      await page.goto(`${demo.studyUrl}/modern-comparison/comparisons/${demo.analyses.comparisonId}`);
      const plots = page.getByTestId("side-by-side");
      await plots.first().waitFor({ timeout: 60_000 });
      const drawn = await plots.evaluateAll((svgs) =>
        svgs.map((svg) => ({
          ticks: [...svg.querySelectorAll("[data-tick]")].map((t) => t.textContent ?? ""),
          arrows: svg.querySelectorAll("[data-arrow]").length,
          label: svg.getAttribute("aria-label") ?? "",
          colours: [...svg.querySelectorAll("circle")].map((c) => (c.getAttribute("fill") ?? "").toLowerCase()),
        })),
      );
      expect(drawn.length).toBeGreaterThan(3);
      for (const plot of drawn) {
        expect(plot.ticks.length).toBeGreaterThanOrEqual(3);
        expect(plot.ticks).toContain("1");
        // An arrow exactly where the accessible name says an interval runs off the scale.
        expect(plot.arrows > 0, plot.label).toBe(plot.label.includes("running off the scale"));
        for (const colour of plot.colours) expect([COMPARISON_COLOUR.today, COMPARISON_COLOUR.past].map((c) => c.toLowerCase())).toContain(colour);
      }
      const who = await page.locator("section[aria-labelledby='who-counts']").innerText();
      expect(who).not.toMatch(/\.:/);
    });
    await page.close();
  }, 120_000);

  it("takes the run's toast away as soon as its results show", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "results-look-toast", async () => {
      // A run's toast stays until the run is over (bounded at a minute), so it is still there while
      // the re-run computes and must be gone the moment its results show.
      const traits = (await (await page.request.get(`${server.url}/api/studies/${demo.studyId}/traits`)).json()) as { traits: Array<{ id: string; key: string }> };
      const habit = traits.traits.find((t) => t.key === "life_habit")!;
      const created = await page.request.post(`${server.url}/api/studies/${demo.studyId}/runs`, {
        data: { name: "Life habit at the base of the Turonian (invented demo)", boundaries: [{ boundaryMa: 93.9 }], traits: [{ traitId: habit.id, reference: "epifaunal" }] },
      });
      expect(created.status()).toBe(202);
      const runId = ((await created.json()) as { id: string }).id;
      await page.goto(`${demo.studyUrl}/selectivity?run=${runId}`);
      await page.getByTestId("run-results").waitFor({ timeout: 60_000 });

      await page.getByRole("button", { name: "Re-run on today’s data" }).click();
      const toast = page.locator("[data-toast-key^='run:']");
      await toast.waitFor();
      expect(await toast.innerText()).toContain("Re-running");
      await page.waitForURL((url) => !url.search.includes(runId), { timeout: 10_000 });
      await page.getByTestId("run-results").waitFor({ timeout: 60_000 });
      // The moment the results are on screen the toast is gone, so it never covers them.
      expect(await toast.count()).toBe(0);
    });
    await page.close();
  }, 120_000);
});
