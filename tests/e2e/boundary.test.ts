// Browser journey through the Boundary screen: a study lead picks the base of the Turonian with
// the time scale picker, reads the counts, the proportional extinction and the rate chart, narrows
// the window, sets one taxon's outcome by hand with a reason (the counts change), reopens the
// link, revokes the override (the counts return), and tries a custom age. The study, its genera
// and species, and its basin are invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { taxa } from "../../db/schema/index";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { startTestServer } from "../support/server";
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

// Boundary: base of the Turonian, 93.9 Ma; default window: the Cenomanian, 100.5-93.9 Ma, 6.6 Myr
// (ICS International Chronostratigraphic Chart v2024/12, Cohen, Harper, Gibbard & Car 2025,
// Episodes 48: 105-115). Outcomes worked by hand (survivor: fad > 93.9 > lad; victim: fad > 93.9
// and 93.9 <= lad <= 100.5; everything else not at risk):
//   survivors (8): lata, parva, alta, brevis, minor, rarus, longa, perdurans
//   victims (6): fragilis (lad 93.9), tenuis, ornata, gracilis, plana, obscurus (lad 93.9)
//   not at risk (5): nova (fad = boundary), recens and media (first seen after it),
//                    antiqua (lad 104, before the window), incertus (first appearance missing)
// Warnings: last seen below the boundary = victims with lad > 93.9: tenuis, ornata, gracilis, plana (4);
// single stage = tenuis (99.5-94.5, inside the Cenomanian) (1); missing range = incertus (1).
const INVENTED_TAXA: Array<[name: string, fad: number | null, lad: number]> = [
  ["Umbrocardia lata", 105, 80],
  ["Umbrocardia parva", 99, 88],
  ["Vessirella alta", 112, 64],
  ["Vessirella brevis", 96, 92],
  ["Pallidoconcha minor", 101, 85],
  ["Fictorhynchus rarus", 110, 65],
  ["Umbrocardia longa", 118, 63],
  ["Vessirella perdurans", 115, 67],
  ["Umbrocardia fragilis", 104, 93.9],
  ["Vessirella tenuis", 99.5, 94.5],
  ["Pallidoconcha ornata", 110, 97],
  ["Fictorhynchus gracilis", 108, 95],
  ["Pallidoconcha plana", 102, 94.2],
  ["Fictorhynchus obscurus", 106, 93.9],
  ["Umbrocardia nova", 93.9, 62],
  ["Vessirella recens", 91, 84],
  ["Pallidoconcha media", 87, 74],
  ["Pallidoconcha antiqua", 112, 104],
  ["Fictorhynchus incertus", null, 95],
];

/** The three counts on the summary, in the order survivors, victims, not at risk, once they read `expected`. */
async function waitForCounts(page: Page, expected: [number, number, number]): Promise<void> {
  await page.waitForFunction(
    (want) => Array.from(document.querySelectorAll('[aria-label="Outcome counts"] > div > dd:first-of-type')).map((dd) => dd.textContent?.trim()).join(",") === want,
    expected.join(","),
  );
}

async function proportionText(page: Page): Promise<string> {
  return (await page.getByTestId("proportional-extinction").innerText()).replace(/\s+/g, " ");
}

