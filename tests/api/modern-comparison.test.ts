// Modern comparison through the API, on an invented crisis and an invented modern list whose
// answer is worked by hand. The crisis: 40 invented genera in each of three life habits, of which
// 10 epifaunal, 20 nektonic and 30 infaunal died out. A model with life habit alone is saturated, so
// its fitted probabilities are those proportions exactly: 0.25, 0.5 and 0.75. The list writes
// habits in words of its own ("on the bottom", "swimming", "burrowing") that a crosswalk maps.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, count, eq } from "drizzle-orm";
import Papa from "papaparse";
import { imports, modernLists, modernSpecies, runs, taxa, traits } from "../../db/schema/index";
import type { Comparison, ComparisonList } from "../../shared/schemas/comparisons";
import type { CrosswalkSaved, ModernList, ModernListPreview, ModernListUpload } from "../../shared/schemas/modernLists";
import type { Run } from "../../shared/schemas/runs";
import { crisisTaxaRows } from "../support/inventedCrisis";
import { MODERN_CRISIS } from "../support/modernComparison";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

const CAUTION =
  "A modern comparison is a screening aid: it does not replace a formal threat assessment, and the drivers of modern loss differ from those of past crises. Conservation decisions follow the relevant authority and local rules.";

let app: TestApp;
let cast: Cast;
let studyId: string;
let habitId: string;
let runId: string;

const HABITS = [
  { code: "epifaunal", label: "Epifaunal", victims: 10 },
  { code: "nektonic", label: "Nektonic", victims: 20 },
  { code: "infaunal", label: "Infaunal", victims: 30 },
];

// Row 7 (the header is row 1) holds a category the standard does not have. Length is an extra
// column no trait is paired with. Every species is invented.
const LIST_CSV = [
  "species,family,status,position,length_cm",
  "Tarsella alta (invented),Tarsellidae,CR,burrowing,2.5", // T1: infaunal 0.75
  "Tarsella brevis (invented),Tarsellidae,EN,burrowing,2.1", // T2: infaunal 0.75
  "Quenna rubra (invented),Quennidae,VU,swimming,4", // T3: nektonic 0.5
  "Quenna vitrea (invented),Quennidae,Vulnerable,on the bottom,1.2", // T4: epifaunal 0.25
  "Morvia lenta (invented),Morviidae,NT,swimming,3.3", // N1: nektonic 0.5
  "Morvia dubia (invented),Morviidae,threatened,swimming,3", // row 7: invalid category
  "Morvia plana (invented),Morviidae,LC,on the bottom,0.9", // N2: epifaunal 0.25
  "Morvia tenuis (invented),Morviidae,lc,on the bottom,1", // N3: epifaunal 0.25
  "Zephyra lata (invented),Zephyridae,LC,burrowing,5", // N4: infaunal 0.75
  "Zephyra obscura (invented),Zephyridae,LC,unknown,2", // not threatened, no state for "unknown"
  "Aulora minuta (invented),Auloridae,DD,burrowing,", // kept out, 0.75
  "Aulora nova (invented),Auloridae,NE,swimming,1", // kept out
  "Perdita ultima (invented),Perditidae,EX,burrowing,6", // kept out
].join("\n");

const MAPPING = { name: "species", higherTaxon: "family", category: "status", traitColumns: ["position", "length_cm"] };

