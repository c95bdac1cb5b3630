// Threads, mentions, notifications and the activity feed through the API: who may post, resolve
// and reopen; mentions e-mailed at once (one message, with a link straight to the thread) or
// collected in a daily digest; post bodies kept verbatim (script tags included) for the client to
// render as text; the trait table marking values with open threads; membership changes in the
// feed. Every taxon and value is invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, arrayContains, eq, gt, ilike, inArray } from "drizzle-orm";
import { activity, memberships, notifications, outboxMessages } from "../../db/schema/index";
import { latestDigestCutoff } from "../../server/services/notifications";
import { createTestApp, signedInAgent, waitForMail, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
let study: CodebookStudy;
const taxonId: Record<string, string> = {};

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  study = await studyWithCodebook(app, cast, "Invented thread study");
  const rows = [
    "name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range",
    "Vessiraspis minor,Invented brachiopods,96,92,marine,epifaunal,suspension,120,2",
    "Tethyconcha lata,Invented bivalves,99,94.5,marine,infaunal,deposit,35,4",
  ];
  const { commit } = await importCsv(cast.people.coder.agent, study, rows.join("\n"));
  if (commit.status !== 200) throw new Error(`test setup: import ${commit.status} ${JSON.stringify(commit.body)}`);
  const taxa = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`);
  for (const row of taxa.body.rows as Array<{ id: string; name: string }>) taxonId[row.name] = row.id;
});
afterAll(() => app.close());

const threadsPath = () => `/api/studies/${study.studyId}/threads`;
const sizeOf = (name: string) => ({ type: "value", id: taxonId[name], traitId: study.trait.body_size.id });

async function openThread(who: keyof Cast["people"], body: Record<string, unknown>) {
  const res = await cast.people[who].agent.post(threadsPath()).send(body);
  if (res.status !== 201) throw new Error(`test setup: thread ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as { id: string; title: string; posts: Array<{ id: string; body: string }> };
}

/** Messages to the address since a moment, optionally only those whose subject holds `about`. */
async function mailsTo(email: string, since: Date, about?: string) {
  return app.ctx.db
    .select()
    .from(outboxMessages)
    .where(and(arrayContains(outboxMessages.toAddresses, [email]), gt(outboxMessages.receivedAt, since), about ? ilike(outboxMessages.subject, `%${about}%`) : undefined));
}

