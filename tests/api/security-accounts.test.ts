// Regression tests for the account-side findings of the security review (issue 14, first half):
// the fake mailbox read by anyone, invitations accepted by any account, session cookies signed
// with another algorithm, sign-up telling whether an address is registered, missing limits on
// sign-up and password changes, a sign-in limit that locked accounts, the origin check trusting
// the Host header, and signed-in answers without Cache-Control. Each test failed before its fix.
// All addresses are invented (example.test).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomUUID } from "node:crypto";
import request from "supertest";
import { and, eq, sql } from "drizzle-orm";
import { SignJWT, generateKeyPair } from "jose";
import { invitations, memberships, outboxMessages, users } from "../../db/schema/index";
import { SESSION_COOKIE } from "../../server/auth/session";
import { signInDelayMs } from "../../server/auth/loginLimiter";
import { createMailer } from "../../server/mail/mailer";
import { startFakeSmtp } from "../../server/mail/fakeSmtp";
import { createTestApp, linkIn, PASSWORD, signedInAgent, uniqueEmail, waitForMail, type TestApp } from "../support/server";
import { startAppProcess } from "../support/appProcess";
import { castOfRoles } from "./fixtures";

let app: TestApp;
beforeAll(async () => {
  app = await createTestApp();
});
afterAll(() => app.close());

type OutboxBody = { messages: Array<{ to: string[]; subject: string; text: string }> };
const recipientsOf = (body: OutboxBody) => body.messages.flatMap((m) => m.to.map((t) => t.toLowerCase()));

const sessionCookieLine = (setCookie: string | string[] | undefined) =>
  ([] as string[]).concat(setCookie ?? []).find((c) => c.startsWith(`${SESSION_COOKIE}=`)) ?? null;

