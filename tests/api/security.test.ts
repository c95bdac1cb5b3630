// Security properties people rely on without seeing them: the session cookie is Secure in
// production, a session past its expiry is refused, uploads are kept outside the served folder and
// cannot be fetched over HTTP, and no secret (password, session cookie, reset token, the signing
// secret) reaches the process's output. Sign-out and password changes ending sessions are in
// auth.test.ts; the role matrix in role-matrix.test.ts; headers and cross-origin refusal in
// platform.test.ts.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomBytes } from "node:crypto";
import { readFile } from "node:fs/promises";
import { basename, isAbsolute, join, relative, resolve } from "node:path";
import pg from "pg";
import request from "supertest";
import { loadConfig } from "../../server/config";
import { SESSION_COOKIE, signSessionToken } from "../../server/auth/session";
import { createTestApp, PASSWORD, signedInAgent, uniqueEmail, type TestApp } from "../support/server";
import { startAppProcess, type AppProcess } from "../support/appProcess";

let app: TestApp;
beforeAll(async () => {
  app = await createTestApp();
});
afterAll(() => app.close());

const cookieValue = (setCookie: string | string[] | undefined) => {
  const line = ([] as string[]).concat(setCookie ?? []).find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  return line ? line.split(";")[0].slice(SESSION_COOKIE.length + 1) : null;
};

/** Directory `inner` lies inside `outer` (or is it). */
const inside = (inner: string, outer: string) => {
  const rel = relative(resolve(outer), resolve(inner));
  return rel === "" || (!rel.startsWith("..") && !isAbsolute(rel));
};

describe("the session cookie", () => {
  it("is Secure, HttpOnly and SameSite=Lax in production, and production sends HSTS", async () => {
    const production = await createTestApp({
      environment: "production",
      appUrl: "https://stratasieve.example",
      smtpUrl: `smtp://127.0.0.1:${app.ctx.fakeSmtp!.port}`,
    });
    try {
      const res = await request(production.app).post("/api/auth/signup").send({ email: uniqueEmail("prod"), password: PASSWORD, name: "Production person" });
      expect(res.status).toBe(201);
      const cookie = ([] as string[]).concat(res.headers["set-cookie"]).find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
      expect(cookie).toMatch(/;\s*Secure/i);
      expect(cookie).toMatch(/;\s*HttpOnly/i);
      expect(cookie).toMatch(/;\s*SameSite=Lax/i);
      expect(res.headers["strict-transport-security"]).toMatch(/max-age=\d+/);
      expect(res.headers["content-security-policy"]).toMatch(/upgrade-insecure-requests/);
    } finally {
      await production.close();
    }
    // Outside production the cookie must work over plain http on loopback, so it is not Secure.
    const dev = await request(app.app).post("/api/auth/signup").send({ email: uniqueEmail("dev"), password: PASSWORD, name: "Local person" });
    expect(String(dev.headers["set-cookie"])).not.toMatch(/Secure/i);
    expect(dev.headers["strict-transport-security"]).toBeUndefined();
  });

  it("expires when the session does: the cookie carries the expiry, and a token past it is refused", async () => {
    const short = await createTestApp({ sessionTtlSeconds: 3600 });
    try {
      const signup = await request(short.app).post("/api/auth/signup").send({ email: uniqueEmail("ttl"), password: PASSWORD, name: "Short session" });
      const cookie = ([] as string[]).concat(signup.headers["set-cookie"]).find((c) => c.startsWith(`${SESSION_COOKIE}=`))!;
      const expires = Date.parse(cookie.match(/Expires=([^;]+)/i)![1]);
      // An hour from the request, to the second the cookie date is written in.
      expect(Math.abs(expires - (Date.now() + 3600_000))).toBeLessThan(60_000);
    } finally {
      await short.close();
    }

    const { user } = await signedInAgent(app, "expiring");
    const ask = (token: string) => request(app.app).get("/api/auth/me").set("Cookie", `${SESSION_COOKIE}=${token}`);
    // A token whose own expiry has passed (signed correctly, session row live).
    const liveRow = await app.ctx.services.users.createSession(user.id, new Date(Date.now() + 3600_000));
    const pastToken = await signSessionToken(app.ctx, liveRow, user.id, new Date(Date.now() - 1000));
    const refused = await ask(pastToken);
    expect(refused.status).toBe(401);
    expect(cookieValue(refused.headers["set-cookie"])).toBe(""); // the stale cookie is cleared
    // A token still within its expiry whose session row has expired.
    const expiredRow = await app.ctx.services.users.createSession(user.id, new Date(Date.now() - 1000));
    const futureToken = await signSessionToken(app.ctx, expiredRow, user.id, new Date(Date.now() + 3600_000));
    expect((await ask(futureToken)).status).toBe(401);
    // The same person with a live session and a live token is signed in.
    expect((await ask(await signSessionToken(app.ctx, liveRow, user.id, new Date(Date.now() + 3600_000)))).status).toBe(200);
  });
});

