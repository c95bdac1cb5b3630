// Browser journeys through the rough edges of the flows: the Boundary screen opens at the study's main
// boundary (the newest run's crisis, or the study lead's choice on the Overview), the modern
// comparison starts from the run that tests it, a new study's codebook is a choice, an empty
// study's Selectivity screen says what to do first, an upload left at the mapping step is resumed
// from the import history, and the crosswalk pairs equal names for review. The demo study and every
// name are invented.
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { modernLists, modernSpecies } from "../../db/schema/index";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { seedDemoStudy, signInAs, type DemoFixture } from "../support/demo";
import { PASSWORD, startTestServer, uniqueEmail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let demo: DemoFixture;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  demo = await seedDemoStudy(server);
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("the study's main boundary", () => {
  it("opens the Boundary screen at the newest run's crisis, starts the modern comparison from that run, and follows the lead's choice on the Overview", async () => {
    const { context } = browser;
    await withScreenshotOnFailure(context, "flows-main-boundary", async () => {
      await signInAs(context, server.url, demo.account.owner);
      const study = (await (await context.request.get(`${server.url}/api/studies/${demo.studyId}`)).json()) as {
        mainBoundary: { boundaryMa: number; source: string; runId: string; runName: string } | null;
      };
      // The demo's runs name the base of the Turonian (93.9 Ma, ICS v2024/12) as the crisis.
      expect(study.mainBoundary).toMatchObject({ boundaryMa: 93.9, source: "run" });

      const page = await context.newPage();
      await page.goto(`${demo.studyUrl}/boundary`);
      // Opened by name, with the chart's selects, as if the Turonian had been chosen there.
      await page.waitForURL(/[?&]unit=Turonian(&|$)/);
      expect(await page.getByLabel("Stage", { exact: true }).inputValue()).toBe("Turonian");
      await page.getByTestId("boundary-headline").filter({ hasText: "base of the Turonian stage, 93.9 Ma" }).waitFor();
      await page.getByTestId("main-boundary-note").filter({ hasText: `the crisis boundary of its newest run, “${study.mainBoundary!.runName}”` }).waitFor();
      await page.getByRole("region", { name: "Outcomes across the boundary" }).waitFor();
      expect(await page.getByRole("heading", { name: "Choose a boundary" }).count()).toBe(0);

      // The modern comparison's form starts from the run that tests the main boundary, at that boundary.
      await page.goto(`${demo.studyUrl}/modern-comparison`);
      const form = page.getByRole("form", { name: "Compare a list with a run" });
      await form.waitFor();
      expect(await form.getByLabel("Run", { exact: true }).inputValue()).toBe(study.mainBoundary!.runId);
      const boundarySelect = form.getByLabel("Boundary of the run");
      await page.waitForFunction(() => !document.body.innerText.includes("Loading the run…"));
      expect(await boundarySelect.locator("option:checked").innerText()).toMatch(/Turonian|93\.9/);

      // The study lead sets the base of the Campanian on the Overview (83.6 Ma, ICS v2024/12); the Boundary screen opens there.
      await page.goto(demo.studyUrl);
      const card = page.getByRole("region", { name: "Main boundary" });
      await card.getByRole("button", { name: "Change" }).click();
      await card.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await card.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await card.getByLabel("Stage", { exact: true }).selectOption("Campanian");
      await card.getByRole("button", { name: "Save the base of the Campanian" }).click();
      await card.getByTestId("main-boundary").filter({ hasText: "base of the Campanian, 83.6 Ma" }).waitFor();
      await card.getByText("Set on this overview.").waitFor();
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
      await page.waitForURL(/[?&]unit=Campanian(&|$)/);
      await page.getByTestId("main-boundary-note").filter({ hasText: "as set on the study’s overview" }).waitFor();
      await page.close();
    });
  });
});

describe("a new study", () => {
  it("offers the suggested codebook as a choice (empty when not ticked), and its Selectivity screen says what to do first", async () => {
    const browser2 = await launchBrowser();
    const { context } = browser2;
    try {
      await withScreenshotOnFailure(context, "flows-new-study", async () => {
        const signup = await context.request.post(`${server.url}/api/auth/signup`, { data: { email: uniqueEmail("lead"), password: PASSWORD, name: "Invented Study Lead" } });
        expect(signup.status()).toBe(201);
        // The sign-up's session outlives the browser as a sign-in's does: a cookie with a date days ahead, not one for the session only (-1).
        const session = (await context.cookies(server.url)).find((c) => c.name === "ss_session")!;
        expect(session.expires).toBeGreaterThan(Date.now() / 1000 + 24 * 3600);
        const page = await context.newPage();
        await page.goto(`${server.url}/studies/new`);
        const choice = page.getByRole("checkbox", { name: /Start from the suggested codebook/ });
        expect(await choice.isChecked()).toBe(false);
        await page.getByLabel("Name").fill("Invented empty study");
        await page.getByRole("button", { name: "Create study" }).click();
        await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
        const studyPath = new URL(page.url()).pathname;
        const traits = (await (await context.request.get(`${server.url}/api${studyPath}/traits`)).json()) as { traits: unknown[] };
        expect(traits.traits).toEqual([]);
        await page.getByRole("region", { name: "First steps" }).getByText("No traits yet").waitFor();

        await page.goto(`${server.url}${studyPath}/selectivity`);
        await page.getByRole("heading", { name: "This study has no taxa yet" }).waitFor();
        await page.getByText("First define the codebook (the traits to test), then import a CSV of taxa").waitFor();
        await page.getByRole("link", { name: "Define the codebook" }).waitFor();
        await page.getByRole("link", { name: "Import taxa" }).waitFor();

        // Ticked, the study starts with the five suggested traits.
        await page.goto(`${server.url}/studies/new`);
        await page.getByLabel("Name").fill("Invented study with the suggested codebook");
        await page.getByRole("checkbox", { name: /Start from the suggested codebook/ }).check();
        await page.getByRole("button", { name: "Create study" }).click();
        await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
        const second = new URL(page.url()).pathname;
        const suggested = (await (await context.request.get(`${server.url}/api${second}/traits`)).json()) as { traits: Array<{ key: string }> };
        expect(suggested.traits.map((t) => t.key)).toEqual(["environment", "life_habit", "feeding", "body_size", "geographic_range"]);
      });
    } finally {
      await browser2.close();
    }
  });
});

describe("an upload left at the mapping step", () => {
  it("is resumed from the import history after leaving the page", async () => {
    const { context } = browser;
    await withScreenshotOnFailure(context, "flows-resume-upload", async () => {
      await signInAs(context, server.url, demo.account.coder);
      const dir = mkdtempSync(join(tmpdir(), "flows-"));
      const csvPath = join(dir, "invented-resume.csv");
      writeFileSync(csvPath, "taxon,clade,first,last\nResumella prima (invented),Resumellidae,99,88\n");
      const page = await context.newPage();
      await page.goto(`${demo.studyUrl}/imports`);
      await page.getByLabel("CSV file", { exact: true }).setInputFiles(csvPath);
      await page.getByRole("button", { name: "Upload and read the file" }).click();
      await page.getByRole("form", { name: "Map the columns" }).waitFor();

      // Leave the page: the wizard's state is gone, the upload stays in the history.
      await page.goto(demo.studyUrl);
      await page.goto(`${demo.studyUrl}/imports`);
      const row = page.locator('[data-import-file="invented-resume.csv"]');
      await row.getByText("Not committed").waitFor();
      await row.getByRole("button", { name: "Resume the upload of invented-resume.csv" }).click();
      const mapping = page.getByRole("form", { name: "Map the columns" });
      await mapping.waitFor();
      await page.getByText("Resumed: invented-resume.csv").waitFor();
      await mapping.getByLabel("Name", { exact: true }).selectOption("taxon");
      await mapping.getByLabel("Higher taxon").selectOption("clade");
      await mapping.getByLabel("First appearance").selectOption("first");
      await mapping.getByLabel("Last appearance").selectOption("last");
      await mapping.getByRole("button", { name: "Check every row" }).click();
      await page.getByRole("button", { name: "Import 1 row" }).waitFor();
      await page.close();
    });
  });
});

describe("the crosswalk", () => {
  it("pairs columns and values with equal names for review (never a name that only looks alike), and matches a hand-paired column's values", async () => {
    const { context } = browser;
    await withScreenshotOnFailure(context, "flows-crosswalk", async () => {
      const [list] = await server.ctx.db
        .insert(modernLists)
        .values({
          studyId: demo.studyId,
          name: "Invented shelf list",
          speciesCount: 3,
          columns: [
            { name: "LIFE HABIT", values: ["Infaunal", "epifaunal", "digging"] },
            { name: "habitat zone", values: ["marine"] },
          ],
        })
        .returning();
      await server.ctx.db.insert(modernSpecies).values([
        { listId: list.id, name: "Listella una (invented)", category: "LC", rawTraits: { "LIFE HABIT": "Infaunal", "habitat zone": "marine" } },
        { listId: list.id, name: "Listella duo (invented)", category: "EN", rawTraits: { "LIFE HABIT": "epifaunal", "habitat zone": "marine" } },
        { listId: list.id, name: "Listella tres (invented)", category: "VU", rawTraits: { "LIFE HABIT": "digging", "habitat zone": "marine" } },
      ]);
      await signInAs(context, server.url, demo.account.analyst);
      const page = await context.newPage();
      await page.goto(`${demo.studyUrl}/modern-comparison/lists/${list.id}`);
      await page.getByText("Paired by name, for your review").waitFor();
      // "LIFE HABIT" is Life habit's own name (case and spaces aside); its equal values are matched, "digging" waits.
      expect(await page.getByLabel("List column for Life habit").inputValue()).toBe("LIFE HABIT");
      expect(await page.getByLabel("State of Life habit for “Infaunal”").inputValue()).toBe("infaunal");
      expect(await page.getByLabel("State of Life habit for “epifaunal”").inputValue()).toBe("epifaunal");
      expect(await page.getByLabel("State of Life habit for “digging”").inputValue()).toBe("__undecided");
      expect(await page.getByText("same name", { exact: true }).count()).toBe(2);
      // The crosswalk's selects look like the rest of the app's (src/components/Select.tsx): no native
      // arrow but the app's chevron, the app's height and corners, for columns and states alike.
      const look = (label: string) =>
        page.getByLabel(label).evaluate((el) => {
          const style = getComputedStyle(el);
          return { appearance: style.appearance, height: el.getBoundingClientRect().height, radius: style.borderRadius, chevron: el.parentElement?.querySelector("svg[aria-hidden='true']") != null };
        });
      const columnLook = await look("List column for Life habit");
      expect(columnLook).toMatchObject({ appearance: "none", height: 40, chevron: true });
      expect(await look("State of Life habit for “digging”")).toEqual(columnLook);
      // "habitat zone" is not Environment's name: not paired until a person pairs it; then "marine" is matched.
      expect(await page.getByLabel("List column for Environment").inputValue()).toBe("");
      await page.getByLabel("List column for Environment").selectOption("habitat zone");
      expect(await page.getByLabel("State of Environment for “marine”").inputValue()).toBe("marine");
      await page.close();
    });
  });
});