async function buildCrisis(): Promise<void> {
  studyId = await cast.makeStudy("Invented basin: modern comparison");
  const [habit] = await app.ctx.db
    .insert(traits)
    .values({ studyId, key: "life_habit", label: "Life habit", kind: "categorical", states: HABITS.map((h, order) => ({ code: h.code, label: h.label, order })) })
    .returning();
  habitId = habit.id;
  // Survivors range across 66 Ma; victims are last seen at 67 Ma, inside the stage below (the Maastrichtian).
  await app.ctx.db.insert(taxa).values(crisisTaxaRows({ ...MODERN_CRISIS, habits: HABITS }, studyId, habitId));
  const started = await cast.people.analyst.agent
    .post(`/api/studies/${studyId}/runs`)
    .send({ name: "Habit across 66 Ma", boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: habitId, reference: "epifaunal" }] });
  expect(started.status, JSON.stringify(started.body)).toBe(202);
  runId = started.body.id;
  const deadline = Date.now() + 60_000;
  for (;;) {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${runId}`);
    const run = res.body as Run;
    if (run.status === "succeeded") return;
    if (run.status === "failed") throw new Error(`test setup: run failed: ${run.error}`);
    if (Date.now() > deadline) throw new Error(`test setup: run still ${run.status}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

const upload = (content = LIST_CSV, fileName = "invented-modern-list.csv") =>
  cast.people.analyst.agent.post(`/api/studies/${studyId}/modern-list-uploads`).attach("file", Buffer.from(content, "utf8"), fileName);

async function listsInStudy(): Promise<number> {
  const [{ n }] = await app.ctx.db.select({ n: count() }).from(modernLists).where(eq(modernLists.studyId, studyId));
  return n;
}

let listId: string;

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  await buildCrisis();
}, 90_000);
afterAll(() => app.close());

describe("uploading a modern list in three steps", () => {
  let uploadId: string;

  it("reads the file and suggests which column is which", async () => {
    const res = await upload();
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const body = res.body as ModernListUpload;
    uploadId = body.upload.id;
    expect(body.columns).toEqual(["species", "family", "status", "position", "length_cm"]);
    expect(body.rowCount).toBe(13);
    expect(body.suggestedMapping).toEqual(MAPPING);
    expect(body.suggestedName).toBe("invented modern list");
  });

  it("lists the bad row by row and column in the preview, with species per category", async () => {
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/modern-list-uploads/${uploadId}/preview`).send({ mapping: MAPPING });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const preview = res.body as ModernListPreview;
    expect(preview.counts).toEqual({ rows: 13, valid: 12, invalid: 1 });
    expect(preview.problems).toHaveLength(1);
    expect(preview.problems[0]).toMatchObject({ row: 7, column: "status" });
    expect(preview.problems[0].message).toMatch(/^Unknown threat category "threatened": use an IUCN 3\.1 code or name/);
    // "Vulnerable" and "lc" are read as the codes VU and LC.
    expect(preview.categories).toEqual({ EX: 1, EW: 0, CR: 1, EN: 1, VU: 2, NT: 1, LC: 4, DD: 1, NE: 1 });
  });

  it("writes nothing while a row has a problem, unless leaving invalid rows out is chosen", async () => {
    const refused = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/modern-list-uploads/${uploadId}/commit`)
      .send({ mapping: MAPPING, name: "Invented coasts: modern species", skipInvalid: false });
    expect(refused.status).toBe(400);
    expect(refused.body.error.code).toBe("list_has_problems");
    expect(refused.body.error.message).toBe("Nothing was saved: 1 of 13 rows have problems. Correct them, or choose to leave the invalid rows out.");
    expect(refused.body.problems[0]).toMatchObject({ row: 7, column: "status" });
    expect(await listsInStudy()).toBe(0);
    const [{ n: species }] = await app.ctx.db.select({ n: count() }).from(modernSpecies).innerJoin(modernLists, eq(modernLists.id, modernSpecies.listId)).where(eq(modernLists.studyId, studyId));
    expect(species).toBe(0);

    const missingChoice = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/modern-list-uploads/${uploadId}/commit`)
      .send({ mapping: MAPPING, name: "Invented coasts: modern species" });
    expect(missingChoice.status).toBe(400);
    expect(missingChoice.body.error.fields.skipInvalid).toMatch(/skipInvalid is required/);

    const saved = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/modern-list-uploads/${uploadId}/commit`)
      .send({ mapping: MAPPING, name: "Invented coasts: modern species", skipInvalid: true });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    const list = saved.body as ModernList;
    listId = list.id;
    expect(list).toMatchObject({ name: "Invented coasts: modern species", speciesCount: 12, fileName: "invented-modern-list.csv", crosswalkSaved: false, crosswalk: null });
    expect(await listsInStudy()).toBe(1);
    const [stored] = await app.ctx.db.select().from(imports).where(eq(imports.id, uploadId));
    expect(stored).toMatchObject({ target: "modern", status: "committed", skippedInvalid: 1, storedPath: null });

    // A saved upload cannot be saved twice.
    const again = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/modern-list-uploads/${uploadId}/commit`)
      .send({ mapping: MAPPING, name: "Twice", skipInvalid: true });
    expect(again.status).toBe(409);
  });

  it("keeps the taxa import history free of modern lists", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/imports`);
    expect(res.body.total).toBe(0);
  });

  it("discards an upload that is not wanted", async () => {
    const res = await upload("species,status\nNulla (invented),LC\n");
    const discarded = await cast.people.analyst.agent.delete(`/api/studies/${studyId}/modern-list-uploads/${res.body.upload.id}`);
    expect(discarded.status).toBe(204);
    const [stored] = await app.ctx.db.select().from(imports).where(eq(imports.id, res.body.upload.id));
    expect(stored).toMatchObject({ status: "discarded", storedPath: null });
  });
});

