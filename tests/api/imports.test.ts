// CSV imports end to end against the real database: upload, preview, commit all or nothing,
// progress, history, revert to the exact previous values. The taxa and the basin are invented.
// Interval ages: ICS International Chronostratigraphic Chart v2024/12 (Cohen, Harper, Gibbard &
// Car 2025, Episodes 48: 105-115): Campanian base 83.6 Ma, Maastrichtian base 72.2 and top 66.0 Ma.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { existsSync } from "node:fs";
import { readdir } from "node:fs/promises";
import { and, eq } from "drizzle-orm";
import { activity, codingDecisions, imports, taxa } from "../../db/schema/index";
import { IMPORT_MAX_BYTES } from "../../shared/schemas/imports";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, templateMapping, uploadCsv, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

const HEADER = "name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range";

async function liveTaxa(studyId: string) {
  const rows = await app.ctx.db.select().from(taxa).where(eq(taxa.studyId, studyId));
  return rows.filter((r) => r.deletedAt === null).sort((a, b) => a.name.localeCompare(b.name));
}

describe("upload and preview", () => {
  it("reads a semicolon file with a BOM and decimal commas, suggests the mapping, and lists problems by row and column", async () => {
    const study = await studyWithCodebook(app, cast);
    const text =
      "\uFEFFname;higher_taxon;first_appearance;last_appearance;life_habit;body_size\n" +
      "Alphella;Invented A;Campanian;Maastrichtian;epifaunal;12,5\n" +
      "\n" +
      "Betella;Invented B;80;70;burrower;4\n" + // row 4: unknown state
      ";Invented B;80;70;infaunal;4\n" + // row 5: missing name
      "Gammella;Invented C;60;70;infaunal;4\n"; // row 6: first appearance younger than last
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, text);
    expect(upload.status).toBe(201);
    expect(upload.body).toMatchObject({ delimiter: ";", hadBom: true, encoding: "utf-8", rowCount: 4, maxBytes: IMPORT_MAX_BYTES });
    expect(upload.body.columns[0]).toBe("name");
    expect(upload.body.suggestedMapping).toEqual({
      name: "name",
      higherTaxon: "higher_taxon",
      firstAppearance: "first_appearance",
      lastAppearance: "last_appearance",
      notes: null,
      traits: { [study.trait.life_habit.id]: "life_habit", [study.trait.body_size.id]: "body_size" },
    });
    const preview = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${upload.body.import.id}/preview`)
      .send({ mapping: upload.body.suggestedMapping });
    expect(preview.status).toBe(200);
    expect(preview.body.counts).toEqual({ rows: 4, valid: 1, invalid: 3, create: 1, update: 0, unchanged: 0 });
    expect(preview.body.problems.map((p: { row: number; column: string }) => [p.row, p.column])).toEqual([
      [4, "life_habit"],
      [5, "name"],
      [6, "first_appearance"],
    ]);
    expect(preview.body.sample[0].changes).toContainEqual({ field: "fad", traitId: null, from: null, to: { ma: 83.6, interval: "Campanian" } }); // ICS v2024/12 Campanian base
    expect(preview.body.sample[0].changes).toContainEqual({ field: study.trait.body_size.id, traitId: study.trait.body_size.id, from: null, to: 12.5 });
    expect(await liveTaxa(study.studyId)).toEqual([]);
  });

  it("remembers the mapping per study and suggests it for the next file with those headers", async () => {
    const study = await studyWithCodebook(app, cast);
    const text = "Genus name,Clade,Habit\nAlphella,Invented A,epifaunal\n";
    const first = await uploadCsv(cast.people.coder.agent, study.studyId, text);
    expect(first.body.suggestedMapping.name).toBeNull();
    const mapping = { name: "Genus name", higherTaxon: "Clade", firstAppearance: null, lastAppearance: null, notes: null, traits: { [study.trait.life_habit.id]: "Habit" } };
    expect((await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${first.body.import.id}/preview`).send({ mapping })).status).toBe(200);
    const second = await uploadCsv(cast.people.owner.agent, study.studyId, text);
    expect(second.body.suggestedMapping).toEqual(mapping);
    expect(second.body.rememberedColumns.sort()).toEqual(["Clade", "Genus name", "Habit"]);
  });

  it("refuses a mapping that names a column the file lacks, naming the field", async () => {
    const study = await studyWithCodebook(app, cast);
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, "name,x\nAlphella,1\n");
    const res = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${upload.body.import.id}/preview`)
      .send({ mapping: { name: "taxon", traits: {} } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields["mapping.name"]).toBe('The file has no column "taxon"');
  });

  it("a file over 50 MB gets 413 and nothing is stored", async () => {
    const study = await studyWithCodebook(app, cast);
    const before = await readdir(app.ctx.config.uploadDir).catch(() => []);
    const big = Buffer.alloc(IMPORT_MAX_BYTES + 1, "a");
    const res = await uploadCsv(cast.people.coder.agent, study.studyId, big, "too-big.csv");
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/upload limit/);
    expect(await readdir(app.ctx.config.uploadDir).catch(() => [])).toEqual(before);
  });
});

describe("commit: all or nothing", () => {
  const BAD_FILE = [
    HEADER,
    "Alphella,Invented A,83.6,66,marine,epifaunal,suspension,12.5,3",
    "Betella,Invented A,80,70,marine,swimmer,suspension,4,2", // row 3: unknown state
    "Gammella,Invented B,Santonian,Campanian,nonmarine,infaunal,deposit,7,1",
    "Deltella,Invented B,75,70,marine,infaunal,deposit,-1,1", // row 5: body size below 0
  ].join("\n");

  it("with bad rows and no skipping, answers 400 listing the problems and writes nothing", async () => {
    const study = await studyWithCodebook(app, cast);
    const { commit, importId } = await importCsv(cast.people.coder.agent, study, BAD_FILE);
    expect(commit.status).toBe(400);
    expect(commit.body.error.code).toBe("import_has_problems");
    expect(commit.body.problemCount).toBe(2);
    expect(commit.body.problems.map((p: { row: number; column: string }) => [p.row, p.column])).toEqual([
      [3, "life_habit"],
      [5, "body_size"],
    ]);
    expect(await liveTaxa(study.studyId)).toEqual([]);
    expect(await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.studyId, study.studyId))).toEqual([]);
    const summary = await cast.people.coder.agent.get(`/api/studies/${study.studyId}/imports/${importId}`);
    expect(summary.body).toMatchObject({ status: "previewed", createdCount: 0, failureReason: expect.stringMatching(/Nothing was imported/) });
  });

  it("with skipping chosen, writes the valid rows only, one decision per new taxon, and records the activity", async () => {
    const study = await studyWithCodebook(app, cast);
    const { commit, importId } = await importCsv(cast.people.coder.agent, study, BAD_FILE, { skipInvalid: true });
    expect(commit.status).toBe(200);
    expect(commit.body).toMatchObject({ status: "committed", progress: 1, createdCount: 2, updatedCount: 0, skippedInvalid: 2, validCount: 2, rowCount: 4 });
    const rows = await liveTaxa(study.studyId);
    expect(rows.map((r) => r.name)).toEqual(["Alphella", "Gammella"]);
    // Santonian base 85.7 Ma, Campanian top 72.2 Ma (ICS v2024/12).
    expect(rows[1]).toMatchObject({ fadMa: 85.7, fadInterval: "Santonian", ladMa: 72.2, ladInterval: "Campanian" });
    expect(rows[0].traitValues).toEqual({
      [study.trait.environment.id]: "marine",
      [study.trait.life_habit.id]: "epifaunal",
      [study.trait.feeding.id]: "suspension",
      [study.trait.body_size.id]: 12.5,
      [study.trait.geographic_range.id]: 3,
    });
    const decisions = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.importId, importId));
    expect(decisions.map((d) => [d.field, d.action])).toEqual([
      ["taxon", "create"],
      ["taxon", "create"],
    ]);
    const feed = await app.ctx.db.select().from(activity).where(and(eq(activity.studyId, study.studyId), eq(activity.refId, importId)));
    expect(feed[0]).toMatchObject({ kind: "import.committed", userId: cast.people.coder.user.id });
    const history = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/imports`);
    expect(history.body.rows[0]).toMatchObject({ id: importId, fileName: "invented-taxa.csv", createdBy: { id: cast.people.coder.user.id }, createdCount: 2 });
  });

  it("a committed import cannot be committed twice", async () => {
    const study = await studyWithCodebook(app, cast);
    const { commit, importId } = await importCsv(cast.people.coder.agent, study, `${HEADER}\nAlphella,A,80,70,marine,,,,\n`);
    expect(commit.status).toBe(200);
    const again = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${importId}/commit`)
      .send({ mapping: templateMapping(study), skipInvalid: false });
    expect(again.status).toBe(409);
    expect((await liveTaxa(study.studyId)).length).toBe(1);
  });
});

describe("updates and revert", () => {
  it("updates taxa of the same name (empty cells keep values), and a revert restores the exact previous values", async () => {
    const study = await studyWithCodebook(app, cast);
    const { trait } = study;
    const first = await importCsv(
      cast.people.coder.agent,
      study,
      [HEADER, "Alphella,Invented A,83.6,66,marine,epifaunal,suspension,12.5,3", "Betella,Invented A,80,70,marine,infaunal,deposit,4,2"].join("\n"),
    );
    expect(first.commit.status).toBe(200);
    const before = await liveTaxa(study.studyId);
    const second = await importCsv(
      cast.people.owner.agent,
      study,
      [HEADER, "Alphella,Invented A,Campanian,,nonmarine,,grazer,13,", "Betella,Invented A,80,70,marine,infaunal,deposit,4,2", "Gammella,Invented C,75,70,marine,nektonic,predator,30,5"].join("\n"),
    );
    expect(second.commit.body).toMatchObject({ status: "committed", createdCount: 1, updatedCount: 1 });
    const after = await liveTaxa(study.studyId);
    const alphella = after.find((t) => t.name === "Alphella")!;
    expect(alphella).toMatchObject({ fadMa: 83.6, fadInterval: "Campanian", ladMa: 66, version: 2 }); // Campanian base 83.6 Ma (ICS v2024/12)
    expect(alphella.traitValues).toEqual({
      [trait.environment.id]: "nonmarine",
      [trait.life_habit.id]: "epifaunal", // empty cell: kept
      [trait.feeding.id]: "grazer",
      [trait.body_size.id]: 13,
      [trait.geographic_range.id]: 3, // empty cell: kept
    });
    const updateDecisions = await app.ctx.db.select().from(codingDecisions).where(and(eq(codingDecisions.importId, second.importId), eq(codingDecisions.action, "update")));
    expect(updateDecisions.map((d) => d.field).sort()).toEqual(["fad", trait.body_size.id, trait.environment.id, trait.feeding.id].sort());

    const revert = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${second.importId}/revert`).send({ reason: "Wrong file" });
    expect(revert.status).toBe(200);
    expect(revert.body).toMatchObject({ import: { status: "reverted", revertedBy: { id: cast.people.coder.user.id } }, reverted: 5, skipped: 0 });
    const restored = await liveTaxa(study.studyId);
    const strip = (rows: typeof before) => rows.map(({ name, higherTaxon, fadMa, fadInterval, ladMa, ladInterval, notes, traitValues }) => ({ name, higherTaxon, fadMa, fadInterval, ladMa, ladInterval, notes, traitValues }));
    expect(strip(restored)).toEqual(strip(before));
    const reverts = await app.ctx.db.select().from(codingDecisions).where(and(eq(codingDecisions.importId, second.importId), eq(codingDecisions.action, "revert")));
    expect(reverts).toHaveLength(5);
    expect(new Set(reverts.map((r) => r.reason))).toEqual(new Set(["Wrong file"]));
    // The revert is final: a second one is refused.
    expect((await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${second.importId}/revert`).send({})).status).toBe(409);
  });

  it("a revert refuses (409) when a value changed since the import, naming it, unless changed values are skipped", async () => {
    const study = await studyWithCodebook(app, cast);
    const imported = await importCsv(cast.people.coder.agent, study, [HEADER, "Alphella,Invented A,83.6,66,marine,epifaunal,suspension,12.5,3", "Betella,Invented A,80,70,marine,,,,"].join("\n"));
    const [alphella] = await liveTaxa(study.studyId);
    const edit = await cast.people.owner.agent
      .patch(`/api/studies/${study.studyId}/taxa/${alphella.id}`)
      .send({ version: 1, changes: { values: { [study.trait.feeding.id]: "grazer" } }, reason: "Radula found (invented)" });
    expect(edit.status).toBe(200);
    const refused = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${imported.importId}/revert`).send({});
    expect(refused.status).toBe(409);
    expect(refused.body).toMatchObject({ error: { code: "changed_since" }, conflictCount: 1 });
    expect(refused.body.conflicts[0]).toMatchObject({ taxonName: "Alphella", field: "taxon", setBy: { id: cast.people.owner.user.id } });
    expect((await liveTaxa(study.studyId)).length).toBe(2);

    const partial = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${imported.importId}/revert`).send({ skipChanged: true });
    expect(partial.status).toBe(200);
    expect(partial.body).toMatchObject({ reverted: 1, skipped: 1 });
    expect((await liveTaxa(study.studyId)).map((t) => t.name)).toEqual(["Alphella"]);
  });

  it("a name freed by a reverted import can be imported again", async () => {
    const study = await studyWithCodebook(app, cast);
    const first = await importCsv(cast.people.coder.agent, study, `${HEADER}\nAlphella,A,80,70,marine,,,,\n`);
    await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${first.importId}/revert`).send({});
    const second = await importCsv(cast.people.coder.agent, study, `${HEADER}\nAlphella,B,81,70,nonmarine,,,,\n`);
    expect(second.commit.body).toMatchObject({ status: "committed", createdCount: 1 });
    expect((await liveTaxa(study.studyId)).map((t) => t.higherTaxon)).toEqual(["B"]);
  });
});

