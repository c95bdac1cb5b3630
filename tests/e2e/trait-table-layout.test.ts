// The trait table on common laptop and desktop windows (1366 and 1920 px wide): it uses the width of
// the window, headings are shown whole (wrapped, never cut), the name column stays in place while
// the rest scroll sideways, the sideways scrollbar is on screen, and no blank column is left at the
// end. The invented demo study.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
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
  await signInAs(browser.context, server.url, demo.account.coder);
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("trait table layout", () => {
  for (const viewport of [
    { width: 1366, height: 768 },
    { width: 1920, height: 1080 },
  ]) {
    it(`uses a ${viewport.width} px window, keeps the name column and shows every heading whole`, async () => {
      const page = await browser.context.newPage();
      await page.setViewportSize(viewport);
      await withScreenshotOnFailure(browser.context, `trait-table-layout-${viewport.width}`, async () => {
        await page.goto(`${demo.studyUrl}/table`);
        const grid = page.getByRole("grid", { name: "Trait table" });
        await grid.getByRole("gridcell").first().waitFor();

        // The grid takes the window's width (less the study navigation and margins), not a reading column.
        const gridBox = (await grid.boundingBox())!;
        expect(gridBox.width).toBeGreaterThan(viewport.width - 420);

        // Every heading shows its whole text: nothing is cut (wrapped headings are fine).
        const cut = await grid.getByRole("columnheader").evaluateAll((headers) =>
          headers.flatMap((h) => [...h.querySelectorAll("button > span")].filter((s) => s.scrollWidth > s.clientWidth + 1 || s.scrollHeight > s.clientHeight + 1).map((s) => s.textContent)),
        );
        expect(cut).toEqual([]);
        await grid.getByRole("columnheader", { name: /Geographic range/ }).waitFor();

        // The grid scrolls sideways with a scrollbar styled to be drawn all the time. (Headless
        // chromium runs with hidden scrollbars, so the styled size is what can be read here.)
        const bars = await grid.evaluate((el) => ({ scrollable: el.scrollWidth > el.clientWidth, barHeight: getComputedStyle(el, "::-webkit-scrollbar").height }));
        expect(bars).toEqual({ scrollable: true, barHeight: "12px" });

        // Scrolled to the far end: the name column has not moved and the last column meets the edge.
        const nameHeader = grid.getByRole("columnheader", { name: /^Name/ });
        const before = (await nameHeader.boundingBox())!;
        await grid.evaluate((el) => el.scrollTo({ left: el.scrollWidth }));
        await page.waitForTimeout(100);
        const after = (await nameHeader.boundingBox())!;
        expect(Math.abs(after.x - before.x)).toBeLessThan(1);
        const gap = await grid.evaluate((el) => {
          const headers = [...el.querySelectorAll('[role="columnheader"]')];
          const last = headers[headers.length - 1].getBoundingClientRect();
          return el.getBoundingClientRect().left + el.clientLeft + el.clientWidth - last.right;
        });
        expect(Math.abs(gap)).toBeLessThan(2);
      });
      await page.close();
    });
  }
});