describe("posting", () => {
  it("lets a viewer read threads but not open one or reply", async () => {
    const thread = await openThread("reviewer", { target: sizeOf("Vessiraspis minor"), body: "Is 120 mm a slip?" });
    const viewer = cast.people.viewer.agent;
    expect((await viewer.get(`${threadsPath()}/${thread.id}`)).status).toBe(200);

    const open = await viewer.post(threadsPath()).send({ target: sizeOf("Tethyconcha lata"), body: "A guest's question" });
    expect(open.status).toBe(403);
    expect(open.body.error.message).toMatch(/role/i);
    const reply = await viewer.post(`${threadsPath()}/${thread.id}/posts`).send({ body: "A guest's reply" });
    expect(reply.status).toBe(403);
    const detail = await viewer.get(`${threadsPath()}/${thread.id}`);
    expect(detail.body.posts).toHaveLength(1);
  });

  it("opens a thread on a trait value with a title from the first line, and names the target in words", async () => {
    const thread = await cast.people.analyst.agent.post(threadsPath()).send({ target: sizeOf("Tethyconcha lata"), body: "**Size** of the adult or the juvenile?\nThe holotype is small." });
    expect(thread.status).toBe(201);
    expect(thread.body).toMatchObject({
      title: "Size of the adult or the juvenile?",
      status: "open",
      target: { type: "value", id: taxonId["Tethyconcha lata"], traitId: study.trait.body_size.id, label: "Body size of Tethyconcha lata", missing: false },
      author: { id: cast.people.analyst.user.id, name: "Test analyst" },
      postCount: 1,
    });
  });

  it("returns a body with script tags exactly as written", async () => {
    const body = 'See <script>alert("x")</script> and <img src=x onerror=alert(1)> and [x](javascript:alert(1))';
    const thread = await openThread("reviewer", { target: { type: "taxon", id: taxonId["Vessiraspis minor"] }, title: "Markup check", body });
    const detail = await cast.people.coder.agent.get(`${threadsPath()}/${thread.id}`);
    expect(detail.body.posts[0].body).toBe(body);
    // The list's excerpt is plain text of the same body (markers dropped, tags kept as text).
    const list = await cast.people.coder.agent.get(`${threadsPath()}?targetId=${taxonId["Vessiraspis minor"]}&targetType=taxon`);
    const row = list.body.rows.find((r: { id: string }) => r.id === thread.id);
    expect(row.lastPost.excerpt).toContain('<script>alert("x")</script>');
  });

  it("refuses a missing target, a value thread without its trait, a body over 10,000 characters and mentions of non-members, naming the field", async () => {
    const reviewer = cast.people.reviewer.agent;
    const missing = await reviewer.post(threadsPath()).send({ target: { type: "taxon", id: "00000000-0000-4000-8000-000000000000" }, body: "Where?" });
    expect(missing.status).toBe(400);
    expect(missing.body.error.fields).toHaveProperty("target.id");

    const noTrait = await reviewer.post(threadsPath()).send({ target: { type: "value", id: taxonId["Vessiraspis minor"] }, body: "Which value?" });
    expect(noTrait.status).toBe(400);
    expect(noTrait.body.error.fields["target.traitId"]).toMatch(/traitId/);

    const long = await reviewer.post(threadsPath()).send({ target: sizeOf("Vessiraspis minor"), body: "x".repeat(10_001) });
    expect(long.status).toBe(400);
    expect(long.body.error.fields.body).toMatch(/10,000/);
    const exactly = await reviewer.post(threadsPath()).send({ target: sizeOf("Vessiraspis minor"), body: "x".repeat(10_000) });
    expect(exactly.status).toBe(201);

    const stranger = await reviewer.post(threadsPath()).send({ target: sizeOf("Vessiraspis minor"), body: "@Test stranger?", mentions: [cast.people.stranger.user.id] });
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.fields.mentions).toContain(cast.people.stranger.user.id);
  });

  it("marks the value's cell and row in the trait table while the thread is open, and filters by it", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?hasOpenThread=true`);
    const row = res.body.rows.find((r: { name: string }) => r.name === "Tethyconcha lata");
    expect(row.openThreads.traitIds).toContain(study.trait.body_size.id);
    expect(row.openThreads.count).toBeGreaterThan(0);
  });
});

describe("resolving", () => {
  it("lets the author (a reviewer) resolve and reopen, but not another reviewer", async () => {
    const otherReviewer = await signedInAgent(app, "second-reviewer");
    // Direct membership: the invitation path is not the subject here.
    await app.ctx.db.insert(memberships).values({ studyId: study.studyId, userId: otherReviewer.user.id, role: "reviewer" });
    const thread = await openThread("reviewer", { target: { type: "trait", id: study.trait.feeding.id }, body: "Should grazers include browsers?" });
    const refused = await otherReviewer.agent.post(`${threadsPath()}/${thread.id}/resolve`).send({});
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/opened this thread, a coder or the study lead/);

    const resolved = await cast.people.reviewer.agent.post(`${threadsPath()}/${thread.id}/resolve`).send({});
    expect(resolved.status).toBe(200);
    expect(resolved.body).toMatchObject({ status: "resolved", resolvedBy: { id: cast.people.reviewer.user.id } });
    const again = await cast.people.coder.agent.post(`${threadsPath()}/${thread.id}/resolve`).send({});
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/already resolved by Test reviewer/);

    const reopened = await cast.people.reviewer.agent.post(`${threadsPath()}/${thread.id}/reopen`);
    expect(reopened.status).toBe(200);
    expect(reopened.body).toMatchObject({ status: "open", resolvedBy: null, resolvedAt: null });
    expect((await cast.people.reviewer.agent.post(`${threadsPath()}/${thread.id}/reopen`)).status).toBe(409);
  });

  it("links the coding decision that settled a value thread, offered among the value's recent decisions", async () => {
    const thread = await openThread("reviewer", { target: sizeOf("Vessiraspis minor"), title: "120 mm?", body: "Drawer label says 12 mm." });
    const row = (await cast.people.coder.agent.get(`/api/studies/${study.studyId}/taxa/${taxonId["Vessiraspis minor"]}`)).body;
    const edit = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/taxa/${taxonId["Vessiraspis minor"]}`)
      .send({ version: row.version, changes: { values: { [study.trait.body_size.id]: 12 } }, reason: "Decimal slip, per the drawer label" });
    expect(edit.status).toBe(200);

    const detail = await cast.people.coder.agent.get(`${threadsPath()}/${thread.id}`);
    const newest = detail.body.relatedDecisions[0];
    expect(newest).toMatchObject({ subject: "Body size of Vessiraspis minor", oldText: "120 mm", newText: "12 mm", reason: "Decimal slip, per the drawer label", user: { name: "Test coder" } });
    // The import that created the taxon (and set 120 mm) is older and comes after it.
    expect(detail.body.relatedDecisions).toHaveLength(2);
    expect(detail.body.relatedDecisions[1]).toMatchObject({ action: "create", subject: "Vessiraspis minor", user: { name: "Test coder" } });

    const resolved = await cast.people.coder.agent.post(`${threadsPath()}/${thread.id}/resolve`).send({ decisionId: newest.id });
    expect(resolved.status).toBe(200);
    expect(resolved.body.resolutionDecision).toMatchObject({ id: newest.id, newText: "12 mm" });

    const elsewhere = await studyWithCodebook(app, cast, "Another invented study");
    // A target of another study is not found in this one.
    const foreign = await cast.people.coder.agent.post(threadsPath()).send({ target: { type: "trait", id: elsewhere.trait.feeding.id }, body: "Other study" });
    expect(foreign.status).toBe(400);
    expect(foreign.body.error.fields["target.id"]).toBe("No trait of this study has this id");
    const other = await openThread("coder", { target: { type: "trait", id: study.trait.environment.id }, body: "Brackish?" });
    const wrong = await cast.people.coder.agent.post(`${threadsPath()}/${other.id}/resolve`).send({ decisionId: "00000000-0000-4000-8000-000000000000" });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.decisionId).toMatch(/No coding decision/);
  });
});

