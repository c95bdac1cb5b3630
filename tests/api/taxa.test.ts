// The trait table through the API: the grid's paging, sorting and filtering; edits guarded by the
// row version (concurrent edits: one 409, nothing lost); reasons; bulk edits; cell history; roles.
// All taxa are invented. Interval ages: ICS chart v2024/12 (Cohen, Harper, Gibbard & Car 2025).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { activity, codingDecisions, threads } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
let grid: CodebookStudy;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  grid = await studyWithCodebook(app, cast, "Invented grid study");
  const rows = [
    "name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range",
    "Alphella,Invented A,83.6,66,marine,epifaunal,suspension,12.5,3",
    "Betella,Invented A,80,70,marine,infaunal,deposit,40,",
    "Gammella,Invented B,75,68,nonmarine,infaunal,grazer,,5",
    "Deltella,Invented B,,,marine,nektonic,predator,200,8",
    "Epsilonella,,90,85,marine,epifaunal,,3,1",
    "Zetella,Invented C,72,71,marine,epifaunal,suspension,7,2",
  ];
  const { commit } = await importCsv(cast.people.coder.agent, grid, rows.join("\n"));
  if (commit.status !== 200) throw new Error(`test setup: import ${commit.status} ${JSON.stringify(commit.body)}`);
});
afterAll(() => app.close());

const list = (query: string) => cast.people.viewer.agent.get(`/api/studies/${grid.studyId}/taxa?${query}`);
const names = (res: { body: { rows: Array<{ name: string }> } }) => res.body.rows.map((r) => r.name);