describe("the crosswalk", () => {
  it("offers the list's values with their counts, and pairs nothing it cannot recognise", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/modern-lists/${listId}`);
    expect(res.status).toBe(200);
    const list = res.body as ModernList;
    expect(list.columns.find((c) => c.name === "position")!.values).toEqual([
      { value: "burrowing", count: 5 },
      { value: "on the bottom", count: 3 },
      { value: "swimming", count: 3 },
      { value: "unknown", count: 1 },
    ]);
    expect(list.columns.find((c) => c.name === "length_cm")!.missing).toBe(1);
    expect(list.suggestedCrosswalk).toEqual({ pairs: [] });
    expect(list.coverage.unpairedTraits).toEqual([{ traitId: habitId, key: "life_habit", label: "Life habit" }]);
  });

  it("refuses a comparison while the list has no saved crosswalk", async () => {
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Too early", listId, runId });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.listId).toBe("This list has no saved crosswalk");
  });

  it("names the pair and value at fault", async () => {
    const res = await cast.people.analyst.agent
      .put(`/api/studies/${studyId}/modern-lists/${listId}/crosswalk`)
      .send({ pairs: [{ traitId: habitId, column: "position", states: { burrowing: "tunnelling" } }] });
    expect(res.status).toBe(400);
    expect(res.body.error.fields["pairs.0.states.burrowing"]).toBe('"tunnelling" is not a state of Life habit (allowed: epifaunal, nektonic, infaunal)');
  });

  it("refuses a comparison whose model needs a trait the crosswalk leaves unpaired", async () => {
    const saved = await cast.people.analyst.agent.put(`/api/studies/${studyId}/modern-lists/${listId}/crosswalk`).send({ pairs: [] });
    expect(saved.status).toBe(200);
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Unpaired", listId, runId });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.crosswalk).toBe("No list column is paired with Life habit");
  });

  it("saves the pairing and reports the value that has no state, with its species", async () => {
    const res = await cast.people.analyst.agent
      .put(`/api/studies/${studyId}/modern-lists/${listId}/crosswalk`)
      .send({ pairs: [{ traitId: habitId, column: "position", states: { burrowing: "infaunal", "on the bottom": "epifaunal", swimming: "nektonic" } }] });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const saved = res.body as CrosswalkSaved;
    expect(saved.coverage.pairs[0]).toMatchObject({
      column: "position",
      usable: 11,
      missing: 0,
      unusableSpecies: 1,
      unusable: [{ value: "unknown", count: 1, message: '"unknown" has no state of Life habit in the crosswalk' }],
    });
    expect(saved.coverage.unpairedColumns).toEqual(["length_cm"]);
    const list = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/modern-lists/${listId}`)).body as ModernList;
    expect(list.crosswalkSaved).toBe(true);
    expect(list.crosswalk!.pairs[0]).toMatchObject({ column: "position", multiplier: 1 });
  });
});