describe("listing", () => {
  it("filters by status, target, author and mentioned person, with counts by status", async () => {
    const studyB = await studyWithCodebook(app, cast, "Invented listing study");
    const path = `/api/studies/${studyB.studyId}/threads`;
    const post = (who: keyof Cast["people"], body: Record<string, unknown>) => cast.people[who].agent.post(path).send(body);
    const a = (await post("reviewer", { target: { type: "trait", id: studyB.trait.feeding.id }, body: "Rule for grazers, @Test coder?", mentions: [cast.people.coder.user.id] })).body;
    const b = (await post("analyst", { target: { type: "trait", id: studyB.trait.environment.id }, body: "Brackish settings?" })).body;
    await cast.people.coder.agent.post(`${path}/${b.id}/resolve`).send({});

    const get = async (query: string) => (await cast.people.viewer.agent.get(`${path}?${query}`)).body as { rows: Array<{ id: string }>; total: number; counts: { open: number; resolved: number } };
    expect((await get("status=all")).counts).toEqual({ open: 1, resolved: 1 });
    expect((await get("status=open")).rows.map((r) => r.id)).toEqual([a.id]);
    expect((await get("status=resolved")).rows.map((r) => r.id)).toEqual([b.id]);
    expect((await get(`targetType=trait&targetId=${studyB.trait.environment.id}`)).rows.map((r) => r.id)).toEqual([b.id]);
    expect((await get(`authorId=${cast.people.analyst.user.id}`)).rows.map((r) => r.id)).toEqual([b.id]);
    expect((await get(`mentioned=${cast.people.coder.user.id}`)).rows.map((r) => r.id)).toEqual([a.id]);
    const paged = await get("pageSize=1&page=2");
    expect(paged).toMatchObject({ total: 2 });
    expect(paged.rows).toHaveLength(1);

    const bad = await cast.people.viewer.agent.get(`${path}?status=closed`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.status).toMatch(/open, resolved or all/);
  });
});