describe("the fake mailbox shows each person only their own mail", () => {
  it("a study lead cannot read another account's reset link, and the owner of the address can", async () => {
    const victim = await signedInAgent(app, "victim");
    const attacker = await signedInAgent(app, "attacker");
    // The attack of the review: own a study, ask a reset for someone else, read the link.
    expect((await attacker.agent.post("/api/studies").send({ name: "Invented cover study" })).status).toBe(201);
    const since = new Date(Date.now() - 1000);
    expect((await request(app.app).post("/api/auth/password-reset/request").send({ email: victim.email })).status).toBe(202);
    const mail = await waitForMail(app, victim.email, { subject: "Reset", since });
    const link = linkIn(mail.text, "/reset-password/");

    const seenByAttacker = await attacker.agent.get("/api/outbox");
    expect(seenByAttacker.status).toBe(200);
    expect(JSON.stringify(seenByAttacker.body)).not.toContain(link);
    expect(recipientsOf(seenByAttacker.body).every((to) => to === attacker.email)).toBe(true);

    const seenByVictim = await victim.agent.get("/api/outbox");
    expect(seenByVictim.status).toBe(200);
    expect(seenByVictim.body.messages.map((m: { text: string }) => m.text).join("\n")).toContain(link);
    expect(recipientsOf(seenByVictim.body).every((to) => to === victim.email)).toBe(true);
  });

  it("anyone signed in reads their own mail, the recipient compared without regard to case; no study needed", async () => {
    const person = await signedInAgent(app, "no-study");
    const subject = `Invented notice ${randomUUID().slice(0, 8)}`;
    // A message whose recipient was written in capitals, as the fake server would keep it.
    await app.ctx.db.insert(outboxMessages).values({ fromAddress: "no-reply@stratasieve.invalid", toAddresses: [person.email.toUpperCase()], subject, text: "An invented message." });
    const res = await person.agent.get("/api/outbox");
    expect(res.status).toBe(200);
    expect(res.body.messages.map((m: { subject: string }) => m.subject)).toContain(subject);
    expect((await request(app.app).get("/api/outbox")).status).toBe(401);
  });

  it("mail sent to an address before its account existed is not handed to whoever signs up with it", async () => {
    const lead = await signedInAgent(app, "lead");
    const study = (await lead.agent.post("/api/studies").send({ name: "Invented study with an owner seat" })).body;
    const invitee = uniqueEmail("future-owner");
    expect((await lead.agent.post(`/api/studies/${study.id}/invitations`).send({ email: invitee, role: "owner" })).status).toBe(201);
    await waitForMail(app, invitee, { subject: "invited" });

    const squatter = request.agent(app.app);
    expect((await squatter.post("/api/auth/signup").send({ email: invitee, password: PASSWORD, name: "Squatter" })).status).toBe(201);
    const res = await squatter.get("/api/outbox");
    expect(res.status).toBe(200);
    expect(res.body.messages).toEqual([]);
  });

  it("the local fake prints each message's recipient, subject and links on the console", async () => {
    const printed: string[] = [];
    const smtp = await startFakeSmtp(app.ctx.db, (lines) => printed.push(lines));
    const mailer = createMailer(`smtp://127.0.0.1:${smtp.port}`, "Stratasieve <no-reply@stratasieve.invalid>", true);
    try {
      const to = uniqueEmail("console");
      await mailer.send({ to, subject: "Invented subject", text: "Open https://app.example.test/invitations/abc123.\nAnd http://127.0.0.1:5180/sign-in" });
      for (let i = 0; i < 100 && printed.length === 0; i++) await new Promise((r) => setTimeout(r, 50));
      expect(printed).toHaveLength(1);
      expect(printed[0]).toContain(to);
      expect(printed[0]).toContain("Invented subject");
      expect(printed[0]).toContain("https://app.example.test/invitations/abc123\n"); // the sentence's full stop left out
      expect(printed[0]).toContain("http://127.0.0.1:5180/sign-in");
    } finally {
      mailer.close();
      await smtp.close();
    }
  });

  it("a server run locally without SMTP_URL prints the reset link, so a person alone can follow it", async () => {
    const proc = await startAppProcess({ NODE_ENV: "development", SMTP_URL: "" });
    try {
      const email = uniqueEmail("alone");
      const post = (path: string, body: unknown) =>
        fetch(`${proc.url}${path}`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
      expect((await post("/api/auth/signup", { email, password: PASSWORD, name: "Alone" })).status).toBe(201);
      expect((await post("/api/auth/password-reset/request", { email })).status).toBe(202);
      let output = "";
      for (let i = 0; i < 100 && !/reset-password\/\S+/.test(output); i++) {
        await new Promise((r) => setTimeout(r, 100));
        output = proc.output.join("");
      }
      expect(output).toContain(`Mail to ${email}: Reset your Stratasieve password`);
      expect(output).toMatch(new RegExp(`${proc.url}/reset-password/\\S{16,}`));
    } finally {
      await proc.stop();
    }
  }, 60_000);
});

describe("invitations are accepted only by the invited address", () => {
  it("another account gets 403 naming the invited address, and nothing is written", async () => {
    const cast = await castOfRoles(app);
    const studyId = await cast.makeStudy("Invented study for a targeted invitation");
    const invited = uniqueEmail("invited");
    const token = await cast.makeInvitation(studyId, invited, "owner");

    const res = await cast.people.stranger.agent.post(`/api/invitations/${token}/accept`);
    expect(res.status).toBe(403);
    expect(res.body.error.message).toContain(invited);
    const [row] = await app.ctx.db.select().from(invitations).where(eq(invitations.studyId, studyId));
    expect(row.acceptedAt).toBeNull();
    expect(row.acceptedBy).toBeNull();
    const membership = await app.ctx.db
      .select()
      .from(memberships)
      .where(and(eq(memberships.studyId, studyId), eq(memberships.userId, cast.people.stranger.user.id)));
    expect(membership).toEqual([]);
    // The invitation still works for its own address.
    expect((await request(app.app).get(`/api/invitations/${token}`)).status).toBe(200);
  });

  it("the invited address is compared without regard to case", async () => {
    const cast = await castOfRoles(app);
    const studyId = await cast.makeStudy("Invented study for a capitalised address");
    const person = await signedInAgent(app, "capitals");
    const token = await cast.makeInvitation(studyId, person.email.toUpperCase(), "coder");
    const res = await person.agent.post(`/api/invitations/${token}/accept`);
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ studyId, role: "coder" });
  });
});