describe("boundary screen", () => {
  it("picks the base of the Turonian, shows counts, warnings and the rate chart, and counts an override until it is revoked", async () => {
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "boundary", async () => {
      // A study lead with an invented study, set up through the API and the database.
      const { studyId } = await leadWithStudy(
        server.url,
        page.request,
        { label: "boundary-lead", name: "Invented Boundary Lead" },
        { name: "Invented Vessiran Basin bivalves", description: "Invented example data." },
      );
      await server.ctx.db
        .insert(taxa)
        .values(INVENTED_TAXA.map(([name, fad, lad]) => ({ studyId, name, higherTaxon: `${name.split(" ")[0]}idae (invented)`, fadMa: fad, ladMa: lad })));

      // From the study's navigation to the Boundary screen, which asks for a boundary first.
      await page.goto(`${server.url}/studies/${studyId}`);
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
      await page.getByRole("heading", { level: 1, name: "Boundary" }).waitFor();
      await page.getByRole("heading", { name: "Choose a boundary" }).waitFor();

      // Period, then epoch, then stage: the boundary is the base of the Turonian.
      await page.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await page.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await page.getByLabel("Stage", { exact: true }).selectOption("Turonian");
      await page.waitForURL(/[?&]unit=Turonian(&|$)/);
      await page.getByTestId("boundary-headline").filter({ hasText: "base of the Turonian stage, 93.9 Ma" }).waitFor();
      expect(await page.getByRole("button", { name: "Use the base of the Turonian stage, 93.9 Ma" }).getAttribute("aria-pressed")).toBe("true");

      await waitForCounts(page, [8, 6, 5]);
      const summary = page.getByRole("region", { name: "Outcomes across the boundary" });
      expect(await summary.innerText()).toContain("19 taxa at 93.9 Ma, window 6.6 Myr (to 100.5 Ma), the Cenomanian’s duration");
      // Worked by hand: 6 victims of 14 at risk = 42.857%; Wilson (1927) 95% score interval with z = 1.95996:
      // centre (p + z²/2n)/(1 + z²/n) = 0.44395, half-width z·sqrt(p(1-p)/n + z²/4n²)/(1 + z²/n) = 0.23015 -> 21.4% to 67.4%.
      const proportion = await proportionText(page);
      expect(proportion).toContain("42.9%");
      expect(proportion).toContain("6 of 14 taxa at risk");
      expect(proportion).toContain("95% interval 21.4% to 67.4%");

      // Each warning says how many taxa it touches (worked by hand above).
      const warning = (key: string) => page.locator(`[data-warning="${key}"]`).innerText();
      expect(await warning("lastSeenBelowBoundary")).toContain("touches 4 taxa");
      expect(await warning("singleInterval")).toContain("touches 1 taxon");
      expect(await warning("missingRange")).toContain("touches 1 taxon");
      expect(await warning("invalidRange")).toContain("none");
      // The cautions about ranges and mechanisms are on the screen.
      await page.getByRole("note").filter({ hasText: "The counts rest on the ranges as coded" }).waitFor();
      await page.getByRole("note").filter({ hasText: "not proof of a kill mechanism" }).waitFor();

      // The rate chart marks the boundary and the stage it closes, and states the 30% convention.
      const chart = page.getByRole("region", { name: "Extinction through time" });
      const chartImage = chart.getByRole("img", { name: /Proportional extinction per stage, Aptian to Danian; boundary at 93\.9 Ma, closing the Cenomanian/ });
      await chartImage.waitFor();
      expect(await chart.innerText()).toContain("common teaching threshold for calling an event a mass extinction");
      // Worked by hand for the Cenomanian (100.5-93.9 Ma; a range crosses an age t when fad > t > lad):
      // through (crosses base and top) = lata, alta, minor, rarus, longa, perdurans = 6; lost (crosses
      // the base, last seen inside) = fragilis, ornata, gracilis, plana, obscurus = 5; only here = tenuis = 1;
      // first seen inside and crossing the top = parva, brevis = 2; taxa 14. q = -ln(6 / 11) = 0.606
      // (Foote 2000); proportional extinction (5 + 1) / 14 = 42.9%.
      await chart.getByText("Numbers per stage").click();
      const cenomanian = (await chart.locator('tr[data-stage="Cenomanian"]').innerText()).split(/\s+/);
      expect(cenomanian).toEqual(["Cenomanian", "100.5–93.9", "14", "6", "5", "1", "0.606", "0.092", "42.9%"]);
      await chart.getByText("Numbers per stage").click();
      // From the top, so the sticky top bar sits above the page in the full-page picture.
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, "boundary");

      // A narrower window: victims last seen between 93.9 and 96.9 Ma stay victims, Pallidoconcha ornata (97) is no longer at risk.
      await page.getByLabel("Window below the boundary (Myr)").fill("three");
      await page.getByRole("button", { name: "Apply window" }).click();
      await page.getByText("Window must be a duration in Myr").waitFor();
      await page.getByLabel("Window below the boundary (Myr)").fill("3");
      await page.getByRole("button", { name: "Apply window" }).click();
      await page.waitForURL(/[?&]window=3(&|$)/);
      await waitForCounts(page, [8, 5, 6]);
      await page.getByRole("button", { name: "Use the default" }).click();
      await waitForCounts(page, [8, 6, 5]);

      // Vessirella brevis ranges into the Turonian only through reworked shells: set it a victim, with a reason.
      await page.getByRole("tab", { name: /Survivors/ }).click();
      await page.getByRole("button", { name: "Set outcome of Vessirella brevis" }).click();
      const dialog = page.getByRole("dialog", { name: "Set the outcome of Vessirella brevis" });
      await dialog.getByLabel(/^Victim/).check();
      await dialog.getByRole("button", { name: "Set outcome" }).click();
      await dialog.getByText("A reason is required").waitFor();
      await dialog.getByLabel("Reason").fill("Turonian finds are reworked shells from Cenomanian beds (invented example).");
      await dialog.getByRole("button", { name: "Set outcome" }).click();
      await dialog.waitFor({ state: "hidden" });

      await waitForCounts(page, [7, 7, 5]);
      // Worked by hand: 7 victims of 14 at risk = 50.0%.
      expect(await proportionText(page)).toContain("50.0%");
      expect(await summary.innerText()).toContain("1 outcome set by hand. From the ranges alone: 8 survivors, 6 victims, 5 not at risk.");
      const overrides = page.getByRole("region", { name: "Outcomes set by hand" });
      const entry = overrides.locator('[data-override-taxon="Vessirella brevis"]');
      await entry.waitFor();
      expect(await entry.innerText()).toContain("reworked shells from Cenomanian beds");
      expect(await entry.innerText()).toContain("at 93.9 Ma");
      await page.getByRole("tab", { name: /Victims/ }).click();
      expect(await page.locator('tr[data-taxon="Vessirella brevis"]').innerText()).toContain("Set by hand");

      // The address reproduces the view: reopening it shows the same boundary and counts.
      const link = page.url();
      expect(new URL(link).searchParams.get("unit")).toBe("Turonian");
      await page.goto(link);
      await waitForCounts(page, [7, 7, 5]);
      expect(await page.getByRole("tab", { name: /Victims/ }).getAttribute("aria-selected")).toBe("true");

      // Overrides are reversible: revoking it brings the computed outcome back.
      await overrides.getByRole("button", { name: "Revoke the outcome set by hand for Vessirella brevis" }).click();
      const revoke = page.getByRole("dialog", { name: "Revoke the outcome set for Vessirella brevis?" });
      await revoke.getByLabel("Reason").fill("Checked again: the Turonian shells are in place (invented example).");
      await revoke.getByRole("button", { name: "Revoke" }).click();
      await revoke.waitFor({ state: "hidden" });
      await waitForCounts(page, [8, 6, 5]);
      await overrides.getByText("None in force.").waitFor();
      await overrides.getByLabel("Show", { exact: true }).selectOption("revoked");
      expect(await overrides.locator('[data-override-taxon="Vessirella brevis"]').innerText()).toContain("Checked again: the Turonian shells are in place");

      // A custom age inside the Cenomanian, 94.2 Ma; the default window reaches down to the Cenomanian's base:
      // 100.5 - 94.2 = 6.3 Myr (the stage's whole 6.6 Myr would run past its base to 100.8 Ma).
      // Worked by hand: fragilis and obscurus (last seen at 93.9) now cross it and survive (10); tenuis, ornata, gracilis
      // and plana (last seen 94.2-97) are victims (4); the same 5 are not at risk.
      await page.getByText("Custom age", { exact: true }).click();
      await page.getByLabel("Boundary age (Ma)").fill("94.2");
      await page.getByRole("button", { name: "Use this age" }).click();
      await page.waitForURL(/[?&]age=94\.2(&|$)/);
      await page.getByTestId("boundary-headline").filter({ hasText: "94.2 Ma, a custom age, inside the Cenomanian" }).waitFor();
      await waitForCounts(page, [10, 4, 5]);
      expect(await page.getByRole("region", { name: "Outcomes across the boundary" }).innerText()).toContain(
        "window 6.3 Myr (to 100.5 Ma), down to the base of the Cenomanian, the stage this age falls in",
      );
      await page.getByText("the distance down to the base of the Cenomanian, the stage this age falls in, 6.3 Myr").waitFor();
    });
  });
});
