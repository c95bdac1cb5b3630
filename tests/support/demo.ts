// The invented demo study (scripts/seed/demo/seed.ts) as a fixture for browser tests: written into the
// test database with addresses of its own (the database is shared by every test file), and a way
// to sign a browser in as one of its members.
import type { BrowserContext } from "playwright-core";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import type { StudyRole } from "../../shared/roles";
import { uniqueEmail, type TestApp } from "./server";

export interface DemoFixture extends DemoSeedResult {
  /** The demo's accounts (its names and passwords, addresses unique to this call), by role. */
  account: Record<StudyRole, DemoAccount>;
  studyUrl: string;
}

export async function seedDemoStudy(server: TestApp & { url: string }): Promise<DemoFixture> {
  const accounts = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`demo-${a.role}`) }));
  const seeded = await seedDemo(server.ctx.db, { accounts, env: { NODE_ENV: "test" } });
  return {
    ...seeded,
    account: Object.fromEntries(accounts.map((a) => [a.role, a])) as Record<StudyRole, DemoAccount>,
    studyUrl: `${server.url}/studies/${seeded.studyId}`,
  };
}

/** Signs the browser in through the API (the session cookie lands in the context's jar). */
export async function signInAs(context: BrowserContext, baseUrl: string, account: { email: string; password: string }): Promise<void> {
  const res = await context.request.post(`${baseUrl}/api/auth/login`, { data: { email: account.email, password: account.password } });
  if (res.status() !== 200) throw new Error(`sign-in as ${account.email} failed: ${res.status()} ${await res.text()}`);
}

export async function signOut(context: BrowserContext, baseUrl: string): Promise<void> {
  await context.request.post(`${baseUrl}/api/auth/logout`);
}
