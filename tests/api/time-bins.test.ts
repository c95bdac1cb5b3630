// A study's own time bins against the real database: saved whole and read back, refused by bin and
// field (nothing written), a CSV file read and checked by row and column without saving, and the
// bins' names (numbers too) accepted where interval names are: trait-table edits, the trait-table
// import and the occurrence upload. Chart ages: ICS chart v2024/12 (docs/sources.md section 8), Katian
// base 452.8 Ma and top 445.2 Ma. Taxa and slices are invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { taxa, timeBins } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { commitOccurrences } from "../support/occurrences";
import { importCsv, studyWithCodebook } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

// Four invented numbered slices of an invented Late Ordovician basin, oldest first.
const SLICES = [
  { name: "1", baseMa: 458.2, topMa: 455.0 },
  { name: "2", baseMa: 455.0, topMa: 452.8 },
  { name: "3", baseMa: 452.8, topMa: 449.0, chartUnit: "katian" },
  { name: "Katian", baseMa: 449.0, topMa: 445.2 }, // a regional use of a chart name
];

describe("saving and reading the bins", () => {
  it("saves the set whole, oldest first, with the chart unit's own label and the resolution order", async () => {
    const studyId = await cast.makeStudy();
    const empty = await cast.people.viewer.agent.get(`/api/studies/${studyId}/time-bins`);
    expect(empty.status).toBe(200);
    expect(empty.body).toMatchObject({ bins: [], shadowedChartUnits: [], updatedAt: null });

    const saved = await cast.people.coder.agent.put(`/api/studies/${studyId}/time-bins`).send({ bins: SLICES });
    expect(saved.status).toBe(200);
    expect(saved.body.bins).toEqual([
      { position: 1, name: "1", baseMa: 458.2, topMa: 455, chartUnit: null },
      { position: 2, name: "2", baseMa: 455, topMa: 452.8, chartUnit: null },
      { position: 3, name: "3", baseMa: 452.8, topMa: 449, chartUnit: "Katian" },
      { position: 4, name: "Katian", baseMa: 449, topMa: 445.2, chartUnit: null },
    ]);
    expect(saved.body.shadowedChartUnits).toEqual([{ bin: "Katian", chartUnit: "Katian" }]);
    expect(saved.body.resolutionOrder).toMatch(/first among this study's time bins, then among the units of the ICS chart/);
    expect(saved.body.updatedBy).toMatchObject({ name: expect.any(String) });

    // Saving again replaces the set; an empty list removes it.
    await cast.people.owner.agent.put(`/api/studies/${studyId}/time-bins`).send({ bins: SLICES.slice(0, 2) });
    expect((await cast.people.viewer.agent.get(`/api/studies/${studyId}/time-bins`)).body.bins).toHaveLength(2);
    expect((await cast.people.owner.agent.put(`/api/studies/${studyId}/time-bins`).send({ bins: [] })).body.bins).toEqual([]);
    expect(await app.ctx.db.select().from(timeBins).where(eq(timeBins.studyId, studyId))).toEqual([]);
  });

  it("refuses a bad set naming each bin and field at fault, and keeps the bins saved before", async () => {
    const studyId = await cast.makeStudy();
    await cast.people.coder.agent.put(`/api/studies/${studyId}/time-bins`).send({ bins: SLICES });
    const res = await cast.people.coder.agent.put(`/api/studies/${studyId}/time-bins`).send({
      bins: [
        { name: "A", baseMa: 10, topMa: 8 },
        { name: "a", baseMa: 9, topMa: 7 }, // same name, overlaps A
        { name: "C", baseMa: 5, topMa: 6 }, // top older than base
        { name: "D", baseMa: 5000, topMa: 4 }, // older than the Earth
      ],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toMatchObject({
      "bins.1.name": expect.stringMatching(/already used by bin 1/),
      "bins.1.baseMa": expect.stringMatching(/Overlaps bin 1 “A”/),
      "bins.2.topMa": expect.stringMatching(/Base \(5 Ma\) must be older than top \(6 Ma\)/),
      "bins.3.baseMa": expect.stringMatching(/at most 4,567 Ma/),
    });
    expect((await app.ctx.db.select().from(timeBins).where(eq(timeBins.studyId, studyId))).map((b) => b.name)).toEqual(["1", "2", "3", "Katian"]);
  });
});

describe("a CSV file of bins", () => {
  it("is read and checked by row and column, and nothing is saved", async () => {
    const studyId = await cast.makeStudy();
    const file = "slice;base (Ma);top (Ma);chart unit\n1;458,2;455\n2;455;452,8\n3;452,8;449;Katyan\n4;450;445,2\n";
    const res = await cast.people.coder.agent.post(`/api/studies/${studyId}/time-bins/csv`).attach("file", Buffer.from(file, "utf8"), "slices.csv");
    expect(res.status).toBe(200);
    expect(res.body.fileName).toBe("slices.csv");
    expect(res.body.bins.map((b: { name: string; baseMa: number }) => [b.name, b.baseMa])).toEqual([["1", 458.2], ["2", 455], ["3", 452.8], ["4", 450]]);
    expect(res.body.problems).toEqual([
      { row: 4, column: "chart unit", message: "Chart unit is not a unit of the ICS chart (e.g. Katian, Upper Ordovician)" },
      { row: 5, column: "base (Ma)", message: "Overlaps row 4 “3”: this bin's base (450 Ma) is older than that bin's top (449 Ma)" },
    ]);
    expect(await app.ctx.db.select().from(timeBins).where(eq(timeBins.studyId, studyId))).toEqual([]);
  });

  it("refuses a file that is not text, and a file without rows", async () => {
    const studyId = await cast.makeStudy();
    const pdf = await cast.people.coder.agent.post(`/api/studies/${studyId}/time-bins/csv`).attach("file", Buffer.from("%PDF-1.7 invented"), "bins.pdf");
    expect(pdf.status).toBe(415);
    const headerOnly = await cast.people.coder.agent.post(`/api/studies/${studyId}/time-bins/csv`).attach("file", Buffer.from("name,base_ma,top_ma\n"), "bins.csv");
    expect(headerOnly.status).toBe(400);
  });
});

describe("bin names where interval names are accepted", () => {
  it("trait-table edits: { interval: '2' } takes slice 2's limits; an unknown number is refused naming the field", async () => {
    const study = await studyWithCodebook(app, cast);
    await cast.people.coder.agent.put(`/api/studies/${study.studyId}/time-bins`).send({ bins: SLICES });
    const created = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/taxa`)
      .send({ name: "Tethyspira slicea", fad: { interval: "2" }, lad: { interval: "Katian" } });
    expect(created.status).toBe(201);
    const [row] = await app.ctx.db.select().from(taxa).where(eq(taxa.id, created.body.taxon.id));
    // Slice 2's base, and the top of the study's own "Katian" bin (the bin wins over the chart's Katian, top 445.2 Ma too).
    expect([row!.fadMa, row!.fadInterval, row!.ladMa, row!.ladInterval]).toEqual([455, "2", 445.2, "Katian"]);

    const refused = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Tethyspira nulla", fad: { interval: "23" } });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields.fad ?? refused.body.error.fields["changes.fad"] ?? refused.body.error.message).toMatch(/Unknown interval "23".*no bin has this number/);
  });

  it("trait-table import: slice numbers in the range columns are bins, not ages in Ma", async () => {
    const study = await studyWithCodebook(app, cast);
    await cast.people.coder.agent.put(`/api/studies/${study.studyId}/time-bins`).send({ bins: SLICES });
    const { commit } = await importCsv(cast.people.coder.agent, study, "name,first_appearance,last_appearance\nUmbonella invented,1,3\nUmbonella fictiva,2,448 Ma\n", {
      mapping: { name: "name", firstAppearance: "first_appearance", lastAppearance: "last_appearance", traits: {} },
    });
    expect(commit.status).toBe(200);
    const rows = await app.ctx.db.select().from(taxa).where(eq(taxa.studyId, study.studyId));
    const byName = Object.fromEntries(rows.map((r) => [r.name, [r.fadMa, r.ladMa]]));
    expect(byName).toEqual({ "Umbonella invented": [458.2, 449], "Umbonella fictiva": [455, 448] });
  });

  it("occurrence upload: numbers in the early/late interval columns resolve to the study's slices", async () => {
    const studyId = await cast.makeStudy();
    await cast.people.coder.agent.put(`/api/studies/${studyId}/time-bins`).send({ bins: SLICES });
    const { commit, uploadId } = await commitOccurrences(cast.people.coder.agent, studyId, "taxon,early_interval,late_interval\nTethyspira slicea,1,2\nTethyspira slicea,3,\n", {
      mapping: { taxon: "taxon", earlyInterval: "early_interval", lateInterval: "late_interval" },
    });
    expect(commit.status).toBe(200);
    const finds = await cast.people.viewer.agent.get(`/api/studies/${studyId}/occurrences?taxon=Tethyspira%20slicea`);
    expect(finds.status).toBe(200);
    const ages = finds.body.occurrences.map((o: { maxMa: number; minMa: number }) => [o.maxMa, o.minMa]);
    expect(ages).toEqual(expect.arrayContaining([[458.2, 452.8], [452.8, 449]]));
    expect(uploadId).toBeTruthy();
  });
});
