// Personal API tokens: made for chosen studies with a role no higher than the maker's there, shown
// once, stored hashed, bounded on every request by both the token's role and the owner's role
// today, and stopped at once by a revoke, an expiry or the owner's removal from the study.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { and, eq } from "drizzle-orm";
import { apiTokens, memberships } from "../../db/schema/index";
import { hashToken } from "../../server/services/tokens";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
let studyId: string;
let otherStudyId: string;

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  studyId = await cast.makeStudy("Token study");
  otherStudyId = await cast.makeStudy("Another study");
});
afterAll(() => app?.close());

const bearer = (secret: string) => request.agent(app.app).set("Authorization", `Bearer ${secret}`);

async function makeToken(who: keyof Cast["people"], studies: Array<{ studyId: string; role: string }>, extra: Record<string, unknown> = {}) {
  return cast.people[who].agent.post("/api/tokens").send({ name: `Nightly import (${who})`, studies, ...extra });
}

describe("making a token", () => {
  it("answers the token once and keeps only its hash", async () => {
    const res = await makeToken("coder", [{ studyId, role: "coder" }]);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const { secret, token } = res.body as { secret: string; token: { id: string; prefix: string; status: string; studies: Array<{ studyName: string; role: string }>; expiresAt: string } };
    expect(secret).toMatch(/^sieve_[\w-]{40,}$/);
    expect(secret.startsWith(token.prefix)).toBe(true);
    expect(token).toMatchObject({ status: "active", studies: [{ studyName: "Token study", role: "coder" }] });
    // Default expiry: 90 days.
    expect(Math.round((Date.parse(token.expiresAt) - Date.now()) / 86_400_000)).toBe(90);
    const [row] = await app.ctx.db.select().from(apiTokens).where(eq(apiTokens.id, token.id));
    expect(row.tokenHash).toBe(hashToken(secret));
    expect(JSON.stringify(row)).not.toContain(secret);
    const listed = await cast.people.coder.agent.get("/api/tokens");
    expect(listed.body.tokens.find((t: { id: string }) => t.id === token.id)).toBeTruthy();
    expect(JSON.stringify(listed.body)).not.toContain(secret);
  });

  it("refuses a role above the maker's own, naming the field, and a study the maker is not in", async () => {
    const higher = await makeToken("analyst", [{ studyId, role: "coder" }]);
    expect(higher.status).toBe(400);
    expect(higher.body.error.fields["studies.0.role"]).toMatch(/Analyst in Token study/);
    const stranger = await makeToken("stranger", [{ studyId, role: "viewer" }]);
    expect(stranger.status).toBe(400);
    expect(stranger.body.error.fields["studies.0.studyId"]).toMatch(/not a member/);
    const bad = await makeToken("owner", [{ studyId, role: "owner" }], { expiresInDays: 400 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.expiresInDays).toMatch(/at most 365/);
  });
});

describe("using a token", () => {
  it("acts as its owner within its studies and role, and records when it was last used", async () => {
    const { secret, token } = (await makeToken("owner", [{ studyId, role: "viewer" }])).body;
    const agent = bearer(secret);
    const read = await agent.get(`/api/studies/${studyId}`);
    expect(read.status).toBe(200);
    // The role the token acts with: its own, though its owner leads the study.
    expect(read.body.role).toBe("viewer");
    const write = await agent.patch(`/api/studies/${studyId}`).send({ description: "From a script" });
    expect(write.status).toBe(403);
    // A study the token does not cover, although its owner is in it.
    const other = await agent.get(`/api/studies/${otherStudyId}`);
    expect(other.status).toBe(403);
    expect(other.body.error.message).toMatch(/does not cover this study/);
    // The list of studies shows only the covered one, with the token's role.
    const list = await agent.get("/api/studies");
    expect(list.body.studies.map((s: { id: string; role: string }) => [s.id, s.role])).toEqual([[studyId, "viewer"]]);
    const [row] = await app.ctx.db.select().from(apiTokens).where(eq(apiTokens.id, token.id));
    expect(row.lastUsedAt).not.toBeNull();
  });

  it("needs no Origin for a write (no browser sends it) and starts no session", async () => {
    const { secret } = (await makeToken("owner", [{ studyId, role: "owner" }])).body;
    const res = await bearer(secret).patch(`/api/studies/${studyId}`).set("Origin", "https://elsewhere.example").send({ description: "Edited by a script" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.headers["set-cookie"]).toBeUndefined();
    expect(res.headers["cache-control"]).toBe("no-store");
  });

  it("never manages the account: password, profile, tokens and new studies need a session", async () => {
    const { secret } = (await makeToken("owner", [{ studyId, role: "owner" }])).body;
    const agent = bearer(secret);
    for (const res of [
      await agent.post("/api/tokens").send({ name: "Chain", studies: [{ studyId, role: "viewer" }] }),
      await agent.get("/api/tokens"),
      await agent.post("/api/auth/password").send({ currentPassword: "x", newPassword: "y".repeat(12) }),
      await agent.patch("/api/auth/me").send({ name: "Renamed by a script" }),
      await agent.post("/api/studies").send({ name: "Made by a script" }),
    ]) {
      expect(res.status).toBe(403);
      expect(res.body.error.message).toMatch(/API token cannot do this/);
    }
  });

  it("refuses an unknown or malformed token with 401 rather than treating the call as anonymous", async () => {
    expect((await bearer("sieve_not-a-real-token").get("/api/studies")).status).toBe(401);
    const malformed = await request(app.app).get("/api/studies").set("Authorization", "Bearer");
    expect(malformed.status).toBe(401);
    expect(malformed.body.error.message).toMatch(/Bearer <token>/);
  });
});

describe("a token stops working on the next request", () => {
  it("once revoked", async () => {
    const { secret, token } = (await makeToken("analyst", [{ studyId, role: "analyst" }])).body;
    expect((await bearer(secret).get(`/api/studies/${studyId}`)).status).toBe(200);
    expect((await cast.people.analyst.agent.delete(`/api/tokens/${token.id}`)).status).toBe(204);
    expect((await bearer(secret).get(`/api/studies/${studyId}`)).status).toBe(401);
    const listed = await cast.people.analyst.agent.get("/api/tokens");
    expect(listed.body.tokens.find((t: { id: string }) => t.id === token.id).status).toBe("revoked");
    // Someone else's token cannot be revoked.
    expect((await cast.people.coder.agent.delete(`/api/tokens/${token.id}`)).status).toBe(404);
  });

  it("once expired", async () => {
    const { secret, token } = (await makeToken("reviewer", [{ studyId, role: "reviewer" }])).body;
    await app.ctx.db.update(apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(apiTokens.id, token.id));
    expect((await bearer(secret).get(`/api/studies/${studyId}`)).status).toBe(401);
  });

  it("once its owner leaves the study, and within the owner's new role after a change", async () => {
    const own = await cast.makeStudy("Changing roles");
    const { secret } = (await makeToken("coder", [{ studyId: own, role: "coder" }])).body;
    const agent = bearer(secret);
    const trait = { key: "shell_form", label: "Shell form", kind: "binary", states: [{ code: "coiled", label: "Coiled" }, { code: "straight", label: "Straight" }] };
    expect((await agent.post(`/api/studies/${own}/traits`).send(trait)).status).toBe(201);
    // Now an analyst: coder and analyst share only the reviewer's rights, so no more codebook edits.
    await app.ctx.db.update(memberships).set({ role: "analyst" }).where(and(eq(memberships.studyId, own), eq(memberships.userId, cast.people.coder.user.id)));
    const again = await agent.post(`/api/studies/${own}/traits`).send({ ...trait, key: "rib_style", label: "Rib style" });
    expect(again.status).toBe(403);
    expect((await agent.get(`/api/studies/${own}`)).body.role).toBe("reviewer");
    await app.ctx.db.delete(memberships).where(and(eq(memberships.studyId, own), eq(memberships.userId, cast.people.coder.user.id)));
    expect((await agent.get(`/api/studies/${own}`)).status).toBe(403);
  });
});
