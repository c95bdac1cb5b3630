// Every route of the OpenAPI document, called as each role, as a signed-in stranger and without
// a session. A route missing from the table fails the test, so new routes must state their rights.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomUUID } from "node:crypto";
import request, { type Response } from "supertest";
import { and, eq } from "drizzle-orm";
import { STUDY_ROLES } from "../../shared/roles";
import { createTestApp, PASSWORD, uniqueEmail, type TestApp } from "../support/server";
import { memberships, notifications, studies, outcomeOverrides, runs, taxa, threadPosts, threads, traits } from "../../db/schema/index";
import { castOfRoles, EVERYONE, tokenAgent, type Cast, type Who } from "./fixtures";
import { codedImport, codedTaxon, codedTrait, uploadCsv } from "../support/traitTables";
import { MATRIX_LIST_MAPPING, matrixComparison, matrixModernSetup, matrixModernUpload } from "../support/modernComparison";
import { computeRunNow } from "../../server/services/runAnalysis";
import { commitOccurrences, MATRIX_OCCURRENCES, uploadOccurrences } from "../support/occurrences";

type Agent = Cast["anonymous"];
interface Row {
  /** Who gets a 2xx. Everyone else gets 401 (anonymous) or 403. "public" rows never answer 401/403. */
  allowed: Who[] | "public";
  /** Builds the request for one caller; a fresh study per call keeps destructive rows independent. */
  call: (agent: Agent, env: { studyId: string; cast: Cast; who: Who }) => PromiseLike<Response>;
  freshStudy?: boolean;
}

const SIGNED_IN: Who[] = ["stranger", ...STUDY_ROLES];
const MEMBERS: Who[] = [...STUDY_ROLES];
const OUTCOME_EDITORS: Who[] = ["owner", "coder", "analyst"];
const RUN_CREATORS: Who[] = ["owner", "analyst"];
const POSTERS: Who[] = ["owner", "coder", "analyst", "reviewer"];
const COMPARERS: Who[] = ["owner", "analyst"];

/** A binary trait and a few invented taxa across 66 Ma, and run parameters that test the trait. */
async function matrixRunStudy(studyId: string) {
  const [existing] = await app.ctx.db.select().from(traits).where(and(eq(traits.studyId, studyId), eq(traits.key, "environment")));
  if (existing) return { name: "Matrix run", boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: existing.id }] };
  const [trait] = await app.ctx.db
    .insert(traits)
    .values({ studyId, key: "environment", label: "Environment", kind: "binary", states: [{ code: "marine", label: "Marine", order: 0 }, { code: "nonmarine", label: "Non-marine", order: 1 }] })
    .returning();
  await app.ctx.db.insert(taxa).values(
    Array.from({ length: 8 }, (_, i) => ({ studyId, name: `Matrixella ${i} ${randomUUID().slice(0, 4)}`, fadMa: 70, ladMa: i % 2 ? 67 : 60, traitValues: { [trait.id]: i % 3 ? "marine" : "nonmarine" } })),
  );
  return { name: "Matrix run", boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: trait.id }] };
}

/** A stored run of the study, as a finished job would leave it. */
async function matrixRun(studyId: string, status: "succeeded" | "failed" = "succeeded") {
  const params = await matrixRunStudy(studyId);
  const [run] = await app.ctx.db
    .insert(runs)
    .values({
      studyId,
      name: "Matrix run",
      status,
      params: { ...params, stratifyBy: "higherTaxon", correction: "bh", forceFirth: false, level: 0.95, confoundingThreshold: 0.1 },
      appVersion: "0.0.0",
      results: status === "succeeded" ? { boundaries: [], traits: [], cautions: [] } : null,
      error: status === "failed" ? "Matrix failure" : null,
    })
    .returning();
  return run;
}

/** A run of the study computed from its data (as the demo seed computes its runs), for rows that re-read that data. */
async function matrixComputedRun(studyId: string) {
  const params = await matrixRunStudy(studyId);
  const [owner] = await app.ctx.db.select().from(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.role, "owner")));
  const { services } = app.ctx;
  const sources = { outcomes: services.outcomes, traits: services.traits };
  return computeRunNow(app.ctx.db, sources, studyId, { id: owner.userId }, { ...params, stratifyBy: "higherTaxon", correction: "bh", forceFirth: false, level: 0.95, confoundingThreshold: 0.1 });
}

