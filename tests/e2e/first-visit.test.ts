// The first visit of a signed-out person: the app's address leads to the sign-in page without a
// single failed request or console error (the session question answers 200 for nobody), the page
// is built from the compressed, split client (no chart or grid code), and signing in goes on to
// the studies. A person with one study signs in straight to it, and its Overview fetches the study's
// main boundary ahead, so the Boundary screen opens without waiting. A cold visit to a study's screen
// asks for the study before the screen's scripts. Invented names and addresses.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { studyWithFinishedCrisisRun, type InventedCrisis } from "../support/inventedCrisis";
import { PASSWORD, signedInAgent, startTestServer } from "../support/server";

const SMALL_CRISIS: InventedCrisis = {
  habits: [
    { code: "epifaunal", victims: 3 },
    { code: "infaunal", victims: 9 },
  ],
  perHabit: 12,
  genus: "Lantivora",
  higherTaxon: (k) => `Invented family ${(k % 3) + 1}`,
};

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

describe("first visit", () => {
  it("a signed-out visitor reaches the sign-in page without a failed request or console error, then signs in", async () => {
    const { email } = await signedInAgent(server, "first-visit");
    const page = await browser.context.newPage();
    const consoleErrors: string[] = [];
    const failed: string[] = [];
    const scripts: Array<{ url: string; encoding: string | undefined }> = [];
    page.on("console", (m) => {
      if (m.type() === "error") consoleErrors.push(m.text());
    });
    page.on("pageerror", (e) => consoleErrors.push(e.message));
    let sessionAsks = 0;
    page.on("response", (r) => {
      if (new URL(r.url()).pathname === "/api/auth/session") sessionAsks++;
      if (r.status() >= 400) failed.push(`${r.status()} ${r.url()}`);
      if (r.url().endsWith(".js")) scripts.push({ url: r.url(), encoding: r.headers()["content-encoding"] });
    });

    await withScreenshotOnFailure(browser.context, "first-visit", async () => {
      await page.goto(`${server.url}/`);
      await page.waitForURL(/\/sign-in$/);
      await page.getByRole("button", { name: "Sign in" }).waitFor();
      await page.waitForLoadState("networkidle");
      expect(failed).toEqual([]);
      expect(consoleErrors).toEqual([]);
      // Split and compressed: the sign-in page fetched no chart or grid chunk, and brotli copies.
      expect(scripts.length).toBeGreaterThan(0);
      expect(scripts.filter((s) => /\/assets\/(charts|grid)-/.test(s.url))).toEqual([]);
      expect(scripts.every((s) => s.encoding === "br")).toBe(true);

      await page.getByLabel("E-mail").fill(email);
      await page.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.getByRole("heading", { level: 1, name: /studies/i }).waitFor();
      expect(failed).toEqual([]);
      expect(consoleErrors).toEqual([]);
      // The session was asked once, on the way to the sign-in page; after signing in, the sign-in's
      // answer stands for it (src/lib/session.ts).
      expect(sessionAsks).toBe(1);
    });
  });

  it("a person with one study signs in straight to its Overview, which fetches the main boundary ahead for the Boundary screen", async () => {
    const { context, close } = await launchBrowser();
    try {
      const { studyUrl, email } = await studyWithFinishedCrisisRun(server, context, SMALL_CRISIS, { study: "Invented landing study", run: "Life habit across 66 Ma" });
      await context.request.post(`${server.url}/api/auth/logout`);
      const page = await context.newPage();
      const visited: string[] = [];
      page.on("framenavigated", (frame) => {
        if (frame === page.mainFrame()) visited.push(new URL(frame.url()).pathname);
      });
      const asked: string[] = [];
      page.on("request", (r) => asked.push(new URL(r.url()).pathname));
      await withScreenshotOnFailure(context, "first-visit-landing", async () => {
        await page.goto(`${server.url}/sign-in`);
        await page.getByLabel("E-mail").fill(email);
        await page.getByLabel("Password", { exact: true }).fill(PASSWORD);
        await page.getByRole("button", { name: "Sign in" }).click();
        await page.waitForURL(studyUrl);
        await page.getByRole("heading", { level: 1, name: /Invented landing study/ }).waitFor();
        // Straight from the form to the study: the studies list was never drawn on the way.
        expect(visited).not.toContain("/");

        // Once the Overview is quiet it has asked for the main boundary's outcomes and turnover.
        await page.waitForLoadState("networkidle");
        expect(asked.some((p) => p.endsWith("/outcomes"))).toBe(true);
        expect(asked.some((p) => p.endsWith("/turnover"))).toBe(true);
        // From here the server answers outcomes only after 20 s: the screen shows them at once
        // all the same, from what the Overview fetched.
        await page.route("**/api/studies/*/outcomes?**", async (route) => {
          await new Promise((resolve) => setTimeout(resolve, 20_000));
          await route.continue().catch(() => undefined);
        });
        await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Boundary" }).click();
        const counts = page.getByRole("region", { name: "Outcomes across the boundary" }).getByLabel("Outcome counts");
        await counts.waitFor({ timeout: 5_000 });
        // Victims: the 3 + 9 genera of SMALL_CRISIS last seen at 67 Ma; survivors the other 12.
        expect((await counts.innerText()).replace(/\s+/g, " ")).toMatch(/Survivors 12 .*Victims 12 /);
        await page.unrouteAll({ behavior: "ignoreErrors" });
      });
    } finally {
      await close();
    }
  });

  it("a cold visit to a study's screen asks for the study before the screen's scripts, so the browser's connections serve it first", async () => {
    const { context, close } = await launchBrowser();
    try {
      const { studyUrl, studyId } = await studyWithFinishedCrisisRun(server, context, SMALL_CRISIS, { study: "Invented cold study", run: "Life habit across 66 Ma" });
      const page = await context.newPage();
      const asked: string[] = [];
      page.on("request", (r) => asked.push(new URL(r.url()).pathname));
      await withScreenshotOnFailure(context, "first-visit-cold-order", async () => {
        await page.goto(`${studyUrl}/boundary`);
        await page.getByRole("region", { name: "Outcomes across the boundary" }).waitFor();
        const study = asked.indexOf(`/api/studies/${studyId}`);
        const firstScreenScript = asked.findIndex((p) => /\/assets\/(AppShell|StudyLayout|BoundaryPage)-/.test(p));
        expect(study).toBeGreaterThan(-1);
        expect(firstScreenScript).toBeGreaterThan(-1);
        expect(study).toBeLessThan(firstScreenScript);
      });
    } finally {
      await close();
    }
  });
});