describe("a session cookie signed with another algorithm", () => {
  it("is no session: 401, the cookie cleared, and signing in works with it still sent", async () => {
    const person = await signedInAgent(app, "alg");
    const b64 = (value: unknown) => Buffer.from(JSON.stringify(value)).toString("base64url");
    const claims = { sid: randomUUID(), sub: person.user.id, exp: Math.floor(Date.now() / 1000) + 3600 };
    const { privateKey } = await generateKeyPair("RS256");
    const tokens: Record<string, string> = {
      "alg none": `${b64({ alg: "none", typ: "JWT" })}.${b64(claims)}.`,
      RS256: await new SignJWT({ sid: claims.sid }).setProtectedHeader({ alg: "RS256" }).setSubject(person.user.id).setExpirationTime("1h").sign(privateKey),
      "HS512 with the right secret": await new SignJWT({ sid: claims.sid })
        .setProtectedHeader({ alg: "HS512" })
        .setSubject(person.user.id)
        .setExpirationTime("1h")
        .sign(app.ctx.config.sessionSecret),
      garbage: "not-a-token-at-all",
      "bad header": `${Buffer.from("{not json").toString("base64url")}.${b64(claims)}.x`,
    };
    for (const [what, token] of Object.entries(tokens)) {
      const cookie = `${SESSION_COOKIE}=${token}`;
      const me = await request(app.app).get("/api/auth/me").set("Cookie", cookie);
      expect(me.status, what).toBe(401);
      expect(sessionCookieLine(me.headers["set-cookie"]), what).toMatch(new RegExp(`^${SESSION_COOKIE}=;`));
      const studies = await request(app.app).get("/api/studies").set("Cookie", cookie);
      expect(studies.status, what).toBe(401);
      const login = await request(app.app).post("/api/auth/login").set("Cookie", cookie).send({ email: person.email, password: PASSWORD });
      expect(login.status, what).toBe(200);
    }
  });
});

describe("sign-up does not tell whether an address is registered", () => {
  it("an existing address gets the same 201 without a session; its owner is mailed; the account is unchanged", async () => {
    const owner = await signedInAgent(app, "holder");
    const since = new Date(Date.now() - 1000);
    const res = await request(app.app).post("/api/auth/signup").send({ email: owner.email.toUpperCase(), password: "an attacker's passphrase", name: "Someone else" });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ status: "check_mail", email: owner.email });
    expect(JSON.stringify(res.body)).not.toMatch(/exist|registered/i);
    expect(sessionCookieLine(res.headers["set-cookie"])).toBeNull();

    const mail = await waitForMail(app, owner.email, { subject: "tried to create", since });
    expect(mail.text).toContain(`sign in: ${app.ctx.config.appUrl}/sign-in\n`);
    expect(mail.text).toContain(`Choose a new one: ${app.ctx.config.appUrl}/forgot-password\n`);

    expect((await request(app.app).post("/api/auth/login").send({ email: owner.email, password: "an attacker's passphrase" })).status).toBe(401);
    expect((await request(app.app).post("/api/auth/login").send({ email: owner.email, password: PASSWORD })).status).toBe(200);
    const [row] = await app.ctx.db.select().from(users).where(eq(users.email, owner.email));
    expect(row.name).toBe("Test holder");
    // The owner reads the notice in their own outbox.
    const outbox = await owner.agent.get("/api/outbox");
    expect(outbox.body.messages.map((m: { subject: string }) => m.subject)).toContain("Someone tried to create a Stratasieve account with your address");
  });

  it("a new address still gets its account and a session at once", async () => {
    const agent = request.agent(app.app);
    const email = uniqueEmail("fresh");
    const res = await agent.post("/api/auth/signup").send({ email, password: PASSWORD, name: "Fresh" });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ email, name: "Fresh" });
    expect((await agent.get("/api/auth/me")).status).toBe(200);
  });
});

