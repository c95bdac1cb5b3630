// Browser journey through threads: a reviewer opens a thread on one trait value from the trait
// table's cell panel and mentions a coder through the @ list; the coder follows the e-mailed link
// (signing in on the way), changes the value with a reason, and resolves the thread linking that
// coding decision. On the way, markup typed into a post stays visible text. Every taxon and value
// is invented.
import { randomUUID } from "node:crypto";
import { request as playwrightRequest } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { memberships } from "../../db/schema/index";
import { launchBrowser, screenshot, withScreenshotOnFailure } from "../support/browser";
import { linkIn, PASSWORD, startTestServer, uniqueEmail, waitForMail } from "../support/server";

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

/** An account made through the API on a cookie jar of its own; returns its id and e-mail. */
async function account(name: string) {
  const api = await playwrightRequest.newContext({ baseURL: server.url });
  const email = uniqueEmail(name.split(" ")[1]?.toLowerCase() ?? "person");
  const res = await api.post("/api/auth/signup", { data: { email, password: PASSWORD, name } });
  expect(res.status()).toBe(201);
  const user = (await res.json()) as { id: string };
  return { api, email, id: user.id };
}

describe("threads", () => {
  it("a reviewer asks about a value and mentions a coder, who follows the e-mailed link, fixes the value with a reason and resolves the thread with that decision", async () => {
    const { context } = browser;

    // Set-up through the API: a study lead with a study holding one invented taxon, a coder, and
    // the reviewer signed in in the browser; memberships written directly (invitations are not the subject).
    const lead = await account("Invented Lead");
    const created = await lead.api.post("/api/studies", { data: { name: `Invented Vessiran Basin crisis ${randomUUID().slice(0, 6)}`, suggestedCodebook: true } });
    const studyId = ((await created.json()) as { id: string }).id;
    const traits = ((await (await lead.api.get(`/api/studies/${studyId}/traits`)).json()) as { traits: Array<{ id: string; key: string }> }).traits;
    const bodySize = traits.find((t) => t.key === "body_size")!.id;
    const taxon = await lead.api.post(`/api/studies/${studyId}/taxa`, {
      data: { name: "Vessiraspis minor", higherTaxon: "Invented brachiopods", fad: { ma: 96 }, lad: { ma: 92 }, values: { [bodySize]: 120 } },
    });
    expect(taxon.status()).toBe(201);
    const coder = await account("Invented Coder");
    const reviewerEmail = uniqueEmail("reviewer");
    const signup = await context.request.post(`${server.url}/api/auth/signup`, { data: { email: reviewerEmail, password: PASSWORD, name: "Invented Reviewer" } });
    const reviewerId = ((await signup.json()) as { id: string }).id;
    await server.ctx.db.insert(memberships).values([
      { studyId, userId: coder.id, role: "coder" },
      { studyId, userId: reviewerId, role: "reviewer" },
    ]);
    const studyUrl = `${server.url}/studies/${studyId}`;
    const startedAt = new Date();

    const page = await context.newPage();
    let threadUrl = "";
    await withScreenshotOnFailure(context, "threads-reviewer", async () => {
      await page.goto(`${studyUrl}/table`);
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.waitFor();
      const cell = grid.locator('[role=row][data-taxon="Vessiraspis minor"] [role=gridcell][data-column="Body size"]');
      await cell.click();
      await page.getByRole("button", { name: "History of Body size for Vessiraspis minor" }).click();
      const panel = page.getByRole("dialog", { name: "Body size of Vessiraspis minor" });
      await panel.getByRole("tab", { name: "Discuss" }).click();
      await panel.getByText("No thread about Body size of Vessiraspis minor yet.").waitFor();
      await panel.getByRole("button", { name: "Start a thread" }).click();

      const form = panel.getByRole("form", { name: "Start a thread" });
      await form.getByLabel("Title").fill("Is 120 mm a decimal slip?");
      const post = form.getByLabel("Post", { exact: true });
      await post.click();
      await page.keyboard.type("The drawer label reads **12 mm**; <script>window.__threadProbe = 1</script> stays text. @Inv");
      // Typing @ lists the study's members (each line: initials, then the name); Enter picks the highlighted one.
      const options = page.getByRole("listbox", { name: "Members to mention" });
      await options.getByRole("option", { name: "Invented Coder" }).waitFor();
      expect((await options.getByRole("option").allInnerTexts()).map((t) => t.split("\n").pop()?.trim())).toEqual(["Invented Coder", "Invented Lead", "Invented Reviewer"]);
      await page.keyboard.press("Enter");
      await page.keyboard.type("could you check?");
      expect(await post.inputValue()).toContain("@Invented Coder could you check?");
      await form.getByRole("button", { name: "Start thread" }).click();

      const thread = panel.locator("[data-thread-view]");
      await thread.getByRole("heading", { name: "Is 120 mm a decimal slip?" }).waitFor();
      const body = thread.locator("[data-post-body]").first();
      // The typed markup is on the page as text; no element came from it and nothing ran.
      expect(await body.innerText()).toContain("<script>window.__threadProbe = 1</script> stays text.");
      expect(await body.locator("script").count()).toBe(0);
      expect(await page.evaluate(() => (window as unknown as { __threadProbe?: number }).__threadProbe)).toBeUndefined();
      expect(await body.locator("strong").innerText()).toBe("12 mm");
      expect(await body.locator("[data-mention]").innerText()).toBe("@Invented Coder");
      await screenshot(page, "thread-on-a-value");

      // The grid now marks the value with an open thread.
      await cell.getByRole("img", { name: "Open thread about this value" }).waitFor();
      await panel.getByRole("button", { name: /Close/ }).click();

      const threads = await (await context.request.get(`${server.url}/api/studies/${studyId}/threads`)).json();
      threadUrl = `${studyUrl}/threads/${threads.rows[0].id}`;
      await context.request.post(`${server.url}/api/auth/logout`);
    });

    await withScreenshotOnFailure(context, "threads-coder", async () => {
      // One e-mail, with a link straight to the thread.
      const mail = await waitForMail(server, coder.email, { subject: "mentioned you", since: startedAt });
      expect(mail.subject).toContain('Invented Reviewer mentioned you in "Is 120 mm a decimal slip?"');
      const link = linkIn(mail.text, "/threads/");
      expect(link).toBe(threadUrl);

      // Signed out, the link goes through sign-in and comes back to the thread.
      await page.goto(link);
      await page.waitForURL(/\/sign-in\?next=/);
      await page.getByLabel("E-mail").fill(coder.email);
      await page.getByLabel("Password", { exact: true }).fill(PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(threadUrl);
      await page.getByRole("heading", { level: 1, name: "Is 120 mm a decimal slip?" }).waitFor();
      // Opening the thread read the mention: the bell has nothing unread.
      await expect.poll(() => page.getByRole("button", { name: /^Notifications/ }).innerText()).not.toMatch(/\d/);

      // The coder fixes the value in the trait table, with a reason.
      await page.getByRole("link", { name: "Open the trait table" }).click();
      const grid = page.getByRole("grid", { name: "Trait table" });
      await grid.waitFor();
      const cell = grid.locator('[role=row][data-taxon="Vessiraspis minor"] [role=gridcell][data-column="Body size"]');
      await cell.click();
      await page.keyboard.press("Enter");
      await page.getByLabel("Body size of Vessiraspis minor").fill("12");
      await page.keyboard.press("Enter");
      const ask = page.getByRole("dialog", { name: "Why change this value?" });
      await ask.getByLabel("Reason").fill("Decimal slip: the drawer label gives 12 mm");
      await ask.getByRole("button", { name: "Save change" }).click();
      await ask.waitFor({ state: "hidden" });
      await expect.poll(() => cell.locator("[data-cell-value]").textContent()).toBe("12 mm");

      // Back to the thread from the Threads screen, and resolved with that decision linked.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Threads" }).click();
      await page.getByRole("heading", { level: 1, name: "Threads" }).waitFor();
      await page.getByRole("link", { name: "Is 120 mm a decimal slip?" }).click();
      await page.waitForURL(threadUrl);
      await page.getByRole("button", { name: "Resolve…" }).click();
      const resolve = page.getByRole("form", { name: "Resolve the thread" });
      // The newest decision about the value is proposed (the thread is read afresh on opening).
      await expect.poll(() => resolve.locator("label").nth(1).innerText()).toContain("Decimal slip");
      expect(await resolve.getByRole("radio").nth(1).isChecked()).toBe(true);
      const choice = await resolve.locator("label").nth(1).innerText();
      expect(choice).toMatch(/Changed Body size of Vessiraspis minor: 120 mm\s*→\s*(to\s*)?12 mm/);
      expect(choice).toContain("Decimal slip: the drawer label gives 12 mm");
      await resolve.getByRole("button", { name: "Resolve thread" }).click();

      const resolution = page.getByRole("region", { name: "Resolution" });
      await resolution.getByText("Settled by the coding decision").waitFor();
      expect(await resolution.innerText()).toContain("Resolved by Invented Coder");
      expect(await resolution.innerText()).toContain("Decimal slip: the drawer label gives 12 mm");
      await screenshot(page, "thread-resolved");

      // The API agrees: resolved, linked to the coder's change.
      const detail = await (await context.request.get(`${server.url}/api/studies/${studyId}/threads/${threadUrl.split("/").pop()}`)).json();
      expect(detail.status).toBe("resolved");
      expect(detail.resolutionDecision).toMatchObject({ subject: "Body size of Vessiraspis minor", oldText: "120 mm", newText: "12 mm", user: { name: "Invented Coder" } });

      // The overview's activity feed tells the story, newest first.
      await page.getByRole("navigation", { name: "Study" }).getByRole("link", { name: "Overview" }).click();
      const feed = page.getByRole("list", { name: "Activity, newest first" });
      await feed.waitFor();
      const entries = await feed.getByRole("listitem").allInnerTexts();
      expect(entries[0]).toContain("Invented Coder resolved “Is 120 mm a decimal slip?”, linking the coding decision that settled it");
      expect(entries[1]).toContain("Invented Reviewer opened “Is 120 mm a decimal slip?” about Body size of Vessiraspis minor");
    });
  });
});