describe("progress and discarding", () => {
  it("a commit of many rows reports progress while it runs and ends at 1", async () => {
    const study = await studyWithCodebook(app, cast);
    const lines = [HEADER];
    for (let i = 0; i < 12000; i++) lines.push(`Taxon${i},Clade${i % 9},${80 + (i % 7)},${70 - (i % 5)},marine,epifaunal,suspension,${1 + (i % 40)},${i % 6}`);
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, lines.join("\n"));
    const importId = upload.body.import.id;
    const seen: number[] = [];
    let done = false;
    const commit = cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${importId}/commit`)
      .send({ mapping: upload.body.suggestedMapping, skipInvalid: false })
      .then((r) => {
        done = true;
        return r;
      });
    while (!done) {
      const poll = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/imports/${importId}`);
      if (poll.body.status === "committing") seen.push(poll.body.progress);
      await new Promise((r) => setTimeout(r, 20));
    }
    const res = await commit;
    expect(res.body).toMatchObject({ status: "committed", progress: 1, createdCount: 12000 });
    expect(seen.length).toBeGreaterThan(0);
    expect([...seen].sort((a, b) => a - b)).toEqual(seen); // never goes backwards
    expect(seen.every((p) => p >= 0 && p < 1)).toBe(true);
  });

  it("discarding an upload removes its stored file and closes it", async () => {
    const study = await studyWithCodebook(app, cast);
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, "name\nAlphella\n");
    const id = upload.body.import.id;
    expect((await cast.people.coder.agent.delete(`/api/studies/${study.studyId}/imports/${id}`)).status).toBe(204);
    expect((await cast.people.coder.agent.get(`/api/studies/${study.studyId}/imports/${id}`)).body.status).toBe("discarded");
    const preview = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${id}/preview`).send({ mapping: { name: "name" } });
    expect(preview.status).toBe(409);
  });
});

describe("stale uploads", () => {
  it("an upload left uncommitted for a day is discarded, and its file deleted, at the next upload", async () => {
    const study = await studyWithCodebook(app, cast);
    const old = await uploadCsv(cast.people.coder.agent, study.studyId, "name\nAlphella\n");
    const [row] = await app.ctx.db.select().from(imports).where(eq(imports.id, old.body.import.id));
    expect(existsSync(row.storedPath!)).toBe(true);
    await app.ctx.db.update(imports).set({ createdAt: new Date(Date.now() - 25 * 3600 * 1000) }).where(eq(imports.id, row.id));
    await uploadCsv(cast.people.coder.agent, study.studyId, "name\nBetella\n");
    expect((await cast.people.coder.agent.get(`/api/studies/${study.studyId}/imports/${row.id}`)).body).toMatchObject({ status: "discarded", failureReason: expect.stringMatching(/within a day/) });
    expect(existsSync(row.storedPath!)).toBe(false);
  });
});

describe("roles", () => {
  it("a reviewer or viewer cannot upload; a coder can", async () => {
    const study: CodebookStudy = await studyWithCodebook(app, cast);
    expect((await uploadCsv(cast.people.reviewer.agent, study.studyId, "name\nAlphella\n")).status).toBe(403);
    expect((await uploadCsv(cast.people.viewer.agent, study.studyId, "name\nAlphella\n")).status).toBe(403);
    expect((await uploadCsv(cast.people.coder.agent, study.studyId, "name\nAlphella\n")).status).toBe(201);
  });
});