describe("uploads", () => {
  it("are stored outside the served folder and cannot be fetched over HTTP", async () => {
    const clientDir = join(process.cwd(), "dist");
    expect(inside(loadConfig().uploadDir, clientDir)).toBe(false);
    expect(inside(app.ctx.config.uploadDir, clientDir)).toBe(false);

    const { agent } = await signedInAgent(app, "uploader");
    const study = await agent.post("/api/studies").send({ name: "Invented upload study" });
    const marker = `Secretella ${randomBytes(6).toString("hex")} (invented)`;
    const upload = await agent.post(`/api/studies/${study.body.id}/imports`).attach("file", Buffer.from(`name\n${marker}\n`), "private.csv");
    expect(upload.status).toBe(201);
    const [{ stored_path: storedPath }] = (await app.ctx.db.execute(`SELECT stored_path FROM imports WHERE id = '${upload.body.import.id}'`)).rows as Array<{ stored_path: string }>;
    expect(inside(storedPath, app.ctx.config.uploadDir)).toBe(true);
    expect(await readFile(storedPath, "utf8")).toContain(marker);

    const name = basename(storedPath);
    const fromRoot = relative(process.cwd(), storedPath).split("\\").join("/");
    const attempts = [`/${name}`, `/uploads/${name}`, `/${fromRoot}`, `/assets/../${fromRoot}`, `/%2e%2e/${fromRoot}`, `/assets/%2e%2e%2f%2e%2e%2f${fromRoot}`, `/api/${fromRoot}`];
    for (const path of attempts) {
      const res = await agent.get(path);
      expect(res.text ?? "", path).not.toContain(marker);
      expect(res.headers["content-type"] ?? "", path).not.toMatch(/text\/csv/);
    }
    await agent.delete(`/api/studies/${study.body.id}/imports/${upload.body.import.id}`);
  });
});

describe("secrets never reach the log", () => {
  let proc: AppProcess;
  const sessionSecret = randomBytes(36).toString("base64url");
  const db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 1 });

  beforeAll(async () => {
    // Mail goes to a relay, as in production (here the test's fake server, which keeps it in the
    // shared outbox table). Without SMTP_URL, outside tests, the local fake prints every message's
    // links on the console on purpose: see security-accounts.test.ts.
    proc = await startAppProcess({ SESSION_SECRET: sessionSecret, SMTP_URL: `smtp://127.0.0.1:${app.ctx.fakeSmtp!.port}` });
  }, 60_000);

  afterAll(async () => {
    await proc?.stop();
    await db.end();
  });

  it("sign-up, sign-in, failed sign-ins, a password change and a password reset print no password, cookie, token or signing secret", async () => {
    const email = uniqueEmail("quiet");
    const passwords = [`first ${randomBytes(8).toString("hex")}`, `second ${randomBytes(8).toString("hex")}`, `third ${randomBytes(8).toString("hex")}`];
    const cookies: string[] = [];
    const post = async (path: string, body: unknown, cookie = "") => {
      const res = await fetch(`${proc.url}${path}`, { method: "POST", headers: { "content-type": "application/json", cookie }, body: JSON.stringify(body) });
      const value = cookieValue(res.headers.getSetCookie());
      if (value) cookies.push(value);
      return res;
    };
    expect((await post("/api/auth/signup", { email, password: passwords[0], name: "Quiet person" })).status).toBe(201);
    expect((await post("/api/auth/login", { email, password: `${passwords[0]} typo` })).status).toBe(401);
    expect((await post("/api/auth/login", { email, password: passwords[0] })).status).toBe(200);
    const session = `${SESSION_COOKIE}=${cookies.at(-1)}`;
    expect((await post("/api/auth/password", { currentPassword: "wrong current one", newPassword: passwords[1] }, session)).status).toBe(400);
    expect((await post("/api/auth/password", { currentPassword: passwords[0], newPassword: passwords[1] }, session)).status).toBe(204);
    // A body that is not JSON, holding a password, is refused without echoing it.
    const broken = await fetch(`${proc.url}/api/auth/login`, { method: "POST", headers: { "content-type": "application/json" }, body: `{"email":"${email}","password":"${passwords[1]}"` });
    expect(broken.status).toBe(400);
    expect(await broken.text()).not.toContain(passwords[1]);

    const since = new Date();
    expect((await post("/api/auth/password-reset/request", { email })).status).toBe(202);
    let token = "";
    for (let i = 0; i < 100 && !token; i++) {
      const mail = await db.query("SELECT text FROM outbox_messages WHERE $1 = ANY(to_addresses) AND received_at > $2 ORDER BY received_at DESC LIMIT 1", [email, since]);
      token = (mail.rows[0]?.text as string | undefined)?.match(/\/reset-password\/(\S+)/)?.[1] ?? "";
      if (!token) await new Promise((r) => setTimeout(r, 100));
    }
    expect(token.length).toBeGreaterThan(16);
    expect((await post("/api/auth/password-reset/confirm", { token: `${token}x`, password: passwords[2] })).status).toBe(400);
    expect((await post("/api/auth/password-reset/confirm", { token, password: passwords[2] })).status).toBe(204);
    expect((await post("/api/auth/login", { email, password: passwords[2] })).status).toBe(200);

    await proc.stop(); // everything it will print is printed
    const output = proc.output.join("");
    expect(output).toContain("Stratasieve is serving on"); // the output was captured
    const secrets = { sessionSecret, token, ...Object.fromEntries(passwords.map((p, i) => [`password ${i + 1}`, p])), ...Object.fromEntries(cookies.map((c, i) => [`cookie ${i + 1}`, c])) };
    expect(cookies.length).toBeGreaterThanOrEqual(3);
    for (const [what, secret] of Object.entries(secrets)) expect(output.includes(secret), `${what} appears in the output`).toBe(false);
  }, 60_000);
});
