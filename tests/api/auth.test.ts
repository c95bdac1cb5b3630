import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { createTestApp, linkIn, PASSWORD, signedInAgent, uniqueEmail, waitForMail, type TestApp } from "../support/server";

let app: TestApp;
beforeAll(async () => {
  app = await createTestApp();
});
afterAll(() => app.close());

describe("accounts and sessions", () => {
  it("signs up, normalises the e-mail and signs in with an httpOnly SameSite=Lax cookie", async () => {
    const email = uniqueEmail("Casey").toUpperCase();
    const agent = request.agent(app.app);
    const res = await agent.post("/api/auth/signup").send({ email: `  ${email} `, password: PASSWORD, name: "Casey Example" });
    expect(res.status).toBe(201);
    expect(res.body.email).toBe(email.toLowerCase());
    const cookie = String(res.headers["set-cookie"]);
    expect(cookie).toMatch(/ss_session=/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    const me = await agent.get("/api/auth/me");
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe(email.toLowerCase());
  });

  it("gives a sign-up the same lasting session as a sign-in (a cookie with an expiry, not one that ends with the browser)", async () => {
    const expiryOf = (setCookie: unknown) => {
      const expires = /Expires=([^;]+)/i.exec(String(setCookie))?.[1];
      expect(expires, String(setCookie)).toBeDefined();
      return new Date(expires!).getTime();
    };
    const email = uniqueEmail("lasting");
    const signup = await request(app.app).post("/api/auth/signup").send({ email, password: PASSWORD, name: "Lasting Session" });
    expect(signup.status).toBe(201);
    const login = await request(app.app).post("/api/auth/login").send({ email, password: PASSWORD });
    expect(login.status).toBe(200);
    const ttlMs = app.ctx.config.sessionTtlSeconds * 1000;
    // Cookie dates are written to the second (RFC 6265 section 5.1.1) and the two requests are a
    // moment apart: a few seconds of slack, far below a session's days.
    expect(Math.abs(expiryOf(signup.headers["set-cookie"]) - (Date.now() + ttlMs))).toBeLessThan(60_000);
    expect(Math.abs(expiryOf(signup.headers["set-cookie"]) - expiryOf(login.headers["set-cookie"]))).toBeLessThan(5_000);
    // Every other attribute (Path, HttpOnly, SameSite, Secure) is the same too: only the token and the date differ.
    const attributes = (setCookie: unknown) =>
      String(setCookie)
        .split(";")
        .slice(1)
        .map((part) => part.trim())
        .filter((part) => !/^Expires=/i.test(part))
        .sort();
    expect(attributes(signup.headers["set-cookie"])).toEqual(attributes(login.headers["set-cookie"]));
    expect(attributes(signup.headers["set-cookie"])).toContain("HttpOnly");
  });

  it("tells who is signed in without a 401 for nobody (a browser prints every 401 as a console error)", async () => {
    const nobody = await request(app.app).get("/api/auth/session");
    expect(nobody.status).toBe(200);
    expect(nobody.body).toEqual({ user: null, environment: app.ctx.config.environment });
    // A cookie that names no session is "nobody" too.
    const forged = await request(app.app).get("/api/auth/session").set("Cookie", "ss_session=eyJhbGciOiJIUzI1NiJ9.eyJzaWQiOiJ4In0.forged");
    expect(forged.status).toBe(200);
    expect(forged.body.user).toBeNull();

    const { agent, user } = await signedInAgent(app, "session");
    const someone = await agent.get("/api/auth/session");
    expect(someone.status).toBe(200);
    expect(someone.body.user).toMatchObject({ id: user.id, email: user.email, name: user.name });
    expect((await agent.post("/api/auth/logout")).status).toBe(204);
    const after = await agent.get("/api/auth/session");
    expect(after.status).toBe(200);
    expect(after.body.user).toBeNull();
  });

  it("answers a sign-up with a registered e-mail like any other, without a session (details in security-accounts.test.ts)", async () => {
    const { email } = await signedInAgent(app, "dup");
    const res = await request(app.app).post("/api/auth/signup").send({ email: email.toUpperCase(), password: PASSWORD, name: "Again" });
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ status: "check_mail", email });
    expect(String(res.headers["set-cookie"] ?? "")).not.toMatch(/ss_session=[^;]/);
  });

  it("rejects a short password and a malformed e-mail with field messages", async () => {
    const res = await request(app.app).post("/api/auth/signup").send({ email: "not-an-email", password: "short", name: "" });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(["email", "name", "password"]);
    expect(res.body.error.fields.password).toMatch(/at least 10/);
  });

  it("rejects unexpected fields rather than ignoring them", async () => {
    const res = await request(app.app).post("/api/auth/signup").send({ email: uniqueEmail(), password: PASSWORD, name: "X", isAdmin: true });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/isAdmin|Unrecognized/i);
  });

  it("answers 401 without a session and with a wrong password", async () => {
    expect((await request(app.app).get("/api/auth/me")).status).toBe(401);
    const { email } = await signedInAgent(app);
    const res = await request(app.app).post("/api/auth/login").send({ email, password: "wrong password!" });
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe("invalid_credentials");
  });

  it("signs out: the old cookie no longer works", async () => {
    const agent = request.agent(app.app);
    const signup = await agent.post("/api/auth/signup").send({ email: uniqueEmail("leaving"), password: PASSWORD, name: "Leaving" });
    // The cookie as the browser holds it, taken from the sign-up answer (a copy kept by someone else).
    const cookie = ([] as string[]).concat(signup.headers["set-cookie"] ?? []).find((c) => c.startsWith("ss_session="))!.split(";")[0];
    expect(cookie.length).toBeGreaterThan("ss_session=".length);
    expect((await request(app.app).get("/api/auth/me").set("Cookie", cookie)).status).toBe(200);
    expect((await agent.post("/api/auth/logout")).status).toBe(204);
    expect((await agent.get("/api/auth/me")).status).toBe(401);
    expect((await request(app.app).get("/api/auth/me").set("Cookie", cookie)).status).toBe(401);
  });

  it("a password change ends the account's other sessions but keeps this one", async () => {
    const { agent, email } = await signedInAgent(app);
    const other = request.agent(app.app);
    expect((await other.post("/api/auth/login").send({ email, password: PASSWORD })).status).toBe(200);
    const res = await agent.post("/api/auth/password").send({ currentPassword: PASSWORD, newPassword: "a brand new passphrase" });
    expect(res.status).toBe(204);
    expect((await agent.get("/api/auth/me")).status).toBe(200);
    expect((await other.get("/api/auth/me")).status).toBe(401);
    expect((await request(app.app).post("/api/auth/login").send({ email, password: "a brand new passphrase" })).status).toBe(200);
  });

  it("a forged session token is treated as signed out", async () => {
    const res = await request(app.app).get("/api/auth/me").set("Cookie", "ss_session=eyJhbGciOiJIUzI1NiJ9.eyJzaWQiOiJ4In0.forged");
    expect(res.status).toBe(401);
  });
});

