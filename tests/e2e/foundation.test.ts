// Browser journey through the client foundation: a study lead signs up, creates a study and
// invites an analyst by e-mail; the analyst opens the e-mailed link in another browser, creates
// an account from the invitation page, accepts, and lands in the study as Analyst. Each Outbox
// holds only its owner's mail. Then the lead meets the last-owner rule, signs out, tries to sign up
// with the analyst's address (the analyst reads the notice), and is brought back to the same page
// after signing in.
// All names and addresses are invented.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { linkIn, PASSWORD, startTestServer, uniqueEmail, waitForMail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let leadBrowser: Browser;
let analystBrowser: Browser;

beforeAll(async () => {
  server = await startTestServer();
  leadBrowser = await launchBrowser();
  analystBrowser = await launchBrowser();
});

afterAll(async () => {
  await analystBrowser?.close();
  await leadBrowser?.close();
  await server?.close();
});

/** The text of the <dd> that follows the <dt> with this label. */
async function fact(page: Page, label: string): Promise<string> {
  const value = page.locator("dt", { hasText: label }).locator("xpath=following-sibling::dd[1]");
  await value.waitFor();
  return (await value.innerText()).trim();
}

describe("client foundation", () => {
  it("a study lead invites an analyst by e-mail, and the analyst joins the study through the link", async () => {
    const leadEmail = uniqueEmail("lead");
    const analystEmail = uniqueEmail("analyst");
    const studyName = `Invented brachiopods across a boundary ${randomUUID().slice(0, 6)}`;
    let studyPath = "";
    let invitationLink = "";

    const lead = await leadBrowser.context.newPage();
    await withScreenshotOnFailure(leadBrowser.context, "foundation-lead", async () => {
      // Signed out, the home page sends the visitor to sign in.
      await lead.goto(`${server.url}/`);
      await lead.waitForURL(/\/sign-in$/);
      await lead.getByRole("link", { name: "Create an account" }).click();
      await lead.waitForURL(/\/sign-up$/);

      // The shared schema refuses a short password before anything is sent.
      await lead.getByLabel("Name").fill("Invented Study Lead");
      await lead.getByLabel("E-mail").fill(leadEmail);
      await lead.getByLabel("Password", { exact: true }).fill("short");
      await lead.getByRole("button", { name: "Create account" }).click();
      await lead.getByText("Password must have at least 10 characters").waitFor();
      expect(await lead.getByLabel("Password", { exact: true }).getAttribute("aria-invalid")).toBe("true");

      await lead.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await lead.getByRole("button", { name: "Create account" }).click();
      await lead.getByRole("heading", { level: 2, name: "No studies yet" }).waitFor();
      await screenshot(lead, "foundation-studies-empty");

      await lead.getByRole("link", { name: "Create your first study" }).click();
      await lead.getByLabel("Name").fill(studyName);
      await lead.getByLabel("Description").fill("Invented example: do burrowing taxa survive more often than epifaunal ones?");
      await lead.getByRole("button", { name: "Create study" }).click();
      await lead.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
      studyPath = new URL(lead.url()).pathname;
      await lead.getByRole("heading", { level: 1, name: studyName }).waitFor();
      expect(await fact(lead, "Your role")).toContain("Study lead");

      await lead.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Members" }).click();
      await lead.waitForURL(`${server.url}${studyPath}/members`);
      // Exact: the Overview, still on screen while the Members screen loads, has e-mail choices too.
      await lead.getByLabel("E-mail", { exact: true }).fill(analystEmail);
      await lead.getByLabel("Role", { exact: true }).selectOption("analyst");
      await lead.getByRole("button", { name: "Send invitation" }).click();
      await lead.getByText(`Invitation sent to ${analystEmail}`).waitFor();
      const pending = lead.getByRole("region", { name: "Pending invitations" });
      await pending.getByText(analystEmail).waitFor();
      expect(await pending.innerText()).toContain("Analyst");
    });

    // The invitation reached the analyst's mailbox (the fake mail server's table)...
    const mail = await waitForMail(server, analystEmail, { subject: studyName });
    invitationLink = linkIn(mail.text, "/invitations/");
    expect(invitationLink.startsWith(`${server.url}/invitations/`)).toBe(true);

    // ...and not the lead's: the Outbox shows each person only their own mail.
    await withScreenshotOnFailure(leadBrowser.context, "foundation-outbox-lead", async () => {
      await lead.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Outbox" }).click();
      await lead.waitForURL(`${server.url}/outbox`);
      await lead.getByRole("heading", { name: "No e-mail for you yet" }).waitFor();
      expect(await lead.getByRole("article").count()).toBe(0);
    });

    const analyst = await analystBrowser.context.newPage();
    await withScreenshotOnFailure(analystBrowser.context, "foundation-analyst", async () => {
      await analyst.goto(invitationLink);
      await analyst.getByRole("heading", { level: 1, name: `Join “${studyName}”` }).waitFor();
      expect(await fact(analyst, "Role")).toContain("Analyst");

      // Signed out: create an account from the invitation page, with the invited address filled in.
      await analyst.getByRole("link", { name: "Create an account" }).click();
      await analyst.waitForURL(/\/sign-up\?/);
      expect(await analyst.getByLabel("E-mail").inputValue()).toBe(analystEmail);
      await analyst.getByLabel("Name").fill("Invented Analyst");
      await analyst.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await analyst.getByRole("button", { name: "Create account" }).click();

      // Back on the invitation, now signed in: accept, and land in the study.
      await analyst.waitForURL(invitationLink);
      await analyst.getByText("Signed in as Invented Analyst").waitFor();
      await analyst.getByRole("button", { name: "Accept and open the study" }).click();
      await analyst.waitForURL(`${server.url}${studyPath}`);
      await analyst.getByRole("heading", { level: 1, name: studyName }).waitFor();
      expect(await fact(analyst, "Your role")).toContain("Analyst");
      expect(await fact(analyst, "Members")).toBe("2 members");
      // An analyst may not rename or delete the study: those controls are absent.
      expect(await analyst.getByRole("button", { name: "Delete study…" }).count()).toBe(0);
      expect(await analyst.getByRole("button", { name: "Save changes" }).count()).toBe(0);
      await screenshot(analyst, "foundation-study-overview-analyst");
    });

    // The lead's member list now shows the analyst with the role given in the invitation.
    await withScreenshotOnFailure(leadBrowser.context, "foundation-lead-members", async () => {
      await lead.goto(`${server.url}${studyPath}/members`);
      const row = lead.locator(`[data-member-email="${analystEmail}"]`);
      await row.waitFor();
      expect(await row.getByRole("combobox", { name: "Role of Invented Analyst" }).inputValue()).toBe("analyst");
      expect(await lead.getByRole("region", { name: "Pending invitations" }).innerText()).toContain("No invitations are waiting");
      await screenshot(lead, "foundation-members-lead");

      // The only study lead cannot step down: the server's last_owner refusal is shown plainly.
      await lead.getByRole("combobox", { name: "Role of Invented Study Lead" }).selectOption("reviewer");
      await lead.getByRole("dialog", { name: "Give up your study lead role?" }).getByRole("button", { name: "Become Reviewer" }).click();
      const refusal = lead.getByRole("alert").filter({ hasText: "A study needs a study lead" });
      await refusal.waitFor();
      expect(await refusal.innerText()).toContain("at least one study lead");
      expect(await lead.getByRole("combobox", { name: "Role of Invented Study Lead" }).inputValue()).toBe("owner");
    });

    // Signed out, someone tries to sign up with the analyst's address: the page does not say the
    // address is taken, and the analyst reads the notice in their own Outbox, links clickable.
    await withScreenshotOnFailure(leadBrowser.context, "foundation-sign-up-taken", async () => {
      await lead.getByRole("button", { name: "Account" }).click();
      await lead.getByRole("button", { name: "Sign out" }).click();
      await lead.waitForURL(/\/sign-in$/);
      await lead.goto(`${server.url}/sign-up`);
      await lead.getByLabel("Name").fill("Invented Impostor");
      await lead.getByLabel("E-mail").fill(analystEmail);
      await lead.getByLabel("Password", { exact: true }).fill("an impostor passphrase");
      await lead.getByRole("button", { name: "Create account" }).click();
      await lead.getByRole("heading", { name: "Check your e-mail" }).waitFor();
      await lead.getByRole("status").filter({ hasText: analystEmail }).waitFor();
      expect(await lead.locator("body").innerText()).not.toMatch(/already (exists|has an account|registered)/i);
    });
    await withScreenshotOnFailure(analystBrowser.context, "foundation-outbox", async () => {
      // Every signed-in person has the Outbox in the main navigation, not study leads only.
      await analyst.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Outbox" }).click();
      await analyst.waitForURL(`${server.url}/outbox`);
      const message = analyst.getByRole("article").filter({ hasText: "Someone tried to create" });
      await message.getByRole("heading", { name: "Someone tried to create a Stratasieve account with your address" }).waitFor();
      expect(await message.innerText()).toContain(analystEmail);
      expect(await message.getByRole("link", { name: `${server.url}/sign-in` }).getAttribute("href")).toBe(`${server.url}/sign-in`);
      // The invitation, sent before this account existed, is not in it.
      expect(await analyst.getByRole("article").filter({ hasText: studyName }).count()).toBe(0);
      await screenshot(analyst, "foundation-outbox");
    });

    // Signed out, a study page asks to sign in and then returns to that same page.
    await withScreenshotOnFailure(leadBrowser.context, "foundation-sign-in-and-back", async () => {
      await lead.goto(`${server.url}${studyPath}/members`);
      await lead.waitForURL(`${server.url}/sign-in?next=${encodeURIComponent(`${studyPath}/members`)}`);
      await lead.getByLabel("E-mail").fill(leadEmail);
      await lead.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await lead.getByRole("button", { name: "Sign in" }).click();
      await lead.waitForURL(`${server.url}${studyPath}/members`);
      await lead.getByRole("heading", { level: 1, name: "Members" }).waitFor();
    });
  });
});
