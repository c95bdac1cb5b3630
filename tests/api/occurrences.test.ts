// Occurrence uploads end to end against the real database: upload, preview with row problems, commit all
// or nothing, revert; ranges derived from the finds, previewed and applied as coding decisions, reverted as
// one batch; three-timer sampling per stage. Taxa, collections and finds are invented.
// Interval ages: ICS International Chronostratigraphic Chart v2024/12 (Cohen, Harper, Gibbard & Car 2025,
// Episodes 48: 105-115): Campanian base 83.6 Ma, Maastrichtian base 72.2 and top 66.0 Ma, Danian top 61.66 Ma.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { codingDecisions, imports, occurrences, taxa } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { commitOccurrences, uploadOccurrences } from "../support/occurrences";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

const FILE =
  "taxon,family,max_ma,min_ma,early_interval,late_interval,collection_no,count\n" +
  "Alphella,Inventidae,80,75,,,K1,3\n" + // row 2
  "Alphella,Inventidae,,,Maastrichtian,,K2,\n" + // row 3: 72.2 to 66 from the interval
  "Betella,Inventidae,70,68,,,K2,\n" + // row 4
  "Betella,Inventidae,70,68,,,K2,\n" + // row 5: repeats row 4
  ",Inventidae,70,68,,,K3,\n" + // row 6: no taxon
  "Gammella,Fictidae,60,65,,,K3,\n" + // row 7: maximum younger than minimum
  "Deltella,Fictidae,,,Maastrichtan,,K4,\n" + // row 8: misspelt interval
  "Epsilonella,Fictidae,-2,-3,,,K4,\n" + // row 9: negative ages
  "Zetella,Fictidae,5000,4800,,,K5,\n"; // row 10: older than the Earth

async function occurrenceCount(studyId: string) {
  return (await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId))).length;
}