describe("comparing the list with the run", () => {
  let comparison: Comparison;

  it("refuses a run that has not succeeded", async () => {
    const [failed] = await app.ctx.db
      .insert(runs)
      .values({ studyId, name: "Broken run", status: "failed", params: {}, appVersion: "0.0.0", error: "Invented failure" })
      .returning();
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Against a failed run", listId, runId: failed.id });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.runId).toBe("This run is failed");
  });

  it("scores every species with the run's model and gives the AUC as U/(n1 n0) (Hanley & McNeil 1982)", async () => {
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Habit today", listId, runId });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    comparison = res.body as Comparison;
    const r = comparison.results;
    // The saturated model's probabilities are the crisis's proportions: 10/40, 20/40, 30/40.
    const score = (name: string) => r.species.find((s) => s.name === name)!.probability!;
    expect(score("Quenna vitrea (invented)")).toBeCloseTo(0.25, 6);
    expect(score("Quenna rubra (invented)")).toBeCloseTo(0.5, 6);
    expect(score("Tarsella alta (invented)")).toBeCloseTo(0.75, 6);
    // Worked by hand, pairs (threatened, not threatened) with the threatened species scored higher, ties 1/2:
    //   T1 .75: N1 .5 1, N2 .25 1, N3 .25 1, N4 .75 1/2 = 3.5;  T2 .75: 3.5;
    //   T3 .5: N1 1/2, N2 1, N3 1, N4 0 = 2.5;  T4 .25: N1 0, N2 1/2, N3 1/2, N4 0 = 1.
    //   U = 10.5 and AUC = 10.5 / (4 x 4) = 0.65625.
    expect(r.roc!.mannWhitneyU).toBe(10.5);
    expect(r.roc!.cases).toBe(4);
    expect(r.roc!.controls).toBe(4);
    expect(r.roc!.auc).toBe(0.65625);
    expect(comparison.auc).toBe(0.65625);
    expect(r.cautions[0]).toBe(CAUTION);
  });

  it("keeps DD, NE and EX out of the comparison and counts them; counts the species the crosswalk cannot score", () => {
    const r = comparison.results;
    expect(r.counts.excluded).toEqual({ EX: 1, EW: 0, DD: 1, NE: 1 });
    expect(r.counts.excludedTotal).toBe(3);
    expect(r.counts.threatened).toBe(4);
    expect(r.counts.notThreatened).toBe(5);
    expect(r.counts.unscored).toEqual({ threatened: 0, notThreatened: 1, excluded: 0 });
    expect(r.unscoredReasons).toEqual([{ reason: '"unknown" has no state of Life habit in the crosswalk', count: 1, examples: ["Zephyra obscura (invented)"] }]);
  });

  it("puts each habit's odds of being threatened today beside its odds of dying out in the crisis", () => {
    const habit = comparison.results.traits.find((t) => t.key === "life_habit")!;
    const infaunal = habit.contrasts.find((c) => c.state === "infaunal")!;
    const nektonic = habit.contrasts.find((c) => c.state === "nektonic")!;
    expect(infaunal.contrast).toBe("Infaunal vs Epifaunal");
    // Worked by hand. Past: infaunal (30/10) against epifaunal (10/30) = 9; nektonic (20/20) against epifaunal = 3.
    expect(infaunal.pastCrude!.estimate).toBeCloseTo(9, 9);
    expect(nektonic.pastCrude!.estimate).toBeCloseTo(3, 9);
    // Today: infaunal threatened 2, not 1; epifaunal 1 and 2: [[2, 1], [1, 2]], OR 4. Nektonic [[1, 1], [1, 2]], OR 2.
    expect(infaunal.today!.table).toEqual([
      [2, 1],
      [1, 2],
    ]);
    expect(infaunal.today!.estimate).toBeCloseTo(4, 12);
    expect(nektonic.today!.estimate).toBeCloseTo(2, 12);
  });

  it("lists LC and DD species the crisis would have put at risk as worth a look", () => {
    expect(comparison.results.worthALook.map((s) => [s.rank, s.name, s.category])).toEqual([
      [1, "Aulora minuta (invented)", "DD"],
      [2, "Zephyra lata (invented)", "LC"],
    ]);
    expect(comparison.worthALookCount).toBe(2);
  });

  it("is saved like a run: listed with its data hash, reopened unchanged, exported as CSV with the caution", async () => {
    const list = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons`)).body as ComparisonList;
    expect(list.comparisons.map((c) => [c.name, c.runName, c.listName, c.auc])).toEqual([["Habit today", "Habit across 66 Ma", "Invented coasts: modern species", 0.65625]]);
    expect(list.comparisons[0].dataHash).toMatch(/^[0-9a-f]{64}$/);

    const reopened = await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons/${comparison.id}`);
    expect(reopened.body).toEqual(comparison);

    // The same list and run read again give the same hash; a changed crosswalk gives another.
    const same = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Habit today, again", listId, runId });
    expect(same.body.dataHash).toBe(comparison.dataHash);
    await cast.people.analyst.agent
      .put(`/api/studies/${studyId}/modern-lists/${listId}/crosswalk`)
      .send({ pairs: [{ traitId: habitId, column: "position", states: { burrowing: "infaunal", "on the bottom": "epifaunal", swimming: "nektonic", unknown: "epifaunal" } }] });
    const changed = await cast.people.analyst.agent.post(`/api/studies/${studyId}/comparisons`).send({ name: "Habit today, unknown as epifaunal", listId, runId });
    expect(changed.body.dataHash).not.toBe(comparison.dataHash);
    expect(changed.body.results.counts.unscored.notThreatened).toBe(0);

    const csv = await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons/${comparison.id}/export?format=csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers["content-type"]).toMatch(/^text\/csv/);
    expect(csv.headers["content-disposition"]).toMatch(/attachment; filename="comparison-habit-today-[0-9a-f]{8}\.csv"/);
    const rows = Papa.parse<string[]>(csv.text.trim()).data;
    const header = rows[0];
    const field = (name: string) => rows.find((row) => row[0] === "comparison" && row[header.indexOf("field")] === name)?.[header.indexOf("value")];
    expect(field("auc")).toBe("0.65625");
    expect(field("excluded_dd")).toBe("1");
    expect(field("excluded_ne")).toBe("1");
    expect(field("caution")).toBe(CAUTION);
    expect(rows.filter((row) => row[0] === "worth_a_look")).toHaveLength(2);
    expect(rows.filter((row) => row[0] === "species")).toHaveLength(12);

    const one = await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons/${comparison.id}/export?format=csv&table=worth_a_look`);
    expect(one.text.split("\r\n")[0]).toBe("rank,name,higher_taxon,category,probability,ci_low,ci_high");
  });

  it("deletes a comparison, and a list with the comparisons made from it", async () => {
    const removed = await cast.people.analyst.agent.delete(`/api/studies/${studyId}/comparisons/${comparison.id}`);
    expect(removed.status).toBe(204);
    expect((await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons/${comparison.id}`)).status).toBe(404);
    const lists = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/modern-lists`)).body;
    expect(lists.lists[0].comparisonCount).toBe(2);
    expect((await cast.people.analyst.agent.delete(`/api/studies/${studyId}/modern-lists/${listId}`)).status).toBe(204);
    expect((await cast.people.viewer.agent.get(`/api/studies/${studyId}/comparisons`)).body.comparisons).toEqual([]);
    const [{ n }] = await app.ctx.db.select({ n: count() }).from(modernSpecies).where(and(eq(modernSpecies.listId, listId)));
    expect(n).toBe(0);
  });
});
