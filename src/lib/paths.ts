// Paths the app links to from more than one place, and the `next` parameter that brings a
// person back after signing in.

export const paths = {
  home: "/",
  signIn: "/sign-in",
  signUp: "/sign-up",
  forgotPassword: "/forgot-password",
  newStudy: "/studies/new",
  study: (studyId: string) => `/studies/${studyId}`,
  studyMembers: (studyId: string) => `/studies/${studyId}/members`,
  studyThreads: (studyId: string) => `/studies/${studyId}/threads`,
  thread: (studyId: string, threadId: string) => `/studies/${studyId}/threads/${threadId}`,
  account: "/account",
  outbox: "/outbox",
  invitation: (token: string) => `/invitations/${token}`,
};

/** Accepts only a path inside this app (never another site, never `//host`). */
export function safeNextPath(raw: string | null | undefined, fallback = paths.home): string {
  if (!raw || !raw.startsWith("/") || raw.startsWith("//") || raw.startsWith("/\\")) return fallback;
  return raw;
}

/** `/sign-in?next=...` (or sign-up), keeping extra query parameters such as a prefilled e-mail. */
export function withNext(path: string, next: string | null | undefined, extra: Record<string, string> = {}): string {
  const params = new URLSearchParams();
  const safe = safeNextPath(next, "");
  if (safe && safe !== paths.home) params.set("next", safe);
  for (const [key, value] of Object.entries(extra)) if (value) params.set(key, value);
  const query = params.toString();
  return query ? `${path}?${query}` : path;
}
