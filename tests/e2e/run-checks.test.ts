// An analyst reads a run's checks in the browser: the demo's four-boundary run names the base of
// the Turonian as the crisis. The run screen says in words which traits the crisis treated
// differently from background, marks them on the heat map, and for the boundary shown gives the
// robustness verdicts with one chart per contrast; the printable report carries both.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { generateDemoStudy } from "../../scripts/seed/demo/generator";
import type { Run } from "../../shared/schemas/runs";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { signInAs } from "../support/demo";
import { startTestServer, uniqueEmail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

const data = generateDemoStudy();
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`run-checks-e2e-${a.role}`) }));
const analyst = accounts.find((a) => a.role === "analyst")!;

let server: Server;
let browser: Browser;
let seeded: DemoSeedResult;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  seeded = await seedDemo(server.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("reading crisis against background and the robustness panel", () => {
  it("the analyst sees which traits the crisis treated differently, and whether each finding holds", async () => {
    const { context } = browser;
    await signInAs(context, server.url, analyst);
    const page = await context.newPage();
    await withScreenshotOnFailure(context, "run-checks", async () => {
      const studyUrl = `${server.url}/studies/${seeded.studyId}`;
      const stored = (await (await context.request.get(`${server.url}/api/studies/${seeded.studyId}/runs/${seeded.analyses.sweepRunId}`)).json()) as Run;
      const crisis = stored.results!.crisisVersusBackground!;
      if (crisis.status !== "computed") throw new Error("the seeded run has no crisis result");

      await page.goto(`${studyUrl}/selectivity?run=${seeded.analyses.sweepRunId}`);
      const card = page.getByTestId("crisis-card");
      await card.waitFor();
      // One sentence per differing trait, as stored.
      const sentences = await card.getByTestId("crisis-sentence").allInnerTexts();
      expect(sentences.length).toBe(crisis.result.traits.filter((t) => t.differs).length);
      expect(sentences.some((s) => s.includes("Geographic range"))).toBe(true);
      // The table lists every trait; the differing ones carry the marker.
      const marked = await card.locator("tr[data-crisis-trait] th").filter({ hasText: "◆" }).allInnerTexts();
      expect(marked.map((t) => t.replace("◆", "").trim()).sort()).toEqual(crisis.result.traits.filter((t) => t.differs).map((t) => t.label).sort());
      // The heat map's caption explains its marker.
      await page.getByText("marks traits whose selectivity at the crisis differs from background").first().waitFor();

      // The crisis boundary's robustness panel: verdicts and one chart per contrast.
      await page.getByRole("tab", { name: /Turonian/ }).click();
      const panel = page.getByTestId("robustness-panel");
      await panel.waitFor();
      const robustness = stored.results!.robustness!;
      if (robustness.status !== "computed") throw new Error("the seeded run has no robustness panel");
      const crisisPanel = robustness.boundaries[2].panel!;
      expect(await panel.getByTestId("robustness-chart").count()).toBe(crisisPanel.contrasts.length);
      const rangeRow = panel.locator('tr[data-robustness-contrast="geographic_range:per 1 region"]');
      expect(await rangeRow.locator("[data-verdict]").first().getAttribute("data-verdict")).toBe("holds");
      // The same verdict is a column of the boundary's odds-ratio table (the numbers behind the forest plot).
      const column = page.locator('td[data-robustness="geographic_range:per 1 region"] [data-verdict]');
      expect(await column.first().getAttribute("data-verdict")).toBe("holds");
      const habitRow = panel.locator('tr[data-robustness-contrast^="life_habit:Infaunal"]');
      await habitRow.getByText("Without Quellorbidae").first().waitFor();
      // Switching the charts to the crude odds ratios keeps one chart per contrast.
      await panel.getByRole("radio", { name: "Crude" }).check({ force: true });
      await panel.getByRole("img", { name: /odds ratio \(crude\) under each variant/ }).first().waitFor();
      expect(await panel.getByTestId("robustness-chart").count()).toBe(crisisPanel.contrasts.length);

      // The printable report has the crisis card and a panel per boundary.
      await page.goto(`${studyUrl}/runs/${seeded.analyses.sweepRunId}/report`);
      await page.getByTestId("run-report").waitFor();
      await page.getByTestId("crisis-card").waitFor();
      await expect.poll(() => page.getByTestId("robustness-panel").count()).toBe(4);
    });
  });
});