describe("mentions", () => {
  it("sends the mentioned member one e-mail with a link straight to the thread, and a notification under the bell", async () => {
    const since = new Date();
    const coder = cast.people.coder;
    const thread = await openThread("reviewer", {
      target: sizeOf("Tethyconcha lata"),
      title: "Adult size",
      body: "@Test coder can you check the drawer? (self-mention of @Test reviewer notifies no one)",
      mentions: [coder.user.id, cast.people.reviewer.user.id],
    });
    // Other tests' mentions of the same person may arrive meanwhile: this thread's title picks its e-mail.
    const mail = await waitForMail(app, coder.email, { subject: '"Adult size"', since });
    expect(mail.subject).toBe('Test reviewer mentioned you in "Adult size" (Invented thread study)');
    expect(mail.text).toContain(`Open the thread: http://127.0.0.1:5180/studies/${study.studyId}/threads/${thread.id}\n`);
    expect(mail.text).toContain("about Body size of Tethyconcha lata");
    expect(await mailsTo(coder.email, since, '"Adult size"')).toHaveLength(1);
    expect(await mailsTo(cast.people.reviewer.email, since)).toHaveLength(0);

    const [row] = await app.ctx.db.select().from(notifications).where(and(eq(notifications.userId, coder.user.id), eq(notifications.threadId, thread.id)));
    expect(row.emailedAt).not.toBeNull();

    const bell = await coder.agent.get("/api/notifications?unread=true");
    expect(bell.status).toBe(200);
    const notice = bell.body.rows.find((n: { threadId: string }) => n.threadId === thread.id);
    expect(notice).toMatchObject({ kind: "mention", studyId: study.studyId, studyName: "Invented thread study", read: false });
    expect(notice.summary).toMatch(/^Test reviewer mentioned you in “Adult size”: @Test coder can you check the drawer\?/);
    const before = bell.body.unreadCount;

    const read = await coder.agent.post(`/api/notifications/${notice.id}/read`);
    expect(read.body).toEqual({ marked: 1, unreadCount: before - 1 });
    expect((await cast.people.analyst.agent.post(`/api/notifications/${notice.id}/read`)).status).toBe(404);
  });

  it("shows the mention's name on the post", async () => {
    const since = new Date();
    const thread = await openThread("owner", { target: sizeOf("Vessiraspis minor"), body: "@Test analyst please rerun", mentions: [cast.people.analyst.user.id] });
    const detail = await cast.people.viewer.agent.get(`${threadsPath()}/${thread.id}`);
    expect(detail.body.posts[0].mentions).toEqual([{ id: cast.people.analyst.user.id, name: "Test analyst" }]);
    // Its e-mail arrives (and is out of the way of the digest test below).
    expect((await waitForMail(app, cast.people.analyst.email, { subject: "please rerun", since })).text).toContain(thread.id);
    await cast.people.analyst.agent.post("/api/notifications/read-all").send({ threadId: thread.id });
    const unread = await cast.people.analyst.agent.get("/api/notifications?unread=true");
    expect(unread.body.rows.some((n: { threadId: string }) => n.threadId === thread.id)).toBe(false);
  });

  it("collects mentions in one daily digest for a member who chose it, and sends nothing for one who chose none", async () => {
    const digestStudy = await studyWithCodebook(app, cast, "Invented digest study");
    const path = `/api/studies/${digestStudy.studyId}/threads`;
    const coder = cast.people.coder;
    const analyst = cast.people.analyst;
    expect((await coder.agent.put(`/api/notification-preferences/${digestStudy.studyId}`).send({ mode: "digest" })).body).toMatchObject({ mode: "digest" });
    expect((await analyst.agent.put(`/api/notification-preferences/${digestStudy.studyId}`).send({ mode: "none" })).status).toBe(200);
    const prefs = await coder.agent.get("/api/notification-preferences");
    expect(prefs.body.preferences.find((p: { studyId: string }) => p.studyId === digestStudy.studyId)).toEqual({ studyId: digestStudy.studyId, studyName: "Invented digest study", mode: "digest" });
    expect((await coder.agent.put(`/api/notification-preferences/${digestStudy.studyId}`).send({ mode: "weekly" })).body.error.fields.mode).toMatch(/immediate, digest, none/);

    const before = new Date();
    const mention = [coder.user.id, analyst.user.id];
    const first = (await cast.people.reviewer.agent.post(path).send({ target: { type: "trait", id: digestStudy.trait.feeding.id }, title: "Grazers", body: "@Test coder @Test analyst grazers?", mentions: mention })).body;
    const second = (await cast.people.owner.agent.post(path).send({ target: { type: "trait", id: digestStudy.trait.body_size.id }, title: "Sizes", body: "@Test coder sizes in mm", mentions: [coder.user.id] })).body;

    // Nothing is e-mailed at once: the notifications wait, unmarked.
    const waiting = await app.ctx.db.select().from(notifications).where(inArray(notifications.threadId, [first.id, second.id]));
    expect(waiting).toHaveLength(3);
    expect(waiting.every((n) => n.emailedAt === null)).toBe(true);

    // Mentions made after the latest digest time wait for the next day's digest.
    expect(await app.ctx.services.notifications.sendDigests(latestDigestCutoff(before))).toEqual({ people: 0, mentions: 0 });

    const tomorrow = new Date(latestDigestCutoff(before).getTime() + 24 * 3600 * 1000);
    expect(await app.ctx.services.notifications.sendDigests(tomorrow)).toEqual({ people: 1, mentions: 2 });
    const digest = await waitForMail(app, coder.email, { subject: "since the last digest", since: before });
    expect(digest.subject).toBe("Stratasieve: 2 mentions since the last digest");
    expect(digest.text).toContain('Study "Invented digest study"');
    expect(digest.text).toContain(`http://127.0.0.1:5180/studies/${digestStudy.studyId}/threads/${first.id}`);
    expect(digest.text).toContain(`http://127.0.0.1:5180/studies/${digestStudy.studyId}/threads/${second.id}`);
    expect(digest.text).toContain('Test reviewer in "Grazers"');

    // A second check the same day sends nothing more; the member who chose none got no e-mail.
    expect(await app.ctx.services.notifications.sendDigests(tomorrow)).toEqual({ people: 0, mentions: 0 });
    expect(await mailsTo(coder.email, before, "digest")).toHaveLength(1);
    expect(await mailsTo(coder.email, before, "Invented digest study")).toHaveLength(0);
    expect(await mailsTo(analyst.email, before, "Invented digest study")).toHaveLength(0);
    expect(await mailsTo(analyst.email, before, "digest")).toHaveLength(0);
    const analystBell = await analyst.agent.get("/api/notifications?unread=true");
    expect(analystBell.body.rows.some((n: { threadId: string }) => n.threadId === first.id)).toBe(true);
  });

  it("puts the digest time at 07:00 UTC: the same day after it, the day before when earlier", () => {
    // Worked by hand: 2026-03-04 09:30 UTC is after 07:00, so that day's 07:00; 06:59 is before, so the 3rd's.
    expect(latestDigestCutoff(new Date("2026-03-04T09:30:00Z")).toISOString()).toBe("2026-03-04T07:00:00.000Z");
    expect(latestDigestCutoff(new Date("2026-03-04T06:59:00Z")).toISOString()).toBe("2026-03-03T07:00:00.000Z");
    expect(latestDigestCutoff(new Date("2026-03-01T00:00:00Z")).toISOString()).toBe("2026-02-28T07:00:00.000Z");
  });
});