describe("upload, preview, commit, revert", () => {
  it("suggests the mapping and lists each problem with its row (header = row 1) and taxon", async () => {
    const studyId = await cast.makeStudy();
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, FILE);
    expect(upload.status).toBe(201);
    expect(upload.body.suggestedMapping).toEqual({
      taxon: "taxon",
      higherTaxon: "family",
      maxMa: "max_ma",
      minMa: "min_ma",
      earlyInterval: "early_interval",
      lateInterval: "late_interval",
      collection: "collection_no",
      count: "count",
    });
    expect(upload.body.ageColumnsFound).toBe(true);
    const preview = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`)
      .send({ mapping: upload.body.suggestedMapping });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    expect(preview.body.counts).toEqual({ rows: 9, valid: 4, invalid: 5, duplicates: 1, taxa: 2 });
    const problems = preview.body.problems as Array<{ row: number; taxon: string; column: string; message: string; suggestions?: string[] }>;
    expect(problems.map((p) => [p.row, p.taxon, p.column])).toEqual([
      [6, "", "taxon"],
      [7, "Gammella", "min_ma"],
      [8, "Deltella", "early_interval"],
      [9, "Epsilonella", "max_ma"],
      [9, "Epsilonella", "min_ma"],
      [10, "Zetella", "max_ma"],
      [10, "Zetella", "min_ma"],
    ]);
    expect(problems[1]!.message).toMatch(/maximum age 60 Ma is younger than the minimum age 65 Ma/);
    expect(problems[2]!.suggestions).toContain("Maastrichtian");
    expect(problems[2]!.message).toMatch(/Unknown interval name "Maastrichtan".*closest: .*Maastrichtian/);
    expect(problems[3]!.message).toMatch(/negative/);
    expect(problems[5]!.message).toMatch(/older than the Earth \(4,567 Ma\)/);
    expect(preview.body.duplicates).toEqual([{ row: 5, firstRow: 4, taxon: "Betella" }]);
    // The interval row reads the Maastrichtian's base and top.
    expect(preview.body.sample[1]).toMatchObject({ row: 3, taxon: "Alphella", maxMa: 72.2, minMa: 66, earlyInterval: "Maastrichtian", collection: "K2", count: null });

    const dropping = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`)
      .send({ mapping: upload.body.suggestedMapping, duplicates: "drop" });
    expect(dropping.body.counts).toMatchObject({ valid: 3, duplicates: 1 });
  });

  it("stores names with backslashes, quotes and commas exactly as written (the commit streams its rows through COPY's text format)", async () => {
    const studyId = await cast.makeStudy();
    // A literal backslash-N would read as NULL, and a backslash-t as a tab, if they were not escaped.
    const file = 'taxon,family,max_ma,min_ma,collection_no\n"Back\\slash\\N ella","Quote""idae, s.l.",80,75,"K\\t1"\n';
    const { commit, uploadId } = await commitOccurrences(cast.people.coder.agent, studyId, file);
    expect(commit.status, JSON.stringify(commit.body)).toBe(200);
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.uploadId, uploadId));
    expect(stored.map((o) => [o.taxon, o.higherTaxon, o.collection, o.maxMa, o.minMa])).toEqual([["Back\\slash\\N ella", 'Quote"idae, s.l.', "K\\t1", 80, 75]]);
  });

  it("refuses a mapping without age columns at the mapping step, with a clear message, and writes nothing", async () => {
    const studyId = await cast.makeStudy();
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, "name,notes\nAlphella,seen once\n");
    expect(upload.status).toBe(201);
    expect(upload.body.ageColumnsFound).toBe(false);
    const preview = await cast.people.coder.agent.post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`).send({ mapping: { taxon: "name" } });
    expect(preview.status).toBe(400);
    expect(preview.body.error.message).toMatch(/No age columns/);
    expect(preview.body.error.fields["mapping.maxMa"] ?? preview.body.error.fields.maxMa).toMatch(/No age columns/);
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/commit`)
      .send({ mapping: { taxon: "name" }, skipInvalid: true });
    expect(commit.status).toBe(400);
    expect(await occurrenceCount(studyId)).toBe(0);
  });

  it("commits nothing while rows have problems, everything valid when skipping is chosen, and reverts", async () => {
    const studyId = await cast.makeStudy();
    const refused = await commitOccurrences(cast.people.coder.agent, studyId, FILE);
    expect(refused.commit.status).toBe(400);
    expect(refused.commit.body.error.code).toBe("occurrences_have_problems");
    expect(refused.commit.body.error.message).toMatch(/Row 6 \(the header is row 1\), taxon ""/);
    expect(refused.commit.body.problemCount).toBe(7);
    expect(await occurrenceCount(studyId)).toBe(0);
    const [afterRefusal] = await app.ctx.db.select().from(imports).where(eq(imports.id, refused.uploadId));
    expect(afterRefusal!.status).toBe("previewed");

    const commit = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${refused.uploadId}/commit`)
      .send({ mapping: refused.upload.body.suggestedMapping, skipInvalid: true, duplicates: "drop" });
    expect(commit.status, JSON.stringify(commit.body)).toBe(200);
    expect(commit.body).toMatchObject({ status: "committed", progress: 1, createdCount: 3, skippedInvalid: 5 });
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId));
    expect(stored.map((o) => [o.sourceRow, o.taxon, o.higherTaxon, o.maxMa, o.minMa, o.collection, o.count]).sort()).toEqual(
      [
        [2, "Alphella", "Inventidae", 80, 75, "K1", 3],
        [3, "Alphella", "Inventidae", 72.2, 66, "K2", null],
        [4, "Betella", "Inventidae", 70, 68, "K2", null],
      ].sort(),
    );

    const list = await cast.people.viewer.agent.get(`/api/studies/${studyId}/occurrence-uploads`);
    expect(list.body.rows.map((r: { id: string }) => r.id)).toEqual([refused.uploadId]);
    const ofTaxon = await cast.people.viewer.agent.get(`/api/studies/${studyId}/occurrences?taxon=Alphella`);
    expect(ofTaxon.status).toBe(200);
    expect(ofTaxon.body).toMatchObject({ taxon: "Alphella", total: 2, collections: 2 });
    expect(ofTaxon.body.occurrences.map((o: { maxMa: number }) => o.maxMa)).toEqual([80, 72.2]); // oldest first

    const revert = await cast.people.coder.agent.post(`/api/studies/${studyId}/occurrence-uploads/${refused.uploadId}/revert`).send({});
    expect(revert.status).toBe(200);
    expect(revert.body).toMatchObject({ removed: 3, upload: { status: "reverted" } });
    expect(await occurrenceCount(studyId)).toBe(0);
    const again = await cast.people.coder.agent.post(`/api/studies/${studyId}/occurrence-uploads/${refused.uploadId}/revert`).send({});
    expect(again.status).toBe(409);
  });
});

describe("ranges from occurrences", () => {
  it("previews old -> new ranges, new taxa and taxa without finds; applies the chosen ones as decisions naming the upload; reverts them", async () => {
    const studyId = await cast.makeStudy();
    await app.ctx.db.insert(taxa).values([
      { studyId, name: "Alphella", fadMa: 90, ladMa: 70 },
      { studyId, name: "Omegella", fadMa: 75, ladMa: 67 },
      { studyId, name: "Betella", fadMa: 70, ladMa: 68 },
    ]);
    const file = "taxon,family,max_ma,min_ma\nAlphella,Inventidae,80,75\nAlphella,Inventidae,69,66.5\nBetella,Inventidae,70,68\nKappella,Fictidae,71,69\nKappella,Fictidae,90,60\n";
    const { commit, uploadId } = await commitOccurrences(cast.people.coder.agent, studyId, file, { fileName: "basin-finds.csv" });
    expect(commit.status, JSON.stringify(commit.body)).toBe(200);

    const preview = await cast.people.analyst.agent.post(`/api/studies/${studyId}/occurrences/ranges/preview`).send({});
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    // Alphella: bounds fad = max(80, 69) = 80, lad = min(75, 66.5) = 66.5 (was 90 to 70).
    expect(preview.body.changes).toEqual([
      { taxon: "Alphella", taxonId: expect.any(String), higherTaxon: "Inventidae", fadMa: 80, ladMa: 66.5, oldFadMa: 90, oldLadMa: 70, occurrences: 2, collections: 0 },
    ]);
    // Kappella: fad = max(71, 90) = 90, lad = min(69, 60) = 60.
    expect(preview.body.newTaxa).toEqual([{ taxon: "Kappella", higherTaxon: "Fictidae", fadMa: 90, ladMa: 60, occurrences: 2, collections: 0 }]);
    expect(preview.body.unchanged).toBe(1); // Betella already 70 to 68
    expect(preview.body.withoutOccurrences.map((t: { name: string }) => t.name)).toEqual(["Omegella"]);
    expect(preview.body.uploads).toEqual([{ id: uploadId, fileName: "basin-finds.csv" }]);

    // Finds dated more coarsely than 20 Myr left out: Kappella's 90-60 find (30 Myr) goes; fad 71, lad 69.
    const narrow = await cast.people.analyst.agent.post(`/api/studies/${studyId}/occurrences/ranges/preview`).send({ maxSpanMyr: 20 });
    expect(narrow.body.newTaxa[0]).toMatchObject({ taxon: "Kappella", fadMa: 71, ladMa: 69, occurrences: 1 });
    expect(narrow.body.dropped.count).toBe(1);
    // Midpoints: Alphella (80+75)/2 = 77.5 and (69+66.5)/2 = 67.75.
    const mid = await cast.people.analyst.agent.post(`/api/studies/${studyId}/occurrences/ranges/preview`).send({ ageMode: "midpoint" });
    expect(mid.body.changes[0]).toMatchObject({ taxon: "Alphella", fadMa: 77.5, ladMa: 67.75 });

    expect((await cast.people.analyst.agent.post(`/api/studies/${studyId}/occurrences/ranges/apply`).send({ taxa: ["Alphella"] })).status).toBe(403);
    const apply = await cast.people.coder.agent.post(`/api/studies/${studyId}/occurrences/ranges/apply`).send({ taxa: ["Alphella", "Kappella"] });
    expect(apply.status, JSON.stringify(apply.body)).toBe(200);
    expect(apply.body).toMatchObject({ changed: 1, created: 1, unchanged: 0 });
    expect(apply.body.reason).toContain('upload "basin-finds.csv"');
    const live = async () =>
      Object.fromEntries(
        (await app.ctx.db.select().from(taxa).where(eq(taxa.studyId, studyId))).filter((t) => t.deletedAt === null).map((t) => [t.name, [t.fadMa, t.ladMa, t.higherTaxon]]),
      );
    expect(await live()).toEqual({ Alphella: [80, 66.5, ""], Betella: [70, 68, ""], Omegella: [75, 67, ""], Kappella: [90, 60, "Fictidae"] });
    const decisions = await app.ctx.db.select().from(codingDecisions).where(and(eq(codingDecisions.studyId, studyId), eq(codingDecisions.batchId, apply.body.batchId)));
    expect(decisions.map((d) => [d.field, d.action]).sort()).toEqual([["fad", "update"], ["lad", "update"], ["taxon", "create"]]);
    expect(decisions.every((d) => d.reason.includes("basin-finds.csv"))).toBe(true);
    expect(decisions.find((d) => d.field === "fad")!.oldValue).toEqual({ ma: 90, interval: null });

    const unknown = await cast.people.coder.agent.post(`/api/studies/${studyId}/occurrences/ranges/apply`).send({ taxa: ["Nonesuchia"] });
    expect(unknown.status).toBe(400);
    expect(unknown.body.error.message).toMatch(/Nonesuchia/);

    const revert = await cast.people.coder.agent.post(`/api/studies/${studyId}/decisions/batches/${apply.body.batchId}/revert`).send({ reason: "Back to the published ranges" });
    expect(revert.status, JSON.stringify(revert.body)).toBe(200);
    expect(await live()).toEqual({ Alphella: [90, 70, ""], Betella: [70, 68, ""], Omegella: [75, 67, ""] });
  });
});

describe("three-timer sampling", () => {
  it("counts three- and part-timers per stage and warns about a poorly sampled stage at the boundary", async () => {
    const studyId = await cast.makeStudy();
    // Stages: Campanian (83.6-72.2), Maastrichtian (72.2-66), Danian (66-61.66).
    // a: all three; b and c: Campanian and Danian only (part-timers of the Maastrichtian); d: Maastrichtian only.
    const file =
      "taxon,stage\n" +
      "a,Campanian\na,Maastrichtian\na,Danian\n" +
      "b,Campanian\nb,Danian\n" +
      "c,Campanian\nc,Danian\n" +
      "d,Maastrichtian\n";
    const { commit } = await commitOccurrences(cast.people.coder.agent, studyId, file);
    expect(commit.status, JSON.stringify(commit.body)).toBe(200);
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/occurrences/three-timer?boundaryMa=66`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.method).toMatch(/Alroy 2008/);
    const maastrichtian = res.body.stages.find((s: { bin: string }) => s.bin === "Maastrichtian");
    // t3 = a = 1; part-timers = b, c = 2; completeness = 1 / (1 + 2) = 0.333; t2Below = a, d? (d not in Campanian) = 1.
    expect(maastrichtian).toMatchObject({ t3: 1, partTimers: 2, t2Below: 1, t2Above: 1, sampled: 2 });
    expect(maastrichtian.samplingCompleteness).toBeCloseTo(1 / 3, 12);
    // extinction = ln(1/1) + ln(1/3) = -1.0986
    expect(maastrichtian.extinction).toBeCloseTo(Math.log(1 / 3), 12);
    expect(res.body.boundary.below.bin).toBe("Maastrichtian");
    expect(res.body.boundary.above.bin).toBe("Danian");
    expect(res.body.boundary.warnings.join(" ")).toMatch(/Maastrichtian is low \(0\.33/);
    expect(res.body.boundary.warnings.join(" ")).toMatch(/inflates the apparent extinction/);
    expect(res.body.boundary.warnings.join(" ")).toMatch(/Danian cannot be computed/);
  });
});
