// Browser test of a separated selectivity run: in a small invented study every infaunal genus died
// out at the boundary and none survived, so the ordinary maximum likelihood odds ratio of infaunal
// against epifaunal is infinite (quasi-complete separation; Albert & Anderson 1984, Biometrika 71:1).
// The screen must say that the data separate and how that was found (the linear programme of
// Konis 2007, DPhil thesis, Oxford, before fitting), fit Firth's penalised regression (Firth 1993,
// Biometrika 80:27) instead of reporting a Wald interval that runs off to infinity, and claim no
// selective effect its interval does not support. Every taxon and value is invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { studyWithFinishedCrisisRun, type InventedCrisis } from "../support/inventedCrisis";
import { startTestServer } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;

// 36 invented genera in three clades: 12 epifaunal (4 died), 12 nektonic (5 died), 12 infaunal (all
// 12 died, none survived). The infaunal column of the design separates the outcomes; the other two
// states keep victims and survivors, so the separation is quasi-complete, not complete.
const HABITS = [
  { code: "epifaunal", victims: 4 },
  { code: "nektonic", victims: 5 },
  { code: "infaunal", victims: 12 },
];
const PER_HABIT = 12;
const CLADES = ["Orvellidae", "Pashtidae", "Quillonidae"];

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

const SEPARATED_CRISIS: InventedCrisis = { habits: HABITS, perHabit: PER_HABIT, genus: "Dremora", higherTaxon: (k) => CLADES[k % CLADES.length] };

/** A study lead, a study with the suggested codebook, the invented taxa, and a finished run (set up through the API). */
const studyWithFinishedRun = () =>
  studyWithFinishedCrisisRun(server, browser.context, SEPARATED_CRISIS, { study: "Invented separated crisis", run: "Separated life habit across 66 Ma" });

