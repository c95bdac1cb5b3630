// A new study lead and their new study, made through the API for a browser test: the sign-up's
// session lands in the cookie jar of `request` (a browser context's or a page's), so the browser
// is signed in as that lead. Every name is invented.
import { randomUUID } from "node:crypto";
import type { APIRequestContext } from "playwright-core";
import { expect } from "vitest";
import { PASSWORD, uniqueEmail } from "./server";

export interface LeadWithStudy {
  email: string;
  userId: string;
  studyId: string;
  studyUrl: string;
}

/**
 * Signs `lead` up (password PASSWORD, an address unique to this call starting with `lead.label`)
 * and makes a study named `study.name` and a short random tag, so that test files sharing the
 * database never meet each other's studies.
 */
export async function leadWithStudy(
  serverUrl: string,
  request: APIRequestContext,
  lead: { label: string; name: string },
  study: { name: string; description: string; suggestedCodebook?: boolean },
): Promise<LeadWithStudy> {
  const email = uniqueEmail(lead.label);
  const signup = await request.post(`${serverUrl}/api/auth/signup`, { data: { email, password: PASSWORD, name: lead.name } });
  expect(signup.status()).toBe(201);
  const userId = ((await signup.json()) as { id: string }).id;
  const created = await request.post(`${serverUrl}/api/studies`, {
    data: { name: `${study.name} ${randomUUID().slice(0, 6)}`, description: study.description, suggestedCodebook: study.suggestedCodebook ?? false },
  });
  expect(created.status()).toBe(201);
  const studyId = ((await created.json()) as { id: string }).id;
  return { email, userId, studyId, studyUrl: `${serverUrl}/studies/${studyId}` };
}