async function newTaxon(study: CodebookStudy, name: string, body: Record<string, unknown> = {}) {
  const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name, ...body });
  if (res.status !== 201) throw new Error(`test setup: create ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.taxon as { id: string; version: number; values: Record<string, unknown> };
}

describe("the grid", () => {
  it("pages by name with the total", async () => {
    const first = await list("page=1&pageSize=4");
    expect(first.status).toBe(200);
    expect(first.body).toMatchObject({ total: 6, page: 1, pageSize: 4 });
    expect(names(first)).toEqual(["Alphella", "Betella", "Deltella", "Epsilonella"]);
    expect(names(await list("page=2&pageSize=4"))).toEqual(["Gammella", "Zetella"]);
  });

  it("sorts by a numeric trait with missing values last in both directions", async () => {
    const size = grid.trait.body_size.id;
    expect(names(await list(`sort=${size}&dir=asc`))).toEqual(["Epsilonella", "Zetella", "Alphella", "Betella", "Deltella", "Gammella"]);
    expect(names(await list(`sort=${size}&dir=desc`))).toEqual(["Deltella", "Betella", "Alphella", "Zetella", "Epsilonella", "Gammella"]);
  });

  it("sorts a state trait by codebook order of its states, and ages numerically", async () => {
    // Suggested codebook order of life habit: epifaunal, infaunal, nektonic.
    expect(names(await list(`sort=${grid.trait.life_habit.id}`))).toEqual(["Alphella", "Epsilonella", "Zetella", "Betella", "Gammella", "Deltella"]);
    expect(names(await list("sort=fadMa&dir=desc"))).toEqual(["Epsilonella", "Alphella", "Betella", "Gammella", "Zetella", "Deltella"]);
  });

  it("filters by text, state, numeric bounds and missing values, combined", async () => {
    expect(names(await list("filter=name:contains:BETEL"))).toEqual(["Betella"]);
    expect(names(await list(`filter=${grid.trait.life_habit.id}:eq:infaunal`))).toEqual(["Betella", "Gammella"]);
    expect(names(await list(`filter=${grid.trait.body_size.id}:min:7&filter=${grid.trait.body_size.id}:max:40`))).toEqual(["Alphella", "Betella", "Zetella"]);
    expect(names(await list("filter=ladMa:max:68"))).toEqual(["Alphella", "Gammella"]);
    expect(names(await list(`missing=${grid.trait.body_size.id}`))).toEqual(["Gammella"]);
    expect(names(await list("missing=fad"))).toEqual(["Deltella"]);
    expect(names(await list("missing=higherTaxon"))).toEqual(["Epsilonella"]);
    const combined = await list(`filter=${grid.trait.environment.id}:eq:marine&filter=higherTaxon:contains:invented&sort=${grid.trait.body_size.id}&dir=desc&pageSize=2`);
    expect(combined.body.total).toBe(4);
    expect(names(combined)).toEqual(["Deltella", "Betella"]);
  });

  it("a % typed in a text filter is a character, not a wildcard", async () => {
    expect((await list("filter=name:contains:%25")).body.total).toBe(0);
  });

  it("finds taxa with an open thread about them or one of their values, and says which values", async () => {
    const study = await studyWithCodebook(app, cast);
    const a = await newTaxon(study, "Alphella");
    const b = await newTaxon(study, "Betella");
    await newTaxon(study, "Gammella");
    await app.ctx.db.insert(threads).values([
      { studyId: study.studyId, targetType: "value", targetId: a.id, traitId: study.trait.feeding.id, title: "Feeding of Alphella?" },
      { studyId: study.studyId, targetType: "taxon", targetId: b.id, title: "Is Betella a synonym?", status: "resolved" },
    ]);
    const open = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?hasOpenThread=true`);
    expect(names(open)).toEqual(["Alphella"]);
    expect(open.body.rows[0].openThreads).toEqual({ count: 1, traitIds: [study.trait.feeding.id] });
    expect(names(await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?hasOpenThread=false`))).toEqual(["Betella", "Gammella"]);
  });

  it("rejects a bad query with a message naming the parameter", async () => {
    const res = await list("pageSize=501");
    expect(res.status).toBe(400);
    expect(res.body.error.fields.pageSize).toMatch(/1 to 500/);
    const badFilter = await list(`filter=${grid.trait.life_habit.id}:min:3`);
    expect(badFilter.status).toBe(400);
    expect(badFilter.body.error.message).toMatch(/Life habit has states; use eq/);
  });
});

describe("editing a taxon", () => {
  it("validates values against the codebook, naming the trait", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella");
    const res = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/taxa/${t.id}`)
      .send({ version: 1, changes: { values: { [study.trait.life_habit.id]: "swimming", [study.trait.body_size.id]: -2 } } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[`changes.values.${study.trait.life_habit.id}`]).toMatch(/"swimming" is not a state of Life habit/);
    expect(res.body.error.fields[`changes.values.${study.trait.body_size.id}`]).toMatch(/below the minimum 0 mm/);
  });

  it("filling an empty value needs no reason; replacing one does; every change is a decision and bumps the version", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella");
    const feeding = study.trait.feeding.id;
    const fill = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 1, changes: { values: { [feeding]: "suspension" } } });
    expect(fill.status).toBe(200);
    expect(fill.body).toMatchObject({ decisions: 1, taxon: { version: 2, values: { [feeding]: "suspension" } } });
    const noReason = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 2, changes: { values: { [feeding]: "grazer" } } });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/Feeding mode/);
    const withReason = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/taxa/${t.id}`)
      .send({ version: 2, changes: { values: { [feeding]: "grazer" }, lad: { interval: "Maastrichtian" } }, reason: "Radula found (invented)" });
    expect(withReason.body).toMatchObject({ decisions: 2, taxon: { version: 3, ladMa: 66, ladInterval: "Maastrichtian" } }); // Maastrichtian top 66.0 Ma (ICS v2024/12)
    const decisions = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.taxonId, t.id));
    expect(decisions.map((d) => [d.field, d.action, d.oldValue, d.newValue])).toEqual(
      expect.arrayContaining([
        ["taxon", "create", null, expect.objectContaining({ name: "Alphella" })],
        [feeding, "update", null, "suspension"],
        [feeding, "update", "suspension", "grazer"],
        ["lad", "update", null, { ma: 66, interval: "Maastrichtian" }],
      ]),
    );
  });

  it("refuses a first appearance younger than the last", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella", { fad: { ma: 80 }, lad: { ma: 70 } });
    const res = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 1, changes: { lad: { ma: 85 } }, reason: "x" });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe("First appearance (80 Ma) is younger than last appearance (85 Ma)");
  });

  it("names are unique within a study", async () => {
    const study = await studyWithCodebook(app, cast);
    await newTaxon(study, "Alphella");
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Alphella" });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.name).toMatch(/already used/);
  });

  it("two concurrent edits of one taxon: one wins, the other gets 409 with the current value and who set it, and nothing is lost", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella", { values: { [study.trait.feeding.id]: "suspension" } });
    const feeding = study.trait.feeding.id;
    const habit = study.trait.life_habit.id;
    const [byCoder, byOwner] = await Promise.all([
      cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 1, changes: { values: { [feeding]: "grazer" } }, reason: "Coder's reading (invented)" }),
      cast.people.owner.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 1, changes: { values: { [feeding]: "deposit", [habit]: "infaunal" } }, reason: "Owner's reading (invented)" }),
    ]);
    expect([byCoder.status, byOwner.status].sort()).toEqual([200, 409]);
    const [winner, loser] = byCoder.status === 200 ? [byCoder, byOwner] : [byOwner, byCoder];
    const winnerId = winner === byCoder ? cast.people.coder.user.id : cast.people.owner.user.id;
    const winnerValue = winner.body.taxon.values[feeding];
    expect(loser.body.error.code).toBe("version_conflict");
    expect(loser.body.currentVersion).toBe(2);
    expect(loser.body.taxon.values[feeding]).toBe(winnerValue);
    const feedingConflict = loser.body.conflicts.find((c: { field: string }) => c.field === feeding);
    expect(feedingConflict).toMatchObject({ currentValue: winnerValue, setBy: { id: winnerId }, setAt: expect.any(String) });
    // The loser resubmits on the current version: both decisions are on record, in order.
    const retry = await (loser === byCoder ? cast.people.coder : cast.people.owner).agent
      .patch(`/api/studies/${study.studyId}/taxa/${t.id}`)
      .send({ version: loser.body.currentVersion, changes: { values: { [feeding]: "predator" } }, reason: "Chose after comparing" });
    expect(retry.body.taxon).toMatchObject({ version: 3, values: { [feeding]: "predator" } });
    const history = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}/history?traitId=${feeding}`);
    expect(history.body.entries.map((e: { oldValue: unknown; newValue: unknown }) => [e.oldValue, e.newValue])).toEqual([
      [winnerValue, "predator"],
      ["suspension", winnerValue],
      [null, "suspension"],
    ]);
  });

  it("a removed taxon leaves the grid, keeps its history, and a revert of the removal brings it back", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella", { values: { [study.trait.environment.id]: "marine" } });
    const stale = await cast.people.coder.agent.delete(`/api/studies/${study.studyId}/taxa/${t.id}?version=7&reason=Duplicate`);
    expect(stale.status).toBe(409);
    expect((await cast.people.coder.agent.delete(`/api/studies/${study.studyId}/taxa/${t.id}?version=1&reason=Duplicate`)).status).toBe(204);
    expect((await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`)).body.total).toBe(0);
    const history = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}/history`);
    expect(history.body).toMatchObject({ deleted: true, entries: [{ action: "delete", reason: "Duplicate" }, { action: "create" }] });
    const revert = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/decisions/${history.body.entries[0].decisionId}/revert`).send({ reason: "Not a duplicate" });
    expect(revert.status).toBe(200);
    const back = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`);
    expect(back.body.rows[0]).toMatchObject({ id: t.id, name: "Alphella", values: { [study.trait.environment.id]: "marine" } });
  });
});