describe("a separated selectivity run", () => {
  it("says the data separate, found by the linear programme before fitting, fits Firth's regression and claims nothing its interval does not support", async () => {
    const { context } = browser;
    const { studyId, runId } = await studyWithFinishedRun();
    const page = await context.newPage();

    await withScreenshotOnFailure(context, "selectivity-separated", async () => {
      await page.goto(`${server.url}/studies/${studyId}/selectivity?run=${runId}`);
      await page.getByRole("heading", { level: 1, name: "Selectivity" }).waitFor();
      const model = page.getByTestId("model");
      await model.waitFor({ timeout: 60_000 });

      // The Firth box says that the data separate, in words, and how that was found: infaunal has
      // victims only, epifaunal and nektonic have both outcomes, so the separation is quasi-complete
      // (Albert & Anderson 1984), found by the linear programme before any fit (Konis 2007).
      const firthNote = model.getByTestId("firth-note");
      await firthNote.waitFor();
      const firthText = await firthNote.innerText();
      expect(firthText).toContain("Firth's bias-reduced logistic regression (Firth 1993) was used because the data separate the outcomes");
      expect(firthText).toContain("all 12 taxa with Life habit: Infaunal died out");
      expect(firthText).toContain("quasi-complete separation, found before fitting by linear programming; Konis 2007");
      expect(firthText).not.toContain("found as the ordinary fit ran off");

      // The intervals are Firth's profile penalised likelihood intervals (Heinze & Schemper 2002,
      // Statistics in Medicine 21:2409), not Wald intervals of an ordinary fit.
      const modelText = await model.innerText();
      expect(modelText).toContain("Firth's bias-reduced multiple logistic regression (Firth 1993); profile penalized likelihood intervals");
      expect(modelText).not.toContain("by iteratively reweighted least squares; Wald intervals");
      expect(modelText).not.toContain("did not converge");
      // Said once, in the box, not again in the notes under the table.
      expect(modelText.split("Konis 2007").length - 1).toBe(1);

      // Firth's estimate in a model saturated in one factor is the empirical logit with 1/2 added to
      // every cell (the penalty is Jeffreys' prior, Firth 1993; per state a Beta(1/2, 1/2) prior whose
      // posterior mode on the logit scale is log((victims + 1/2) / (survivors + 1/2))). Worked by hand:
      // infaunal vs epifaunal (12.5 / 0.5) / (4.5 / 8.5) = 47.2, nektonic vs epifaunal (5.5 / 7.5) / (4.5 / 8.5) = 1.39.
      const cells = async (name: string) => (await model.locator(`[data-coefficient="${name}"]`).locator("td").allInnerTexts()).map((t) => t.trim());
      const infaunal = await cells("life_habit=infaunal");
      expect(infaunal[0]).toBe("47.2");
      const nektonic = await cells("life_habit=nektonic");
      expect(nektonic[0]).toBe("1.39");
      // The separated term's interval is finite at both ends (an ordinary fit's would run off to
      // infinity) and, like the penalised likelihood ratio p beside it, excludes 1 ...
      const interval = (text: string) => text.split(" to ").map((v) => Number(v.replace(/,/g, "").replace("−", "-")));
      const [infLow, infHigh] = interval(infaunal[1]);
      expect(infaunal[1]).not.toContain("∞");
      expect(Number.isFinite(infLow) && Number.isFinite(infHigh)).toBe(true);
      expect(infLow).toBeGreaterThan(1);
      expect(infHigh).toBeGreaterThan(47.2);
      // ... while nektonic's includes 1.
      const [nekLow, nekHigh] = interval(nektonic[1]);
      expect(nekLow).toBeLessThan(1);
      expect(nekHigh).toBeGreaterThan(1);

      // The crude odds ratio of the separated contrast is not the infinite sample one: it says it adds
      // 1/2 to every cell (Haldane 1956; Anscombe 1956): (12.5 / 0.5) / (4.5 / 8.5) = 47.2 again.
      const crudeRow = page.locator('[data-trait="life_habit"] [data-contrast]').filter({ hasText: "Infaunal vs Epifaunal" });
      expect(await crudeRow.locator("td").first().innerText()).toBe("47.2");
      expect(await crudeRow.innerText()).toContain("0.5 added to every cell because one is zero");

      // Within clades the separated contrast is infinite: no clade-adjusted value, and nothing flagged.
      const confounding = page.getByTestId("confounding-check");
      await confounding.getByText("Within clades the odds ratio of Infaunal against Epifaunal is infinite").waitFor();
      expect(await confounding.locator('[data-flagged="true"]').count()).toBe(0);
      expect(await confounding.locator('[data-flagged="false"]').count()).toBe(2);

      // The verdicts follow the intervals: the separated contrast, whose interval excludes 1, holds;
      // nektonic, whose interval holds 1, is never called an effect.
      const robustness = page.getByTestId("robustness-panel");
      await robustness.waitFor({ timeout: 60_000 });
      const verdict = (contrast: string, column: number) =>
        robustness.locator(`[data-robustness-contrast="life_habit:${contrast}"]`).locator("td").nth(column).locator("[data-verdict]").getAttribute("data-verdict");
      expect(await verdict("Infaunal vs Epifaunal", 0)).toBe("holds");
      expect(await verdict("Nektonic vs Epifaunal", 0)).toBe("never-there");
      const chartSentence = async (contrast: string) => (await robustness.getByTestId("robustness-chart").filter({ hasText: `Life habit: ${contrast}` }).innerText()).replace(/\s+/g, " ");
      expect(await chartSentence("Infaunal vs Epifaunal")).toContain("Holds: the odds ratio stays above 1, its interval excluding 1");
      const nektonicSentence = await chartSentence("Nektonic vs Epifaunal");
      expect(nektonicSentence).not.toContain("Holds");
      expect(nektonicSentence).not.toContain("stays above 1");
      await screenshot(page, "selectivity-separated");
    });
  });
});
