// Builds the real app against the test database (DATABASE_URL from scripts/test.ts), with the
// local fake SMTP server, for API tests (supertest) and browser tests (a listening server).
import { randomUUID } from "node:crypto";
import type { AddressInfo } from "node:net";
import type { Server } from "node:http";
import { join } from "node:path";
import { and, arrayContains, desc, gt, ilike } from "drizzle-orm";
import request from "supertest";
import { loadConfig, type AppConfig } from "../../server/config";
import { createContext, type RunningContext } from "../../server/context-factory";
import { createApp, type BuiltApp } from "../../server/app";
import { outboxMessages } from "../../db/schema/index";

export interface TestApp extends BuiltApp {
  ctx: RunningContext;
  close(): Promise<void>;
}

export async function createTestApp(overrides: Partial<AppConfig> = {}): Promise<TestApp> {
  const config = loadConfig({
    appUrl: "http://127.0.0.1:5180",
    loginLimit: { windowMs: 15 * 60 * 1000, perIp: 100000, perAccount: 100000 },
    signupLimit: { windowMs: 60 * 60 * 1000, perIp: 100000, perAddress: 100000 },
    ...overrides,
  });
  const ctx = await createContext(config);
  const built = createApp(ctx, { clientDir: join(process.cwd(), "dist") });
  return { ...built, ctx, close: () => ctx.close() };
}

/** Starts the app on a free loopback port (APP_URL is that address, so e-mailed links work). */
export async function startTestServer(overrides: Partial<AppConfig> = {}): Promise<TestApp & { url: string; server: Server }> {
  // Listen first to learn the port, then build the app with the matching APP_URL.
  const { createServer } = await import("node:http");
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const app = await createTestApp({ appUrl: url, ...overrides });
  server.on("request", app.app);
  return {
    ...app,
    url,
    server,
    close: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await app.close();
    },
  };
}

export const uniqueEmail = (label = "person") => `${label}-${randomUUID().slice(0, 8)}@example.test`;
export const PASSWORD = "correct horse battery";

/** Signs up a new account and returns an agent that carries its session cookie. */
export async function signedInAgent(app: TestApp, label = "person") {
  const agent = request.agent(app.app);
  const email = uniqueEmail(label);
  const res = await agent.post("/api/auth/signup").send({ email, password: PASSWORD, name: `Test ${label}` });
  if (res.status !== 201) throw new Error(`signup failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { agent, email, user: res.body as { id: string; email: string; name: string } };
}

/** Waits for a message to the address (newer than `since`) to reach the fake SMTP server. */
export async function waitForMail(app: TestApp, to: string, opts: { subject?: string; since?: Date; timeoutMs?: number } = {}) {
  const deadline = Date.now() + (opts.timeoutMs ?? 10000);
  while (Date.now() < deadline) {
    const conditions = [arrayContains(outboxMessages.toAddresses, [to])];
    if (opts.subject) conditions.push(ilike(outboxMessages.subject, `%${opts.subject}%`));
    if (opts.since) conditions.push(gt(outboxMessages.receivedAt, opts.since));
    const [row] = await app.ctx.db.select().from(outboxMessages).where(and(...conditions)).orderBy(desc(outboxMessages.receivedAt)).limit(1);
    if (row) return row;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`No e-mail to ${to}${opts.subject ? ` about "${opts.subject}"` : ""} arrived in time.`);
}

export function linkIn(text: string, pathPrefix: string): string {
  const match = text.match(new RegExp(`https?://\\S+${pathPrefix.replace(/\//g, "\\/")}\\S+`));
  if (!match) throw new Error(`No link to ${pathPrefix} in:\n${text}`);
  return match[0];
}