describe("activity feed", () => {
  it("records opening, replying, resolving and reopening threads, newest first and paginated", async () => {
    const feedStudy = await studyWithCodebook(app, cast, "Invented feed study");
    const path = `/api/studies/${feedStudy.studyId}/threads`;
    const thread = (await cast.people.reviewer.agent.post(path).send({ target: { type: "trait", id: feedStudy.trait.feeding.id }, title: "Grazers", body: "Browsers too?" })).body;
    await cast.people.coder.agent.post(`${path}/${thread.id}/posts`).send({ body: "Yes, per the rule." });
    await cast.people.coder.agent.post(`${path}/${thread.id}/resolve`).send({});
    await cast.people.owner.agent.post(`${path}/${thread.id}/reopen`);

    const feed = await cast.people.viewer.agent.get(`/api/studies/${feedStudy.studyId}/activity?pageSize=3`);
    expect(feed.status).toBe(200);
    expect(feed.body.total).toBe(4);
    expect(feed.body.rows.map((r: { kind: string }) => r.kind)).toEqual(["thread.reopened", "thread.resolved", "thread.replied"]);
    expect(feed.body.rows[0]).toMatchObject({ summary: "Test owner reopened “Grazers”", user: { name: "Test owner" }, refType: "thread", refId: thread.id });
    const rest = await cast.people.viewer.agent.get(`/api/studies/${feedStudy.studyId}/activity?pageSize=3&page=2`);
    expect(rest.body.rows).toHaveLength(1);
    expect(rest.body.rows[0].summary).toBe("Test reviewer opened “Grazers” about Feeding mode");
  });

  it("records role changes, removals and joins, naming who made them", async () => {
    const studyId = await cast.makeStudy("Invented membership study");
    const owner = cast.people.owner.agent;
    expect((await owner.patch(`/api/studies/${studyId}/members/${cast.people.viewer.user.id}`).send({ role: "reviewer" })).status).toBe(204);
    expect((await owner.delete(`/api/studies/${studyId}/members/${cast.people.analyst.user.id}`)).status).toBe(204);
    const token = await cast.makeInvitation(studyId, cast.people.stranger.email, "coder");
    expect((await cast.people.stranger.agent.post(`/api/invitations/${token}/accept`)).status).toBe(200);

    const rows = await app.ctx.db.select().from(activity).where(eq(activity.studyId, studyId)).orderBy(activity.createdAt);
    expect(rows.map((r) => [r.kind, r.summary])).toEqual([
      ["member.role_changed", "Test owner changed the role of Test viewer from Guest to Reviewer"],
      ["member.removed", "Test owner removed Test analyst (Analyst) from the study"],
      ["member.joined", "Test stranger joined as Coder"],
    ]);
    // Re-saving the same role changes nothing and records nothing.
    await owner.patch(`/api/studies/${studyId}/members/${cast.people.coder.user.id}`).send({ role: "coder" });
    expect(await app.ctx.db.select().from(activity).where(eq(activity.studyId, studyId))).toHaveLength(3);
  });
});

describe("the OpenAPI document", () => {
  it("describes the threads, notifications and activity endpoints", () => {
    const paths = Object.keys(app.openapi.paths as Record<string, unknown>);
    for (const p of [
      "/api/studies/{studyId}/threads",
      "/api/studies/{studyId}/threads/{threadId}",
      "/api/studies/{studyId}/threads/{threadId}/posts",
      "/api/studies/{studyId}/threads/{threadId}/resolve",
      "/api/studies/{studyId}/threads/{threadId}/reopen",
      "/api/notifications",
      "/api/notification-preferences/{studyId}",
      "/api/studies/{studyId}/activity",
    ]) {
      expect(paths).toContain(p);
    }
  });
});