describe("rate limits on sign-up and password changes", () => {
  it("sign-up is limited per client address and per e-mail", async () => {
    await app.ctx.db.execute(sql`DELETE FROM rate_limit_hits WHERE key LIKE 'signup-ip:%'`);
    const limited = await createTestApp({ signupLimit: { windowMs: 60_000, perIp: 3, perAddress: 1000 } });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) {
        statuses.push((await request(limited.app).post("/api/auth/signup").send({ email: uniqueEmail("bulk"), password: PASSWORD, name: "Bulk" })).status);
      }
      expect(statuses).toEqual([201, 201, 201, 429]);
    } finally {
      await app.ctx.db.execute(sql`DELETE FROM rate_limit_hits WHERE key LIKE 'signup-ip:%'`);
      await limited.close();
    }

    const perAddress = await createTestApp({ signupLimit: { windowMs: 60_000, perIp: 100000, perAddress: 3 } });
    try {
      const { email } = await signedInAgent(app, "mailbombed"); // the account's own sign-up is the first of the three
      const statuses: number[] = [];
      for (let i = 0; i < 3; i++) statuses.push((await request(perAddress.app).post("/api/auth/signup").send({ email, password: PASSWORD, name: "Again" })).status);
      expect(statuses).toEqual([201, 201, 429]);
    } finally {
      await perAddress.close();
    }
  });

  it("failed password changes are limited per account; successful ones do not count", async () => {
    const limited = await createTestApp({ loginLimit: { windowMs: 60_000, perIp: 100000, perAccount: 2 } });
    try {
      const { agent: first } = await signedInAgent(limited, "changer");
      // Successes first: they are not counted.
      for (let i = 0; i < 3; i++) expect((await first.post("/api/auth/password").send({ currentPassword: PASSWORD, newPassword: PASSWORD })).status).toBe(204);
      const statuses: number[] = [];
      for (let i = 0; i < 2; i++) statuses.push((await first.post("/api/auth/password").send({ currentPassword: `wrong guess ${i}`, newPassword: "a new passphrase" })).status);
      const blocked = await first.post("/api/auth/password").send({ currentPassword: PASSWORD, newPassword: "a new passphrase" });
      expect(statuses).toEqual([400, 400]);
      expect(blocked.status).toBe(429);
      expect(Number(blocked.headers["retry-after"])).toBeGreaterThan(0);
      // Another account is not affected.
      const { agent: other } = await signedInAgent(limited, "other-changer");
      expect((await other.post("/api/auth/password").send({ currentPassword: PASSWORD, newPassword: "another passphrase" })).status).toBe(204);
    } finally {
      await limited.close();
    }
  });
});

describe("the per-account sign-in limit slows failures down and never locks the account", () => {
  it("counts failures only, delays the answers after the free ones, and the right password still gets in", async () => {
    const delayMs = 150;
    const limited = await createTestApp({ loginLimit: { windowMs: 60_000, perIp: 100000, perAccount: 2, delayMs } });
    const login = (email: string, password: string) => request(limited.app).post("/api/auth/login").send({ email, password });
    try {
      const { email } = await signedInAgent(limited, "slowed");
      // The count as it settles: a success is taken back just after its answer has been sent.
      const hits = async (expected: number) => {
        let value = -1;
        for (let i = 0; i < 40 && value !== expected; i++) {
          if (i) await new Promise((r) => setTimeout(r, 50));
          const rows = (await limited.ctx.db.execute(sql`SELECT hits FROM rate_limit_hits WHERE key = ${`login-account:${email}`}`)).rows as Array<{ hits: number }>;
          value = Number(rows[0]?.hits ?? 0);
        }
        return value;
      };
      // Twelve successful sign-ins: more than the old lock-out's ten, none of them counted.
      for (let i = 0; i < 12; i++) expect((await login(email, PASSWORD)).status).toBe(200);
      expect(await hits(0)).toBe(0);

      // Someone else's guesses: the free ones, then more, every one answered 401, none 429.
      for (let i = 0; i < 5; i++) expect((await login(email, `guess number ${i}`)).status).toBe(401);
      expect(await hits(5)).toBe(5);

      // The owner still gets in, after a wait that grew with the failures (5 failures, 2 free:
      // the sixth try waits delayMs * 2^3, see signInDelayMs).
      const started = Date.now();
      const owner = await login(email, PASSWORD);
      expect(owner.status).toBe(200);
      expect(Date.now() - started).toBeGreaterThanOrEqual(signInDelayMs(5, 2, delayMs) - 5);
      expect(await hits(5)).toBe(5); // the success was not counted
    } finally {
      await limited.close();
    }
  });

  it("the wait doubles with each failure beyond the free ones, up to 32 times the first", () => {
    // The schedule itself (common practice, no source): nothing for the free failures, then 1, 2, 4... times delayMs.
    expect([0, 1, 2, 3, 4, 5, 6, 7, 8, 20].map((failures) => signInDelayMs(failures, 2, 100))).toEqual([0, 0, 0, 100, 200, 400, 800, 1600, 3200, 3200]);
  });
});

