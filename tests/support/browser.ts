// Debian's chromium driven by playwright-core (never a downloaded browser).
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { mkdtempSync, mkdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

export const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";

export async function launchBrowser(): Promise<{ context: BrowserContext; close(): Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), "stratasieve-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: 1280, height: 860 },
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  return {
    context,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Saves a screenshot into test-results/ (used on failure, and for the README's tour). */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = join(process.cwd(), "test-results");
  mkdirSync(dir, { recursive: true });
  const path = join(dir, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}

/** Runs a browser journey and keeps a screenshot of every open page when it fails. */
export async function withScreenshotOnFailure<T>(context: BrowserContext, name: string, journey: () => Promise<T>): Promise<T> {
  try {
    return await journey();
  } catch (err) {
    await Promise.all(context.pages().map((p, i) => screenshot(p, `FAILED-${name}-${i}`).catch(() => undefined)));
    throw err;
  }
}