/** A new invented taxon in the study, for rows that need one to act on. */
async function matrixTaxon(studyId: string) {
  const [taxon] = await app.ctx.db.insert(taxa).values({ studyId, name: `Matrixella ${randomUUID().slice(0, 8)}`, fadMa: 70, ladMa: 67 }).returning();
  return taxon;
}

/** A thread opened by the study lead on a new trait, with one post. */
async function matrixThread(studyId: string, cast: Cast, status: "open" | "resolved" = "open") {
  const traitId = await codedTrait(app, studyId);
  const owner = cast.people.owner.user.id;
  const [thread] = await app.ctx.db
    .insert(threads)
    .values({ studyId, targetType: "trait", targetId: traitId, title: "Matrix thread", status, createdBy: owner, resolvedBy: status === "resolved" ? owner : null, resolvedAt: status === "resolved" ? new Date() : null })
    .returning();
  await app.ctx.db.insert(threadPosts).values({ threadId: thread.id, authorId: owner, body: "Matrix post" });
  return thread;
}

const MATRIX: Record<string, Row> = {
  "GET /api/health": { allowed: "public", call: (a) => a.get("/api/health") },
  "POST /api/auth/signup": {
    allowed: "public",
    call: () => request(app.app).post("/api/auth/signup").send({ email: uniqueEmail("m"), password: PASSWORD, name: "Matrix" }),
  },
  // Signing in on a cookie-less client, so the callers' agents keep their own sessions.
  "POST /api/auth/login": {
    allowed: "public",
    call: (_a, { cast, who }) => request(app.app).post("/api/auth/login").send({ email: cast.people[who === "anonymous" ? "viewer" : who].email, password: PASSWORD }),
  },
  "GET /api/auth/session": { allowed: "public", call: (a) => a.get("/api/auth/session") },
  // Signing out must not end the session the other rows use: sign in afresh, then out.
  "POST /api/auth/logout": {
    allowed: "public",
    call: async (a, { cast, who }) => {
      if (who === "anonymous") return a.post("/api/auth/logout");
      const fresh = request.agent(app.app);
      await fresh.post("/api/auth/login").send({ email: cast.people[who].email, password: PASSWORD });
      return fresh.post("/api/auth/logout");
    },
  },
  "GET /api/auth/me": { allowed: SIGNED_IN, call: (a) => a.get("/api/auth/me") },
  "PATCH /api/auth/me": { allowed: SIGNED_IN, call: (a, { who }) => a.patch("/api/auth/me").send({ name: `Test ${who}` }) },
  "POST /api/auth/password": { allowed: SIGNED_IN, call: (a) => a.post("/api/auth/password").send({ currentPassword: PASSWORD, newPassword: PASSWORD }) },
  "POST /api/auth/password-reset/request": { allowed: "public", call: (a) => a.post("/api/auth/password-reset/request").send({ email: uniqueEmail("nobody") }) },
  "POST /api/auth/password-reset/confirm": {
    allowed: "public",
    call: (a) => a.post("/api/auth/password-reset/confirm").send({ token: "x".repeat(40), password: PASSWORD }),
  },
  // API tokens: a person's own, made and revoked with a session only (the token rows expect 403).
  "GET /api/tokens": { allowed: SIGNED_IN, call: (a) => a.get("/api/tokens") },
  "POST /api/tokens": {
    allowed: SIGNED_IN,
    call: async (a, { cast, who }) => {
      const person = cast.people[who === "anonymous" ? "viewer" : who];
      const [own] = await app.ctx.db.insert(studies).values({ name: "Matrix token study", createdBy: person.user.id }).returning();
      await app.ctx.db.insert(memberships).values({ studyId: own.id, userId: person.user.id, role: "owner" });
      return a.post("/api/tokens").send({ name: "Matrix token", studies: [{ studyId: own.id, role: "viewer" }] });
    },
  },
  "DELETE /api/tokens/{tokenId}": {
    allowed: SIGNED_IN,
    call: async (a, { cast, who }) => a.delete(`/api/tokens/${(await tokenAgent(app, cast.people[who === "anonymous" ? "viewer" : who], null)).tokenId}`),
  },
  "GET /api/studies": { allowed: SIGNED_IN, call: (a) => a.get("/api/studies") },
  "POST /api/studies": { allowed: SIGNED_IN, call: (a) => a.post("/api/studies").send({ name: "Matrix study" }) },
  "GET /api/studies/{studyId}": { allowed: MEMBERS, call: (a, { studyId }) => a.get(`/api/studies/${studyId}`) },
  "PATCH /api/studies/{studyId}": { allowed: ["owner"], call: (a, { studyId }) => a.patch(`/api/studies/${studyId}`).send({ description: "Edited" }) },
  "DELETE /api/studies/{studyId}": { allowed: ["owner"], freshStudy: true, call: (a, { studyId }) => a.delete(`/api/studies/${studyId}`) },
  "GET /api/studies/{studyId}/import-settings": { allowed: MEMBERS, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/import-settings`) },
  "PUT /api/studies/{studyId}/import-settings": {
    allowed: ["owner", "coder"],
    call: (a, { studyId }) => a.put(`/api/studies/${studyId}/import-settings`).send({ missingTokens: ["Indet.", "?"] }),
  },
  "GET /api/studies/{studyId}/members": { allowed: MEMBERS, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/members`) },
  "POST /api/studies/{studyId}/invitations": {
    allowed: ["owner"],
    call: (a, { studyId }) => a.post(`/api/studies/${studyId}/invitations`).send({ email: uniqueEmail("invitee"), role: "reviewer" }),
  },
  "PATCH /api/studies/{studyId}/members/{userId}": {
    allowed: ["owner"],
    freshStudy: true,
    call: (a, { studyId, cast }) => a.patch(`/api/studies/${studyId}/members/${cast.people.viewer.user.id}`).send({ role: "reviewer" }),
  },
  "DELETE /api/studies/{studyId}/members/{userId}": {
    allowed: ["owner"],
    freshStudy: true,
    call: (a, { studyId, cast }) => a.delete(`/api/studies/${studyId}/members/${cast.people.viewer.user.id}`),
  },
  "GET /api/invitations/{token}": {
    allowed: "public",
    call: async (a, { studyId, cast }) => a.get(`/api/invitations/${await cast.makeInvitation(studyId, uniqueEmail("x"))}`),
  },
  "POST /api/invitations/{token}/accept": {
    allowed: SIGNED_IN,
    // Each caller accepts an invitation sent to their own address (another address answers 403, see security-accounts).
    call: async (a, { studyId, cast, who }) => a.post(`/api/invitations/${await cast.makeInvitation(studyId, who === "anonymous" ? uniqueEmail("x") : cast.people[who].email)}/accept`),
  },
  "GET /api/timescale": { allowed: SIGNED_IN, call: (a) => a.get("/api/timescale") },
  // Fresh studies from here on: the invitation rows above made the stranger a member of the shared one.
  "GET /api/studies/{studyId}/outcomes": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/outcomes?boundary=66`) },
  "GET /api/studies/{studyId}/rates": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/rates`) },
  "GET /api/studies/{studyId}/turnover": {
    allowed: MEMBERS,
    freshStudy: true,
    call: (a, { studyId }) => a.get(`/api/studies/${studyId}/turnover?boundaryUnit=Turonian&splitBy=higherTaxon`),
  },
  "GET /api/studies/{studyId}/outcome-overrides": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/outcome-overrides`) },
  "POST /api/studies/{studyId}/outcome-overrides": {
    allowed: OUTCOME_EDITORS,
    freshStudy: true,
    call: async (a, { studyId }) =>
      a.post(`/api/studies/${studyId}/outcome-overrides`).send({ taxonId: (await matrixTaxon(studyId)).id, outcome: "victim", boundaryMa: 66, reason: "Matrix" }),
  },
  "POST /api/studies/{studyId}/outcome-overrides/bulk": {
    allowed: OUTCOME_EDITORS,
    freshStudy: true,
    call: async (a, { studyId }) =>
      a
        .post(`/api/studies/${studyId}/outcome-overrides/bulk`)
        .send({ boundaryMa: 66, reason: "Matrix", items: [{ taxonName: (await matrixTaxon(studyId)).name, outcome: "survivor" }] }),
  },
  "POST /api/studies/{studyId}/outcome-overrides/{overrideId}/revoke": {
    allowed: OUTCOME_EDITORS,
    freshStudy: true,
    call: async (a, { studyId }) => {
      const taxon = await matrixTaxon(studyId);
      const [override] = await app.ctx.db.insert(outcomeOverrides).values({ studyId, taxonId: taxon.id, outcome: "victim", reason: "Matrix" }).returning();
      return a.post(`/api/studies/${studyId}/outcome-overrides/${override.id}/revoke`).send({ reason: "Matrix" });
    },
  },
  "POST /api/studies/{studyId}/runs/preview": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/runs/preview`).send(await matrixRunStudy(studyId)),
  },
  "POST /api/studies/{studyId}/runs": {
    allowed: RUN_CREATORS,
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/runs`).send(await matrixRunStudy(studyId)),
  },
  "GET /api/studies/{studyId}/runs": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/runs`) },
  "GET /api/studies/{studyId}/runs/{runId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/runs/${(await matrixRun(studyId)).id}`),
  },
  "POST /api/studies/{studyId}/runs/{runId}/retry": {
    allowed: RUN_CREATORS,
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/runs/${(await matrixRun(studyId, "failed")).id}/retry`),
  },
  "POST /api/studies/{studyId}/runs/{runId}/rerun": {
    allowed: RUN_CREATORS,
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/runs/${(await matrixRun(studyId)).id}/rerun`).send({}),
  },
  "GET /api/studies/{studyId}/runs/{runId}/diff": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => {
      const [base, run] = [await matrixRun(studyId), await matrixRun(studyId)];
      return a.get(`/api/studies/${studyId}/runs/${run.id}/diff?against=${base.id}`);
    },
  },
  "GET /api/studies/{studyId}/runs/{runId}/export": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/runs/${(await matrixRun(studyId)).id}/export?format=csv`),
  },
  "GET /api/studies/{studyId}/runs/{runId}/replication.zip": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/runs/${(await matrixComputedRun(studyId)).id}/replication.zip`),
  },
  // Trait tables: codebook, taxa, coding decisions, imports, exports. What a call needs (a trait, a
  // taxon with a decision, an upload) is written directly or by the owner, so only the call is judged.
  // Reads use a fresh study: an earlier row lets the stranger accept an invitation to the shared one.
  "GET /api/studies/{studyId}/traits": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/traits`) },
  "POST /api/studies/{studyId}/traits": {
    allowed: ["owner", "coder"],
    call: (a, { studyId }) => a.post(`/api/studies/${studyId}/traits`).send({ key: `matrix_${randomUUID().slice(0, 8)}`, label: "Matrix trait", kind: "numeric" }),
  },
  "PATCH /api/studies/{studyId}/traits/{traitId}": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) => a.patch(`/api/studies/${studyId}/traits/${await codedTrait(app, studyId)}`).send({ label: "Renamed trait" }),
  },
  "POST /api/studies/{studyId}/traits/reorder": {
    allowed: ["owner", "coder"],
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/traits/reorder`).send({ traitIds: [await codedTrait(app, studyId)] }),
  },
  "GET /api/studies/{studyId}/traits/{traitId}/usage": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/traits/${await codedTrait(app, studyId)}/usage`),
  },
  "GET /api/studies/{studyId}/taxa": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/taxa?pageSize=5`) },
  "GET /api/studies/{studyId}/taxa/ids": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/taxa/ids`) },
  "POST /api/studies/{studyId}/taxa": { allowed: ["owner", "coder"], call: (a, { studyId }) => a.post(`/api/studies/${studyId}/taxa`).send({ name: `Matrix ${randomUUID()}` }) },
  "POST /api/studies/{studyId}/taxa/bulk": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) =>
      a.post(`/api/studies/${studyId}/taxa/bulk`).send({ taxonIds: [(await codedTaxon(app, studyId)).taxonId], field: "notes", value: "b", reason: "Matrix" }),
  },
  "GET /api/studies/{studyId}/taxa/{taxonId}": { allowed: MEMBERS, freshStudy: true, call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/taxa/${(await codedTaxon(app, studyId)).taxonId}`) },
  "PATCH /api/studies/{studyId}/taxa/{taxonId}": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) =>
      a.patch(`/api/studies/${studyId}/taxa/${(await codedTaxon(app, studyId)).taxonId}`).send({ version: 1, changes: { notes: "b" }, reason: "Matrix" }),
  },
  "DELETE /api/studies/{studyId}/taxa/{taxonId}": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) => a.delete(`/api/studies/${studyId}/taxa/${(await codedTaxon(app, studyId)).taxonId}?version=1&reason=Matrix`),
  },
  "GET /api/studies/{studyId}/taxa/{taxonId}/history": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/taxa/${(await codedTaxon(app, studyId)).taxonId}/history`),
  },
  "GET /api/studies/{studyId}/decisions": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/decisions`) },
  "POST /api/studies/{studyId}/decisions/{decisionId}/revert": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/decisions/${(await codedTaxon(app, studyId)).decisionId}/revert`).send({ reason: "Matrix" }),
  },
  "POST /api/studies/{studyId}/decisions/batches/{batchId}/revert": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/decisions/batches/${(await codedTaxon(app, studyId)).batchId}/revert`).send({ reason: "Matrix" }),
  },
  "POST /api/studies/{studyId}/imports": { allowed: ["owner", "coder"], call: (a, { studyId }) => uploadCsv(a, studyId, "name\nMatrixella\n") },
  "GET /api/studies/{studyId}/imports": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/imports`) },
  "GET /api/studies/{studyId}/imports/{importId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.get(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, false)}`),
  },
  "GET /api/studies/{studyId}/imports/{importId}/upload": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) => a.get(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, false)}/upload`),
  },
  "POST /api/studies/{studyId}/imports/{importId}/preview": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) =>
      a.post(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, false)}/preview`).send({ mapping: { name: "name" } }),
  },
  "POST /api/studies/{studyId}/imports/{importId}/commit": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) =>
      a.post(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, false)}/commit`).send({ mapping: { name: "name" }, skipInvalid: false }),
  },
  "POST /api/studies/{studyId}/imports/{importId}/revert": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, true)}/revert`).send({}),
  },
  "DELETE /api/studies/{studyId}/imports/{importId}": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) => a.delete(`/api/studies/${studyId}/imports/${await codedImport(cast.people.owner.agent, studyId, false)}`),
  },
  // Occurrences: uploads through the import steps, one taxon's finds, ranges derived from them, three-timer sampling.
  "POST /api/studies/{studyId}/occurrence-uploads": { allowed: ["owner", "coder"], call: (a, { studyId }) => uploadOccurrences(a, studyId, MATRIX_OCCURRENCES) },
  "GET /api/studies/{studyId}/occurrence-uploads": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/occurrence-uploads`) },
  "GET /api/studies/{studyId}/occurrence-uploads/{uploadId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.get(`/api/studies/${studyId}/occurrence-uploads/${(await uploadOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES)).body.upload.id}`),
  },
  "POST /api/studies/{studyId}/occurrence-uploads/{uploadId}/preview": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) =>
      a
        .post(`/api/studies/${studyId}/occurrence-uploads/${(await uploadOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES)).body.upload.id}/preview`)
        .send({ mapping: { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" } }),
  },
  "POST /api/studies/{studyId}/occurrence-uploads/{uploadId}/commit": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) =>
      a
        .post(`/api/studies/${studyId}/occurrence-uploads/${(await uploadOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES)).body.upload.id}/commit`)
        .send({ mapping: { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" }, skipInvalid: false }),
  },
  "POST /api/studies/{studyId}/occurrence-uploads/{uploadId}/revert": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/occurrence-uploads/${(await commitOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES)).uploadId}/revert`).send({}),
  },
  "DELETE /api/studies/{studyId}/occurrence-uploads/{uploadId}": {
    allowed: ["owner", "coder"],
    call: async (a, { studyId, cast }) => a.delete(`/api/studies/${studyId}/occurrence-uploads/${(await uploadOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES)).body.upload.id}`),
  },
  "GET /api/studies/{studyId}/occurrences": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/occurrences?taxon=Matrixia`) },
  "POST /api/studies/{studyId}/occurrences/ranges/preview": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.post(`/api/studies/${studyId}/occurrences/ranges/preview`).send({}) },
  "POST /api/studies/{studyId}/occurrences/ranges/apply": {
    allowed: ["owner", "coder"],
    freshStudy: true,
    call: async (a, { studyId, cast }) => {
      await commitOccurrences(cast.people.owner.agent, studyId, MATRIX_OCCURRENCES);
      return a.post(`/api/studies/${studyId}/occurrences/ranges/apply`).send({ taxa: ["Matrixia"] });
    },
  },
  "GET /api/studies/{studyId}/time-bins": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/time-bins`) },
  "PUT /api/studies/{studyId}/time-bins": {
    allowed: ["owner", "coder"],
    call: (a, { studyId }) => a.put(`/api/studies/${studyId}/time-bins`).send({ bins: [{ name: "Matrix slice 1", baseMa: 70, topMa: 68 }, { name: "Matrix slice 2", baseMa: 68, topMa: 66 }] }),
  },
  "POST /api/studies/{studyId}/time-bins/csv": {
    allowed: ["owner", "coder"],
    call: (a, { studyId }) => a.post(`/api/studies/${studyId}/time-bins/csv`).attach("file", Buffer.from("name,base_ma,top_ma\n1,70,68\n2,68,66\n", "utf8"), "matrix-bins.csv"),
  },
  "GET /api/studies/{studyId}/occurrences/three-timer": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/occurrences/three-timer?boundaryMa=66`) },
  "GET /api/studies/{studyId}/exports/template.csv": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/exports/template.csv`) },
  "GET /api/studies/{studyId}/exports/taxa.csv": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/exports/taxa.csv?form=long`) },
  "GET /api/studies/{studyId}/exports/codebook.csv": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/exports/codebook.csv`) },
  "GET /api/studies/{studyId}/exports/turnover.csv": {
    allowed: MEMBERS,
    freshStudy: true,
    call: (a, { studyId }) => a.get(`/api/studies/${studyId}/exports/turnover.csv?boundaryUnit=Turonian`),
  },
  "GET /api/studies/{studyId}/exports/scorecard.csv": {
    allowed: MEMBERS,
    freshStudy: true,
    call: (a, { studyId }) => a.get(`/api/studies/${studyId}/exports/scorecard.csv?boundaryUnit=Turonian`),
  },
  // Modern comparison: lists, their uploads and crosswalks, and comparisons. What a call needs (a
  // list with a run whose model scores it, an upload, a saved comparison) is written directly or by the owner.
  "POST /api/studies/{studyId}/modern-list-uploads": {
    allowed: COMPARERS,
    call: (a, { studyId }) => a.post(`/api/studies/${studyId}/modern-list-uploads`).attach("file", Buffer.from("species,status\nMatrixia (invented),LC\n", "utf8"), "matrix-list.csv"),
  },
  "POST /api/studies/{studyId}/modern-list-uploads/{uploadId}/preview": {
    allowed: COMPARERS,
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/modern-list-uploads/${await matrixModernUpload(cast.people.owner.agent, studyId)}/preview`).send({ mapping: MATRIX_LIST_MAPPING }),
  },
  "POST /api/studies/{studyId}/modern-list-uploads/{uploadId}/commit": {
    allowed: COMPARERS,
    call: async (a, { studyId, cast }) =>
      a.post(`/api/studies/${studyId}/modern-list-uploads/${await matrixModernUpload(cast.people.owner.agent, studyId)}/commit`).send({ mapping: MATRIX_LIST_MAPPING, name: "Matrix list", skipInvalid: false }),
  },
  "DELETE /api/studies/{studyId}/modern-list-uploads/{uploadId}": {
    allowed: COMPARERS,
    call: async (a, { studyId, cast }) => a.delete(`/api/studies/${studyId}/modern-list-uploads/${await matrixModernUpload(cast.people.owner.agent, studyId)}`),
  },
  "GET /api/studies/{studyId}/modern-lists": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/modern-lists`) },
  "GET /api/studies/{studyId}/modern-lists/{listId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/modern-lists/${(await matrixModernSetup(app, studyId)).listId}`),
  },
  "PUT /api/studies/{studyId}/modern-lists/{listId}/crosswalk": {
    allowed: COMPARERS,
    call: async (a, { studyId }) => {
      const { listId, traitId } = await matrixModernSetup(app, studyId, { crosswalk: false });
      return a.put(`/api/studies/${studyId}/modern-lists/${listId}/crosswalk`).send({ pairs: [{ traitId, column: "water", states: { sea: "sea" } }] });
    },
  },
  "DELETE /api/studies/{studyId}/modern-lists/{listId}": {
    allowed: COMPARERS,
    call: async (a, { studyId }) => a.delete(`/api/studies/${studyId}/modern-lists/${(await matrixModernSetup(app, studyId)).listId}`),
  },
  "POST /api/studies/{studyId}/comparisons": {
    allowed: COMPARERS,
    call: async (a, { studyId }) => {
      const { listId, runId } = await matrixModernSetup(app, studyId);
      return a.post(`/api/studies/${studyId}/comparisons`).send({ name: "Matrix comparison", listId, runId });
    },
  },
  "GET /api/studies/{studyId}/comparisons": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/comparisons`) },
  "GET /api/studies/{studyId}/comparisons/{comparisonId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/comparisons/${await matrixComparison(app, studyId)}`),
  },
  "GET /api/studies/{studyId}/comparisons/{comparisonId}/export": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.get(`/api/studies/${studyId}/comparisons/${await matrixComparison(app, studyId)}/export?format=csv`),
  },
  "DELETE /api/studies/{studyId}/comparisons/{comparisonId}": {
    allowed: COMPARERS,
    call: async (a, { studyId }) => a.delete(`/api/studies/${studyId}/comparisons/${await matrixComparison(app, studyId)}`),
  },
  // Threads: members read, every role but guests posts; resolving and reopening is for coders and
  // study leads (and the thread's author, here the study lead).
  "GET /api/studies/{studyId}/threads": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/threads?status=open`) },
  "POST /api/studies/{studyId}/threads": {
    allowed: POSTERS,
    freshStudy: true,
    call: async (a, { studyId }) => a.post(`/api/studies/${studyId}/threads`).send({ target: { type: "trait", id: await codedTrait(app, studyId) }, body: "Matrix question" }),
  },
  "GET /api/studies/{studyId}/threads/{threadId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.get(`/api/studies/${studyId}/threads/${(await matrixThread(studyId, cast)).id}`),
  },
  "POST /api/studies/{studyId}/threads/{threadId}/posts": {
    allowed: POSTERS,
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/threads/${(await matrixThread(studyId, cast)).id}/posts`).send({ body: "Matrix reply" }),
  },
  "POST /api/studies/{studyId}/threads/{threadId}/resolve": {
    allowed: ["owner", "coder"],
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/threads/${(await matrixThread(studyId, cast)).id}/resolve`).send({}),
  },
  "POST /api/studies/{studyId}/threads/{threadId}/reopen": {
    allowed: ["owner", "coder"],
    freshStudy: true,
    call: async (a, { studyId, cast }) => a.post(`/api/studies/${studyId}/threads/${(await matrixThread(studyId, cast, "resolved")).id}/reopen`),
  },
  "GET /api/studies/{studyId}/activity": { allowed: MEMBERS, freshStudy: true, call: (a, { studyId }) => a.get(`/api/studies/${studyId}/activity`) },
  // Notifications are the caller's own; the preference of a study is for its members.
  "GET /api/notifications": { allowed: SIGNED_IN, call: (a) => a.get("/api/notifications") },
  "POST /api/notifications/{notificationId}/read": {
    allowed: SIGNED_IN,
    call: async (a, { studyId, cast, who }) => {
      if (who === "anonymous") return a.post(`/api/notifications/${randomUUID()}/read`);
      const [n] = await app.ctx.db.insert(notifications).values({ userId: cast.people[who].user.id, studyId, kind: "mention", summary: "Matrix mention" }).returning();
      return a.post(`/api/notifications/${n.id}/read`);
    },
  },
  "POST /api/notifications/read-all": { allowed: SIGNED_IN, call: (a) => a.post("/api/notifications/read-all").send({}) },
  "GET /api/notification-preferences": { allowed: SIGNED_IN, call: (a) => a.get("/api/notification-preferences") },
  "PUT /api/notification-preferences/{studyId}": {
    allowed: MEMBERS,
    freshStudy: true,
    call: (a, { studyId }) => a.put(`/api/notification-preferences/${studyId}`).send({ mode: "digest" }),
  },
  // The fake mailbox: everyone signed in reads their own mail (security-accounts checks whose).
  "GET /api/outbox": { allowed: SIGNED_IN, call: (a) => a.get("/api/outbox") },
};

let app: TestApp;
let cast: Cast;
let sharedStudy: string;

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  sharedStudy = await cast.makeStudy();
});
afterAll(() => app.close());

describe("role matrix", () => {
  it("has a row for every route of the OpenAPI document", () => {
    const documented = Object.entries(app.openapi.paths as Record<string, Record<string, unknown>>).flatMap(([path, ops]) =>
      Object.keys(ops).map((method) => `${method.toUpperCase()} ${path}`),
    );
    expect(documented.length).toBeGreaterThan(15);
    const missing = documented.filter((route) => !(route in MATRIX));
    expect(missing, `routes without a row in the role matrix: ${missing.join(", ")}`).toEqual([]);
  });

  for (const [route, row] of Object.entries(MATRIX)) {
    for (const who of EVERYONE) {
      const expected = row.allowed === "public" ? "not 401/403" : row.allowed.includes(who) ? "2xx" : who === "anonymous" ? "401" : "403";
      it(`${route} as ${who}: ${expected}`, async () => {
        const agent = who === "anonymous" ? cast.anonymous : cast.people[who].agent;
        const studyId = row.freshStudy ? await cast.makeStudy() : sharedStudy;
        const res = await row.call(agent, { studyId, cast, who });
        if (expected === "2xx") expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(200);
        if (expected === "2xx") expect(res.status, JSON.stringify(res.body)).toBeLessThan(300);
        if (expected === "401") expect(res.status).toBe(401);
        if (expected === "403") expect(res.status).toBe(403);
        if (expected === "not 401/403") expect([401, 403]).not.toContain(res.status);
        if (res.status >= 400) expect(res.body.error?.message, "errors carry a message a person can act on").toMatch(/\w+/);
      });
    }
  }
});

// The same rows called with an API token instead of a session: each person's token covers the
// study with their own role (the stranger's covers no study). A token gets exactly the session's
// answer, except on the routes the document reserves for a session (no apiToken security), which
// a token is refused (403).
describe("role matrix with API tokens", () => {
  const acceptsTokens = (route: string) => {
    const [method, path] = route.split(" ");
    const op = (app.openapi.paths as Record<string, Record<string, { security?: Array<Record<string, unknown>> }>>)[path][method.toLowerCase()];
    return op.security?.some((s) => "apiToken" in s) ?? false;
  };
  for (const [route, row] of Object.entries(MATRIX)) {
    if (row.allowed === "public") continue;
    for (const who of EVERYONE.filter((w) => w !== "anonymous")) {
      it(`${route} with ${who}'s token`, async () => {
        const expected = acceptsTokens(route) && (row.allowed as Who[]).includes(who) ? "2xx" : "403";
        const studyId = row.freshStudy ? await cast.makeStudy() : sharedStudy;
        const person = cast.people[who as Exclude<Who, "anonymous">];
        const { agent } = await tokenAgent(app, person, who === "stranger" ? null : { studyId, role: who as Exclude<Who, "anonymous" | "stranger"> });
        const res = await row.call(agent, { studyId, cast, who });
        if (expected === "2xx") {
          expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(200);
          expect(res.status, JSON.stringify(res.body)).toBeLessThan(300);
        } else {
          expect(res.status, JSON.stringify(res.body)).toBe(403);
        }
        expect(res.headers["set-cookie"], "a token request starts no session").toBeUndefined();
      });
    }
  }
});