describe("bulk edits", () => {
  it("sets one value on a selection with one reason, one decision per changed taxon sharing a batch; the batch reverts at once", async () => {
    const study = await studyWithCodebook(app, cast);
    const habit = study.trait.life_habit.id;
    const a = await newTaxon(study, "Alphella", { values: { [habit]: "epifaunal" } });
    const b = await newTaxon(study, "Betella", { values: { [habit]: "infaunal" } });
    const c = await newTaxon(study, "Gammella");
    const res = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/taxa/bulk`)
      .send({ taxonIds: [a.id, b.id, c.id], field: habit, value: "infaunal", reason: "Burrow casts in all three (invented)" });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ changed: 2, unchanged: 1, batchId: expect.any(String) });
    const batch = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.batchId, res.body.batchId));
    expect(batch.map((d) => d.taxonId).sort()).toEqual([a.id, c.id].sort());
    expect(new Set(batch.map((d) => d.reason))).toEqual(new Set(["Burrow casts in all three (invented)"]));
    const feed = await app.ctx.db.select().from(activity).where(eq(activity.refId, res.body.batchId));
    expect(feed[0]).toMatchObject({ kind: "bulk.edited", summary: expect.stringMatching(/Life habit to "infaunal" on 2 taxa/) });

    const undo = await cast.people.owner.agent.post(`/api/studies/${study.studyId}/decisions/batches/${res.body.batchId}/revert`).send({ reason: "Casts belong to another layer" });
    expect(undo.body).toMatchObject({ reverted: 2, skipped: 0 });
    const rows = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`)).body.rows;
    expect(rows.map((r: { values: Record<string, string> }) => r.values[habit] ?? null)).toEqual(["epifaunal", "infaunal", null]);
  });

  it("refuses a bulk value outside the codebook and writes nothing", async () => {
    const study = await studyWithCodebook(app, cast);
    const a = await newTaxon(study, "Alphella");
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa/bulk`).send({ taxonIds: [a.id], field: study.trait.body_size.id, value: "big", reason: "x" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.value).toMatch(/Body size takes a number in mm/);
    expect((await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.taxonId, a.id))).length).toBe(1);
  });
});

describe("roles", () => {
  it("a reviewer or a viewer cannot edit; a coder can", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await newTaxon(study, "Alphella");
    const edit = { version: 1, changes: { notes: "Seen in the invented basin" } };
    for (const who of ["reviewer", "viewer"] as const) {
      expect((await cast.people[who].agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send(edit)).status).toBe(403);
      expect((await cast.people[who].agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: `By ${who}` })).status).toBe(403);
      expect((await cast.people[who].agent.post(`/api/studies/${study.studyId}/taxa/bulk`).send({ taxonIds: [t.id], field: "notes", value: "x", reason: "x" })).status).toBe(403);
      expect((await cast.people[who].agent.get(`/api/studies/${study.studyId}/taxa`)).status).toBe(200);
    }
    expect((await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send(edit)).status).toBe(200);
  });
});
