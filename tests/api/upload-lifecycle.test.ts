// One upload lifecycle for every kind of CSV upload (server/services/uploadLifecycle.ts): a trait
// table, an occurrence table, a modern list. For each kind: a file refused after it was stored is
// removed; a commit that fails puts the upload back with the reason and keeps only that upload's
// file (for another try), which a successful retry deletes; a commit whose file is gone discards the
// upload; an upload left uncommitted for a day is swept by the periodic sweep and at an upload of any
// other kind. Names, files and values are invented.
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { imports } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

const uploadDir = mkdtempSync(join(tmpdir(), "stratasieve-upload-lifecycle-"));
let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp({ uploadDir });
  cast = await castOfRoles(app);
});
afterAll(async () => {
  await app.close();
  rmSync(uploadDir, { recursive: true, force: true });
});

interface Kind {
  name: string;
  /** The uploads' path in a study. */
  path: (studyId: string) => string;
  /** The upload's id in the upload answer. */
  idOf: (body: Record<string, { id: string }>) => string;
  /** A file with one valid row and one row with a problem. */
  file: string;
  commitBody: (skipInvalid: boolean) => Record<string, unknown>;
  /** The code of the 400 refusing a commit while a row has a problem. */
  problemsCode: string;
}

const KINDS: Kind[] = [
  {
    name: "trait table",
    path: (s) => `/api/studies/${s}/imports`,
    idOf: (b) => b.import.id,
    file: "name,first_appearance\nAlphella,80\nBetella,not-a-stage\n", // row 3: neither an age nor an interval name
    commitBody: (skipInvalid) => ({ mapping: { name: "name", firstAppearance: "first_appearance" }, skipInvalid }),
    problemsCode: "import_has_problems",
  },
  {
    name: "occurrence table",
    path: (s) => `/api/studies/${s}/occurrence-uploads`,
    idOf: (b) => b.upload.id,
    file: "taxon,max_ma,min_ma\nAlphella,80,75\nBetella,60,65\n", // row 3: maximum younger than minimum
    commitBody: (skipInvalid) => ({ mapping: { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" }, skipInvalid, duplicates: "keep" }),
    problemsCode: "occurrences_have_problems",
  },
  {
    name: "modern list",
    path: (s) => `/api/studies/${s}/modern-list-uploads`,
    idOf: (b) => b.upload.id,
    file: "species,status\nAlpha invented,LC\nBeta invented,threatened\n", // row 3: not an IUCN category
    commitBody: (skipInvalid) => ({ mapping: { name: "species", category: "status" }, name: "Invented list", skipInvalid }),
    problemsCode: "list_has_problems",
  },
];

const filesKept = () => readdirSync(uploadDir).sort();
const storedRow = async (id: string) => (await app.ctx.db.select().from(imports).where(eq(imports.id, id)))[0]!;

async function upload(kind: Kind, studyId: string, content = kind.file) {
  const res = await cast.people.owner.agent.post(kind.path(studyId)).attach("file", Buffer.from(content, "utf8"), "invented.csv");
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return kind.idOf(res.body);
}

describe.each(KINDS)("the upload lifecycle of a $name", (kind) => {
  it("removes a file refused after it was stored (no data rows)", async () => {
    const studyId = await cast.makeStudy();
    const before = filesKept();
    const res = await cast.people.owner.agent.post(kind.path(studyId)).attach("file", Buffer.from("only,a,header\n", "utf8"), "invented.csv");
    expect(res.status).toBe(400);
    expect(filesKept()).toEqual(before);
  });

  it("a failed commit writes nothing, keeps only its own upload's file for another try, and a retry that succeeds deletes it", async () => {
    const studyId = await cast.makeStudy();
    const before = filesKept();
    const id = await upload(kind, studyId);
    const { storedPath } = await storedRow(id);
    expect(filesKept()).toEqual([...before, storedPath!.split("/").pop()].sort());

    const refused = await cast.people.owner.agent.post(`${kind.path(studyId)}/${id}/commit`).send(kind.commitBody(false));
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe(kind.problemsCode);
    const afterFailure = await storedRow(id);
    expect(afterFailure).toMatchObject({ status: "previewed", progress: 0, storedPath, committedAt: null });
    expect(afterFailure.failureReason).toMatch(/^Nothing was (imported|written|saved)/);
    // No file but the one the open upload still holds.
    expect(filesKept()).toEqual([...before, storedPath!.split("/").pop()].sort());

    const retried = await cast.people.owner.agent.post(`${kind.path(studyId)}/${id}/commit`).send(kind.commitBody(true));
    expect(retried.status, JSON.stringify(retried.body)).toBeLessThan(300);
    expect(await storedRow(id)).toMatchObject({ status: "committed", storedPath: null, failureReason: null, skippedInvalid: 1 });
    expect(filesKept()).toEqual(before);
  });

  it("a commit whose stored file is gone answers 409 and discards the upload, which no longer points at a file", async () => {
    const studyId = await cast.makeStudy();
    const before = filesKept();
    const id = await upload(kind, studyId);
    await rm((await storedRow(id)).storedPath!);
    const res = await cast.people.owner.agent.post(`${kind.path(studyId)}/${id}/commit`).send(kind.commitBody(true));
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("file_gone");
    expect(await storedRow(id)).toMatchObject({ status: "discarded", storedPath: null, failureReason: "The uploaded file is no longer kept; upload it again." });
    expect(filesKept()).toEqual(before);
  });

  it("an upload left uncommitted for a day is discarded and its file deleted by the periodic sweep", async () => {
    const studyId = await cast.makeStudy();
    const id = await upload(kind, studyId);
    const { storedPath } = await storedRow(id);
    await app.ctx.db.update(imports).set({ createdAt: new Date(Date.now() - 25 * 3600 * 1000) }).where(eq(imports.id, id));
    const swept = await app.ctx.services.imports.sweepStaleUploads();
    expect(swept).toContain(id);
    expect(await storedRow(id)).toMatchObject({ status: "discarded", storedPath: null, failureReason: expect.stringMatching(/within a day/) });
    expect(filesKept()).not.toContain(storedPath!.split("/").pop());
  });
});

describe("stale uploads of every kind", () => {
  it("are swept at an upload of any other kind", async () => {
    const studyId = await cast.makeStudy();
    for (const [i, stale] of KINDS.entries()) {
      const id = await upload(stale, studyId);
      const { storedPath } = await storedRow(id);
      await app.ctx.db.update(imports).set({ createdAt: new Date(Date.now() - 25 * 3600 * 1000) }).where(eq(imports.id, id));
      const other = KINDS[(i + 1) % KINDS.length]!;
      await upload(other, studyId);
      expect(await storedRow(id), `a stale ${stale.name} upload at a ${other.name} upload`).toMatchObject({ status: "discarded", storedPath: null });
      expect(filesKept()).not.toContain(storedPath!.split("/").pop());
    }
  });
});
