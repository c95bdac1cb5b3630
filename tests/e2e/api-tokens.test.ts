// A study lead makes an API token on the Account screen for one study with a guest's rights, copies
// it from the one place it is shown, sees a script use it, and revokes it.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { launchBrowser, withScreenshotOnFailure } from "../support/browser";
import { signInAs } from "../support/demo";
import { PASSWORD, signedInAgent, startTestServer } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let browser: Browser;
let lead: Awaited<ReturnType<typeof signedInAgent>>;
let studyId: string;

beforeAll(async () => {
  server = await startTestServer();
  lead = await signedInAgent(server, "token-lead");
  const created = await lead.agent.post("/api/studies").send({ name: "Token walk study (invented)" });
  studyId = created.body.id;
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("API tokens on the Account screen", () => {
  it("makes a guest token for one study, shows it once, and revokes it", async () => {
    await withScreenshotOnFailure(browser.context, "api-tokens", async () => {
      await signInAs(browser.context, server.url, { email: lead.email, password: PASSWORD });
      const page = await browser.context.newPage();
      await page.goto(`${server.url}/account`);
      const form = page.getByRole("form", { name: "New API token" });
      // The same schema as the server's: no study chosen is refused before anything is sent.
      await form.getByLabel("Name").fill("Nightly occurrence export");
      await form.getByRole("button", { name: "Make token" }).click();
      await expect.poll(() => form.getByRole("alert").textContent()).toMatch(/Choose at least one study/);

      await form.getByRole("checkbox", { name: /Token walk study/ }).check();
      await expect.poll(() => form.getByLabel("Role of the token in Token walk study (invented)").inputValue()).toBe("viewer");
      await form.getByRole("button", { name: "Make token" }).click();
      const shown = page.getByTestId("new-api-token");
      await shown.waitFor();
      const secret = (await shown.textContent())!.trim();
      expect(secret).toMatch(/^sieve_/);

      // A script with the token reads the study as a guest.
      const read = await fetch(`${server.url}/api/studies/${studyId}`, { headers: { Authorization: `Bearer ${secret}` } });
      expect(read.status).toBe(200);
      expect((await read.json()).role).toBe("viewer");

      await page.getByRole("button", { name: "I have copied it" }).click();
      expect(await page.getByTestId("new-api-token").count()).toBe(0);
      const listed = page.getByRole("listitem").filter({ hasText: "Nightly occurrence export" });
      await expect.poll(() => listed.textContent()).toMatch(/Active.*Token walk study \(invented\) \(Guest\)/);
      await listed.getByRole("button", { name: "Revoke the token “Nightly occurrence export”" }).click();
      await page.getByRole("dialog").getByRole("button", { name: "Revoke token" }).click();
      await expect.poll(() => listed.textContent()).toMatch(/Revoked/);
      const after = await fetch(`${server.url}/api/studies/${studyId}`, { headers: { Authorization: `Bearer ${secret}` } });
      expect(after.status).toBe(401);
    });
  });
});