describe("password reset by e-mail", () => {
  it("e-mails a one-time link valid once; the new password works and old sessions end", async () => {
    const { agent, email } = await signedInAgent(app, "forgetful");
    const since = new Date(Date.now() - 1000);
    const res = await request(app.app).post("/api/auth/password-reset/request").send({ email });
    expect(res.status).toBe(202);
    const mail = await waitForMail(app, email, { subject: "Reset", since });
    const link = linkIn(mail.text, "/reset-password/");
    expect(link.startsWith(app.ctx.config.appUrl)).toBe(true);
    const token = link.split("/reset-password/")[1];
    const confirm = await request(app.app).post("/api/auth/password-reset/confirm").send({ token, password: "another long passphrase" });
    expect(confirm.status).toBe(204);
    expect((await agent.get("/api/auth/me")).status).toBe(401);
    expect((await request(app.app).post("/api/auth/login").send({ email, password: "another long passphrase" })).status).toBe(200);
    const again = await request(app.app).post("/api/auth/password-reset/confirm").send({ token, password: "yet another passphrase" });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe("invalid_token");
  });

  it("answers the same for an unknown e-mail and sends nothing", async () => {
    const email = uniqueEmail("ghost");
    const res = await request(app.app).post("/api/auth/password-reset/request").send({ email });
    expect(res.status).toBe(202);
    await expect(waitForMail(app, email, { timeoutMs: 800 })).rejects.toThrow(/No e-mail/);
  });

  it("stores only a hash of the token", async () => {
    const { email } = await signedInAgent(app, "hashcheck");
    const since = new Date(Date.now() - 1000);
    await request(app.app).post("/api/auth/password-reset/request").send({ email });
    const token = linkIn((await waitForMail(app, email, { since })).text, "/reset-password/").split("/reset-password/")[1];
    const rows = await app.ctx.database.pool.query("SELECT token_hash FROM password_resets WHERE token_hash = $1 OR token_hash = $2", [token, token]);
    expect(rows.rowCount).toBe(0);
  });
});
