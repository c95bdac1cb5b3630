// One browser journey per person of the product, each a short working day in the invented demo
// study through the real screens, server and database: the study lead (invites someone who joins
// through the e-mailed link, changes a role, removes a member), the coder (adds a state to the
// codebook, imports a small file using it, fixes a value with a reason), the analyst (reads a
// boundary, runs a selectivity test across it, exports the run), the reviewer (questions a run and
// mentions the analyst, who is e-mailed), the conservation biologist (reads the modern comparison
// and exports it) and the guest (reads every screen and finds nothing to change). Every taxon,
// species, place and person here is invented.
import { readFileSync } from "node:fs";
import Papa from "papaparse";
import { request as playwrightRequest, type Download, type Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { memberships } from "../../db/schema/index";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { seedDemoStudy, signInAs, signOut, type DemoFixture } from "../support/demo";
import { linkIn, PASSWORD, startTestServer, uniqueEmail, waitForMail } from "../support/server";

type Server = Awaited<ReturnType<typeof startTestServer>>;
type Browser = Awaited<ReturnType<typeof launchBrowser>>;

let server: Server;
let demo: DemoFixture;
/** The person whose day it is. */
let browser: Browser;
/** Someone else at the same time (the invitee in the lead's journey). */
let other: Browser;

beforeAll(async () => {
  server = await startTestServer();
  demo = await seedDemoStudy(server);
  browser = await launchBrowser();
  other = await launchBrowser();
});

afterEach(async () => {
  for (const b of [browser, other]) {
    for (const page of b.context.pages().slice(1)) await page.close();
    await signOut(b.context, server.url);
  }
});

afterAll(async () => {
  await other?.close();
  await browser?.close();
  await server?.close();
});

const studyNav = (page: Page, name: string) => page.getByRole("navigation", { name: "Study" }).getByRole("link", { name, exact: true }).click();
const h1 = (page: Page, name: string | RegExp) => page.getByRole("heading", { level: 1, name }).waitFor();

/** The text of the <dd> that follows the <dt> with this label. */
async function fact(page: Page, label: string): Promise<string> {
  const value = page.locator("dt", { hasText: label }).locator("xpath=following-sibling::dd[1]");
  await value.waitFor();
  return (await value.innerText()).trim();
}

/** A downloaded CSV file as rows of cells (RFC 4180, as the exports write it). */
async function csvRows(download: Download): Promise<string[][]> {
  const parsed = Papa.parse<string[]>(readFileSync(await download.path(), "utf8"), { skipEmptyLines: true });
  return parsed.data;
}

describe("a day of each person in the demo study", () => {
  it("the study lead invites a coder who joins through the e-mailed link, then makes them an analyst and removes a departing member", async () => {
    const lead = demo.account.owner;
    const inviteeEmail = uniqueEmail("journey-invitee");
    // A collaborator who is leaving the project, made a member directly (how they joined is not the subject).
    const departing = await playwrightRequest.newContext({ baseURL: server.url });
    const departingEmail = uniqueEmail("journey-departing");
    const signup = await departing.post("/api/auth/signup", { data: { email: departingEmail, password: PASSWORD, name: "Invented Departing Reviewer" } });
    expect(signup.status()).toBe(201);
    await server.ctx.db.insert(memberships).values({ studyId: demo.studyId, userId: ((await signup.json()) as { id: string }).id, role: "reviewer" });
    expect((await departing.get(`/api/studies/${demo.studyId}`)).status()).toBe(200);

    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "journey-lead", async () => {
      // Signing in through the form, and straight into the study's members.
      await page.goto(`${demo.studyUrl}/members`);
      await page.waitForURL(/\/sign-in\?next=/);
      await page.getByLabel("E-mail").fill(lead.email);
      await page.getByLabel("Password", { exact: true }).fill(lead.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(`${demo.studyUrl}/members`);
      await h1(page, "Members");

      await page.getByLabel("E-mail").fill(inviteeEmail);
      await page.getByLabel("Role", { exact: true }).selectOption("coder");
      await page.getByRole("button", { name: "Send invitation" }).click();
      await page.getByText(`Invitation sent to ${inviteeEmail}`).waitFor();
      await page.getByRole("region", { name: "Pending invitations" }).getByText(inviteeEmail).waitFor();
    });

    const invitee = await other.context.newPage();
    await withScreenshotOnFailure(other.context, "journey-invitee", async () => {
      const mail = await waitForMail(server, inviteeEmail);
      await invitee.goto(linkIn(mail.text, "/invitations/"));
      expect(await fact(invitee, "Role")).toContain("Coder");
      await invitee.getByRole("link", { name: "Create an account" }).click();
      await invitee.getByLabel("Name").fill("Invented New Coder");
      await invitee.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await invitee.getByRole("button", { name: "Create account" }).click();
      await invitee.getByRole("button", { name: "Accept and open the study" }).click();
      await invitee.waitForURL(demo.studyUrl);
      expect(await fact(invitee, "Your role")).toContain("Coder");
    });

    await withScreenshotOnFailure(browser.context, "journey-lead-roles", async () => {
      // The lead sees the new member, gives them the analyst role, and removes the departing reviewer.
      await page.reload();
      const newcomerRole = page.getByRole("combobox", { name: "Role of Invented New Coder" });
      await newcomerRole.waitFor();
      expect(await newcomerRole.inputValue()).toBe("coder");
      await newcomerRole.selectOption("analyst");
      await page.getByText("Invented New Coder is now Analyst.").waitFor();

      await page.getByRole("button", { name: "Remove Invented Departing Reviewer" }).click();
      const confirm = page.getByRole("dialog", { name: "Remove Invented Departing Reviewer?" });
      expect(await confirm.innerText()).toContain(departingEmail);
      await confirm.getByRole("button", { name: "Remove", exact: true }).click();
      await page.getByText("Invented Departing Reviewer was removed from the study.").waitFor();
      await page.locator(`[data-member-email="${departingEmail}"]`).waitFor({ state: "detached" });
      await screenshot(page, "journey-lead-members");
    });

    await withScreenshotOnFailure(other.context, "journey-invitee-analyst", async () => {
      // The new member's own screen says Analyst now; the departing member is refused the study.
      await invitee.reload();
      expect(await fact(invitee, "Your role")).toContain("Analyst");
      expect((await departing.get(`/api/studies/${demo.studyId}`)).status()).toBe(403);
    });
    await departing.dispose();
  });

  it("the coder adds a state to the codebook, imports two taxa that use it, and corrects a value with a reason", async () => {
    await signInAs(browser.context, server.url, demo.account.coder);
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "journey-coder", async () => {
      await page.goto(`${demo.studyUrl}/codebook`);
      await page.getByRole("button", { name: "Edit Life habit" }).click();
      const editor = page.getByRole("form", { name: "Edit “Life habit”" });
      await editor.getByRole("button", { name: "Add a state" }).click();
      const codes = editor.getByLabel(/^Code of state \d+$/);
      const added = await codes.count();
      await editor.getByLabel(`Code of state ${added}`).fill("boring");
      await editor.getByLabel(`Label of state ${added}`).fill("Boring into hard ground");
      await editor.getByRole("button", { name: "Save trait" }).click();
      await page.getByText("Saved “Life habit”.").waitFor();
      expect(await page.getByRole("list", { name: "States of Life habit" }).innerText()).toContain("Boring into hard ground");

      // A small file from the field notebook uses the new state.
      await studyNav(page, "Imports");
      await h1(page, "Imports");
      const csv = [
        "name,higher_taxon,first_appearance,last_appearance,life_habit,body_size",
        "Perforella prima (invented),Perforellidae,Cenomanian,Turonian,boring,9",
        "Perforella secunda (invented),Perforellidae,Cenomanian,Coniacian,boring,14",
      ].join("\n");
      await page.getByLabel("CSV file", { exact: true }).setInputFiles({ name: "perforella-invented.csv", mimeType: "text/csv", buffer: Buffer.from(csv) });
      await page.getByRole("button", { name: "Upload and read the file" }).click();
      const mapping = page.getByRole("form", { name: "Map the columns" });
      await mapping.waitFor();
      await mapping.getByLabel("Name", { exact: true }).selectOption("name");
      await mapping.getByLabel("Higher taxon").selectOption("higher_taxon");
      await mapping.getByLabel("First appearance").selectOption("first_appearance");
      await mapping.getByLabel("Last appearance").selectOption("last_appearance");
      await mapping.getByLabel("Life habit").selectOption("life_habit");
      await mapping.getByLabel("Body size").selectOption("body_size");
      for (const unused of ["Notes", "Environment", "Feeding mode", "Geographic range"]) await mapping.getByLabel(unused).selectOption("");
      await mapping.getByRole("button", { name: "Check every row" }).click();
      const commit = page.getByRole("form", { name: "Commit the import" });
      await commit.getByRole("button", { name: "Import 2 rows" }).click();
      const done = page.getByRole("status").filter({ hasText: "Imported perforella-invented.csv" });
      await done.waitFor();
      expect(await done.innerText()).toContain("2 taxa added");

      // In the table: the new state is shown by its label, and a transposed size is put right.
      await page.getByRole("link", { name: "Open the trait table" }).click();
      await page.getByLabel("Search names").fill("Perforella");
      await page.getByText("Taxa 1–2 of 2").waitFor();
      const grid = page.getByRole("grid", { name: "Trait table" });
      const cell = (taxon: string, column: string) => grid.locator(`[role=row][data-taxon="${taxon}"] [role=gridcell][data-column="${column}"]`);
      expect(await cell("Perforella prima (invented)", "Life habit").locator("[data-cell-value]").textContent()).toBe("Boring into hard ground");
      await cell("Perforella secunda (invented)", "Body size").click();
      await page.keyboard.press("Enter");
      await page.getByLabel("Body size of Perforella secunda (invented)").fill("41");
      await page.keyboard.press("Enter");
      const ask = page.getByRole("dialog", { name: "Why change this value?" });
      await ask.getByLabel("Reason").fill("Digits transposed in the notebook: the drawer label reads 41 mm (invented)");
      await ask.getByRole("button", { name: "Save change" }).click();
      await ask.waitFor({ state: "hidden" });
      await expect.poll(() => cell("Perforella secunda (invented)", "Body size").locator("[data-cell-value]").textContent()).toBe("41 mm");

      await page.getByRole("button", { name: "History of Body size for Perforella secunda (invented)" }).click();
      const history = page.getByRole("dialog", { name: "Body size of Perforella secunda (invented)" });
      await history.getByText("From the import of perforella-invented.csv").waitFor();
      const entries = await history.getByRole("list", { name: "Changes, newest first" }).getByRole("listitem").allInnerTexts();
      expect(entries[0]).toContain("Changed · Demo coder");
      expect(entries[0]).toContain("Digits transposed in the notebook");
      expect(entries[1]).toContain("From the import of perforella-invented.csv");
      await screenshot(page, "journey-coder-history");
    });
  });

  it("the analyst reads the base of the Turonian, tests two traits across it, and exports the run", async () => {
    await signInAs(browser.context, server.url, demo.account.analyst);
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "journey-analyst", async () => {
      await page.goto(`${demo.studyUrl}/boundary`);
      // The screen opens at the study's main boundary, the demo crisis's Turonian. Its view is let in
      // before the analyst picks the stage again, so the waits below can only be met by the view of
      // that pick (each select moves the screen: the Cretaceous, then the Upper Cretaceous, then
      // the Turonian), not by the opening view while the pick's moves are still on their way.
      await page.getByText(/ taxa at 93\.9 Ma, window /).waitFor();
      await page.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await page.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await page.getByLabel("Stage", { exact: true }).selectOption("Turonian");
      await page.waitForURL(/[?&]unit=Turonian(&|$)/);
      // The counts on screen belong to the Turonian only once the summary names its base (the
      // previous choice's counts stay visible while the new ones load).
      await page.getByText(/ taxa at 93\.9 Ma, window /).waitFor();
      const tiles = page.locator('[aria-label="Outcome counts"] > div');
      await tiles.first().waitFor();
      const count = async (label: string) => (await tiles.filter({ has: page.locator("dt", { hasText: label }) }).locator("dd").first().innerText()).trim();
      await expect.poll(() => count("Victims")).toMatch(/^\d[\d,]*$/);
      const victims = await count("Victims");
      const survivors = await count("Survivors");

      // The same boundary on the Selectivity screen, with two traits.
      await studyNav(page, "Selectivity");
      const addForm = page.getByRole("form", { name: "Add a boundary" });
      await addForm.getByLabel("Period", { exact: true }).selectOption("Cretaceous");
      await addForm.getByLabel("Epoch", { exact: true }).selectOption("UpperCretaceous");
      await addForm.getByLabel("Stage", { exact: true }).selectOption("Turonian");
      await addForm.getByRole("button", { name: "Add boundary" }).click();
      await page.getByRole("list", { name: "Chosen boundaries" }).getByText("Base of the Turonian").waitFor();
      await page.getByRole("checkbox", { name: /^Feeding mode/ }).check();
      await page.getByRole("checkbox", { name: /^Geographic range/ }).check();
      await page.getByLabel("Reference state of Feeding mode").selectOption("suspension");
      // The design counts the same victims and survivors as the Boundary screen.
      await page.getByTestId("design-summary").getByText(`${victims} victims and ${survivors} survivors`).first().waitFor();

      await page.getByLabel("Name of the run").fill("Feeding and range at the Turonian (journey)");
      await page.getByRole("button", { name: "Run the tests" }).click();
      await page.waitForURL(/[?&]run=[0-9a-f-]{36}/);
      const forest = page.getByTestId("forest-plot");
      await forest.waitFor({ timeout: 60_000 });
      await page.getByTestId("run-cautions").getByText("not proof of a kill mechanism", { exact: false }).waitFor();
      expect(await forest.locator('[data-contrast^="feeding:"]').count()).toBeGreaterThan(0);
      expect(await forest.locator('[data-contrast^="geographic_range"]').count()).toBeGreaterThan(0);

      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Download CSV" }).click()]);
      expect(download.suggestedFilename()).toMatch(/^feeding-and-range-at-the-turonian-journey_.*\.csv$/);
      const rows = await csvRows(download);
      expect(rows[0].slice(0, 3)).toEqual(["table", "field", "value"]);
      const runField = (field: string) => rows.find((r) => r[0] === "run" && r[1] === field)?.[2];
      expect(runField("data_hash_sha256")).toMatch(/^[0-9a-f]{64}$/);
      // The file's design row has the victims and survivors the screens showed (without thousands separators).
      const design = rows.find((r) => r[0] === "design")!;
      expect(design[rows[0].indexOf("victims")]).toBe(victims.replace(/,/g, ""));
      expect(design[rows[0].indexOf("survivors")]).toBe(survivors.replace(/,/g, ""));

      // The run is kept on the Runs screen, finished.
      await studyNav(page, "Runs");
      const listed = page.locator('tr[data-run="Feeding and range at the Turonian (journey)"]');
      expect(await listed.locator("[data-status]").getAttribute("data-status")).toBe("succeeded");
    });
  });

  it("the reviewer questions the demo's crisis run and mentions the analyst, who is e-mailed a link to the thread", async () => {
    await signInAs(browser.context, server.url, demo.account.reviewer);
    const since = new Date();
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "journey-reviewer", async () => {
      await page.goto(`${demo.studyUrl}/runs`);
      await page.locator(`tr[data-run-id="${demo.analyses.crisisRunId}"]`).getByRole("link").first().click();
      await page.getByTestId("forest-plot").waitFor();
      // A reviewer reads the run but may not re-run it.
      expect(await page.getByRole("button", { name: "Re-run on today’s data" }).count()).toBe(0);

      await page.getByRole("button", { name: "Discuss", exact: true }).click();
      const panel = page.getByRole("dialog", { name: /^The run “Crisis at the base of the Turonian/ });
      await panel.getByRole("button", { name: "Start a thread" }).click();
      const form = panel.getByRole("form", { name: "Start a thread" });
      await form.getByLabel("Title").fill("Is the life habit signal only the hard-hit family?");
      await form.getByLabel("Post", { exact: true }).click();
      await page.keyboard.type("The flag on life habit suggests so. @Demo an");
      await page.getByRole("listbox", { name: "Members to mention" }).getByRole("option", { name: "Demo analyst" }).waitFor();
      await page.keyboard.press("Enter");
      await page.keyboard.type("could you add a run without that family?");
      await form.getByRole("button", { name: "Start thread" }).click();
      const thread = panel.locator("[data-thread-view]");
      await thread.getByRole("heading", { name: "Is the life habit signal only the hard-hit family?" }).waitFor();
      expect(await thread.locator("[data-mention]").innerText()).toBe("@Demo analyst");
      await screenshot(page, "journey-reviewer-thread-on-a-run");

      // Closing the panel gives focus back to Discuss, which now counts the open thread.
      await page.keyboard.press("Escape");
      const discuss = page.getByRole("button", { name: /^Discuss 1 open$/ });
      await discuss.waitFor();
      expect(await discuss.evaluate((el) => el === document.activeElement)).toBe(true);
    });

    // The analyst is e-mailed, and the link opens the thread, which leads back to the run.
    const mail = await waitForMail(server, demo.account.analyst.email, { subject: "mentioned you", since });
    expect(mail.subject).toContain("Demo reviewer mentioned you");
    await signOut(browser.context, server.url);
    await signInAs(browser.context, server.url, demo.account.analyst);
    await withScreenshotOnFailure(browser.context, "journey-reviewer-mention", async () => {
      await page.goto(linkIn(mail.text, "/threads/"));
      await h1(page, "Is the life habit signal only the hard-hit family?");
      await page.getByRole("link", { name: "Open the run" }).click();
      await page.waitForURL(new RegExp(`[?&]run=${demo.analyses.crisisRunId}`));
      await page.getByTestId("forest-plot").waitFor();
    });
  });

  it("the conservation biologist reads the modern comparison, with its caution, and exports the numbers behind it", async () => {
    await signInAs(browser.context, server.url, demo.account.analyst);
    const page = await browser.context.newPage();
    await withScreenshotOnFailure(browser.context, "journey-conservation", async () => {
      await page.goto(demo.studyUrl);
      await studyNav(page, "Modern comparison");
      await page.getByRole("note").filter({ hasText: "does not replace a formal threat assessment" }).waitFor();
      await page.getByRole("link", { name: "Modern Vessiran species against the crisis model (invented demo)" }).first().click();
      await h1(page, "Modern Vessiran species against the crisis model (invented demo)");
      await page.getByRole("note").filter({ hasText: "A screening aid, not an assessment" }).waitFor();
      const chart = page.getByTestId("roc-chart").locator("svg");
      await chart.waitFor();
      const shownAuc = (await chart.getAttribute("aria-label"))?.match(/area under the curve (\d\.\d+)/)?.[1];
      expect(shownAuc).toBeDefined();
      expect(await page.getByRole("table", { name: "Worth a look" }).locator("tbody tr").count()).toBeGreaterThan(0);

      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "Export CSV" }).click()]);
      const rows = await csvRows(download);
      const field = (name: string) => rows.find((r) => r[0] === "comparison" && r[1] === name)?.[2];
      // The file holds the same area under the curve as the chart, and the caution travels with it.
      expect(Number(field("auc")).toFixed(shownAuc!.split(".")[1].length)).toBe(shownAuc);
      expect(rows.some((r) => r[0] === "comparison" && r[1] === "caution" && r[2].includes("does not replace a formal threat assessment"))).toBe(true);
      expect(rows.filter((r) => r[0] === "species").length).toBe(Number(field("species")));
    });
  });

  it("the guest reads every screen and finds nothing that changes the study", async () => {
    await signInAs(browser.context, server.url, demo.account.viewer);
    const page = await browser.context.newPage();
    // Names of controls that change something; none may be on a guest's screen, or they must be switched off.
    const CHANGES =
      /^(Edit|Delete|Remove|Leave|Save|Upload|Import \d|Send invitation|Run the tests|Re-run|Retry|Start a thread|Reply|Resolve|Reopen|Set outcome|Revoke|Revert|Restore|Retire|Add (a )?(trait|state|taxon|boundary)|Compare and save|Move)(?![a-z])/i;
    const enabledChanges = () =>
      page.evaluate((source) => {
        const pattern = new RegExp(source, "i");
        return Array.from(document.querySelectorAll<HTMLButtonElement | HTMLAnchorElement>("button, a[href], input[type=submit]"))
          .filter((el) => !(el as HTMLButtonElement).disabled && el.getAttribute("aria-disabled") !== "true")
          .map((el) => (el.getAttribute("aria-label") ?? el.textContent ?? "").replace(/\s+/g, " ").trim())
          .filter((name) => pattern.test(name));
      }, CHANGES.source);

    await withScreenshotOnFailure(browser.context, "journey-guest", async () => {
      const screens: Array<[string, string, (p: Page) => Promise<unknown>]> = [
        ["Overview", "", (p) => p.getByRole("list", { name: "Activity, newest first" }).waitFor()],
        ["Trait table", "/table", (p) => p.getByRole("grid", { name: "Trait table" }).locator("[role=row][data-taxon]").first().waitFor()],
        ["Codebook", "/codebook", (p) => p.getByRole("region", { name: "Traits in use" }).waitFor()],
        ["Imports", "/imports", (p) => p.locator("[data-import-file]").first().waitFor()],
        ["Boundary", "/boundary?unit=Turonian", (p) => p.locator('[aria-label="Outcome counts"]').waitFor()],
        ["Selectivity", `/selectivity?run=${demo.analyses.crisisRunId}`, (p) => p.getByTestId("forest-plot").waitFor()],
        ["Runs", "/runs", (p) => p.locator("tr[data-run-id]").first().waitFor()],
        ["Modern comparison", "/modern-comparison", (p) => p.getByRole("heading", { name: "Saved comparisons" }).waitFor()],
        ["Crosswalk", `/modern-comparison/lists/${demo.listId}`, (p) => h1(p, /^Crosswalk/)],
        ["Comparison", `/modern-comparison/comparisons/${demo.analyses.comparisonId}`, (p) => p.getByTestId("roc-chart").locator("svg").waitFor()],
        ["Threads", "/threads", (p) => p.locator("[data-thread]").first().waitFor()],
        ["Members", "/members", (p) => p.locator("[data-member-email]").first().waitFor()],
      ];
      for (const [screen, path, ready] of screens) {
        await page.goto(`${demo.studyUrl}${path}`);
        await ready(page);
        expect(await enabledChanges(), screen).toEqual([]);
      }

      // Members are listed by role badge, with no role to choose and no invitation form.
      expect(await page.getByRole("combobox", { name: /^Role of / }).count()).toBe(0);
      expect(await page.getByLabel("E-mail").count()).toBe(0);

      // One thread: read, without a reply box.
      await page.goto(`${demo.studyUrl}/threads`);
      await page.locator("[data-thread]").first().getByRole("link").first().click();
      await page.getByRole("list", { name: "Posts, oldest first" }).waitFor();
      expect(await page.getByRole("form", { name: "Reply" }).count()).toBe(0);
      expect(await enabledChanges()).toEqual([]);

      // The trait table reads only: each cell says so, and Enter opens no editor.
      await page.goto(`${demo.studyUrl}/table`);
      const grid = page.getByRole("grid", { name: "Trait table" });
      const cell = grid.locator("[role=row][data-taxon] [role=gridcell][data-column='Body size']").first();
      await cell.click();
      expect(await cell.getAttribute("aria-readonly")).toBe("true");
      await page.keyboard.press("Enter");
      expect(await page.getByRole("textbox", { name: /^Body size of / }).count()).toBe(0);
      expect(await grid.getByRole("checkbox").count()).toBe(0);
    });
  });
});