describe("the cross-site check is anchored on APP_URL, not on the Host header", () => {
  it("refuses a foreign Host (DNS rebinding), reads included, even when Origin matches that Host", async () => {
    const { agent } = await signedInAgent(app, "rebind");
    const rebound = await agent.post("/api/studies").set("Host", "rebind.attacker.example:5180").set("Origin", "http://rebind.attacker.example:5180").send({ name: "Rebound" });
    expect(rebound.status).toBe(421);
    expect(rebound.body.error.code).toBe("unknown_host");
    expect((await agent.get("/api/studies").set("Host", "rebind.attacker.example:5180")).status).toBe(421);
    // A Origin from elsewhere on the app's own Host is refused as before.
    const foreignOrigin = await agent.post("/api/studies").set("Origin", "http://rebind.attacker.example:5180").send({ name: "Rebound" });
    expect(foreignOrigin.status).toBe(403);
    expect(foreignOrigin.body.error.code).toBe("cross_origin");
  });

  it("accepts APP_URL's own host and origin, the app opened by a loopback name, and health checks by any name", async () => {
    const { agent } = await signedInAgent(app, "own-host");
    const appUrl = new URL(app.ctx.config.appUrl);
    expect((await agent.post("/api/studies").set("Host", appUrl.host).set("Origin", appUrl.origin).send({ name: "Invented via APP_URL" })).status).toBe(201);
    expect((await agent.post("/api/studies").set("Host", "localhost:5180").set("Origin", "http://localhost:5180").send({ name: "Invented via localhost" })).status).toBe(201);
    // A loopback Host does not make another loopback origin (another local site) acceptable.
    expect((await agent.post("/api/studies").set("Host", "localhost:5180").set("Origin", "http://localhost:3000").send({ name: "No" })).status).toBe(403);
    expect((await request(app.app).get("/api/health").set("Host", "10.1.2.3:5180")).status).toBe(200);
  });
});

describe("answers that depend on the session are not stored by caches", () => {
  it("sends Cache-Control: no-store on signed-in answers, refusals and the sign-in answer", async () => {
    const { agent, email } = await signedInAgent(app, "cache");
    const study = await agent.post("/api/studies").send({ name: "Invented cached study" });
    const answers: Array<[string, { headers: Record<string, string> }]> = [
      ["GET /api/auth/me", await agent.get("/api/auth/me")],
      ["GET /api/studies", await agent.get("/api/studies")],
      ["GET /api/studies/:id", await agent.get(`/api/studies/${study.body.id}`)],
      ["GET /api/studies/:id/members", await agent.get(`/api/studies/${study.body.id}/members`)],
      ["GET /api/outbox", await agent.get("/api/outbox")],
      ["GET /api/auth/me, signed out (401)", await request(app.app).get("/api/auth/me")],
      ["POST /api/auth/login", await request(app.app).post("/api/auth/login").send({ email, password: PASSWORD })],
    ];
    for (const [what, res] of answers) expect(res.headers["cache-control"], what).toBe("no-store");
  });
});
