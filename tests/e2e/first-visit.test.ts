// The first visit of a signed-out person: the app's address leads to the sign-in page without a
// single failed request or console error (the session question answers 200 for nobody), the page
// is built from the compressed, split client (no chart or grid code), and signing in goes on to
// the studies. Invented names and addresses.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { PASSWORD, signedInAgent, startTestServer } from "../support/server";

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
    page.on("response", (r) => {
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
    });
  });
});
