// The audit trail through the API: every change is a decision; lists filter by taxon, trait,
// import and person; a cell's history says who changed it, when, from what, to what and why;
// reverts refuse when the value changed since and are themselves decisions. Invented taxa.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

async function taxonWithFeeding(study: CodebookStudy, value: string) {
  const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Alphella", values: { [study.trait.feeding.id]: value } });
  return res.body.taxon as { id: string };
}

const edit = (study: CodebookStudy, taxonId: string, version: number, feeding: string, who: "coder" | "owner" = "coder") =>
  cast.people[who].agent
    .patch(`/api/studies/${study.studyId}/taxa/${taxonId}`)
    .send({ version, changes: { values: { [study.trait.feeding.id]: feeding } }, reason: `Set to ${feeding} (invented reason)` });

describe("listing decisions", () => {
  it("lists newest first with taxon name, trait key and person, and filters by taxon, trait, import and person", async () => {
    const study = await studyWithCodebook(app, cast);
    const { importId } = await importCsv(cast.people.coder.agent, study, "name,feeding\nBetella,grazer\n", {
      mapping: { name: "name", traits: { [study.trait.feeding.id]: "feeding" } },
    });
    const t = await taxonWithFeeding(study, "suspension");
    await edit(study, t.id, 1, "deposit", "owner");
    const all = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions`);
    expect(all.body.total).toBe(3);
    expect(all.body.rows[0]).toMatchObject({
      taxonName: "Alphella",
      traitKey: "feeding",
      action: "update",
      oldValue: "suspension",
      newValue: "deposit",
      user: { id: cast.people.owner.user.id },
      revertedById: null,
    });
    const byImport = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?importId=${importId}`);
    expect(byImport.body.rows.map((d: { taxonName: string; action: string }) => [d.taxonName, d.action])).toEqual([["Betella", "create"]]);
    const byPerson = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?userId=${cast.people.owner.user.id}`);
    expect(byPerson.body.total).toBe(1);
    const byTaxonAndTrait = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}&traitId=${study.trait.feeding.id}`);
    expect(byTaxonAndTrait.body.total).toBe(1);
  });
});

describe("cell history", () => {
  it("shows who changed a cell, when, from what, to what and why, including the import it came from", async () => {
    const study = await studyWithCodebook(app, cast);
    await importCsv(cast.people.coder.agent, study, "name,feeding,life_habit\nAlphella,suspension,epifaunal\n", {
      mapping: { name: "name", traits: { [study.trait.feeding.id]: "feeding", [study.trait.life_habit.id]: "life_habit" } },
      reason: "Museum catalogue, invented drawer 12",
    });
    const grid = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`);
    const t = grid.body.rows[0];
    await edit(study, t.id, 1, "grazer");
    await cast.people.owner.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: 2, changes: { notes: "Checked" } });
    const cell = await cast.people.reviewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}/history?traitId=${study.trait.feeding.id}`);
    expect(cell.status).toBe(200);
    expect(cell.body.entries).toEqual([
      expect.objectContaining({ action: "update", oldValue: "suspension", newValue: "grazer", reason: "Set to grazer (invented reason)", user: { id: cast.people.coder.user.id, name: "Test coder" }, createdAt: expect.any(String) }),
      expect.objectContaining({ action: "create", oldValue: null, newValue: "suspension", reason: "Museum catalogue, invented drawer 12", importFileName: "invented-taxa.csv" }),
    ]);
    const whole = await cast.people.reviewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}/history`);
    expect(whole.body.entries.map((e: { field: string }) => e.field)).toEqual(["notes", study.trait.feeding.id, "taxon"]);
  });
});

describe("reverting a decision", () => {
  it("puts the old value back as a new decision, which can itself be reverted", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await taxonWithFeeding(study, "suspension");
    await edit(study, t.id, 1, "deposit");
    const [change] = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}`)).body.rows;
    const revert = await cast.people.owner.agent.post(`/api/studies/${study.studyId}/decisions/${change.id}/revert`).send({ reason: "Gut contents were sediment infill" });
    expect(revert.status).toBe(200);
    expect(revert.body).toMatchObject({ reverted: 1, skipped: 0 });
    const row = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}`)).body;
    expect(row).toMatchObject({ version: 3, values: { [study.trait.feeding.id]: "suspension" } });
    const list = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}`)).body.rows;
    expect(list[0]).toMatchObject({ action: "revert", revertsId: change.id, oldValue: "deposit", newValue: "suspension", reason: "Gut contents were sediment infill" });
    expect(list[1]).toMatchObject({ id: change.id, revertedById: list[0].id });
    // A second revert of the same decision is refused: the value is already back.
    const again = await cast.people.owner.agent.post(`/api/studies/${study.studyId}/decisions/${change.id}/revert`).send({ reason: "twice" });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe("already_reverted");
    // Reverting the revert re-applies the change.
    const redo = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/decisions/${list[0].id}/revert`).send({ reason: "Sediment infill ruled out" });
    expect(redo.status).toBe(200);
    expect((await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}`)).body.values[study.trait.feeding.id]).toBe("deposit");
  });

  it("refuses (409) when the value changed since, naming the current value and who set it, and changes nothing", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await taxonWithFeeding(study, "suspension");
    await edit(study, t.id, 1, "deposit");
    const [first] = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}`)).body.rows;
    await edit(study, t.id, 2, "predator", "owner");
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/decisions/${first.id}/revert`).send({ reason: "Back to suspension" });
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({
      error: { code: "changed_since" },
      conflictCount: 1,
      conflicts: [{ decisionId: first.id, taxonName: "Alphella", expectedValue: "deposit", currentValue: "predator", setBy: { id: cast.people.owner.user.id } }],
    });
    expect((await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/${t.id}`)).body).toMatchObject({ version: 3, values: { [study.trait.feeding.id]: "predator" } });
  });

  it("refuses to put back a value the codebook no longer allows", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await taxonWithFeeding(study, "suspension");
    await edit(study, t.id, 1, "deposit");
    const [change] = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}`)).body.rows;
    // Nobody holds "suspension" now, so the codebook may drop it without a remap.
    const states = study.trait.feeding.states.filter((s) => s.code !== "suspension").map(({ code, label }) => ({ code, label }));
    expect((await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${study.trait.feeding.id}`).send({ states })).status).toBe(200);
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/decisions/${change.id}/revert`).send({ reason: "Back to suspension" });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("not_revertible");
    expect(res.body.conflicts[0].message).toMatch(/codebook no longer allows/);
  });

  it("needs a reason, and a reviewer cannot revert", async () => {
    const study = await studyWithCodebook(app, cast);
    const t = await taxonWithFeeding(study, "suspension");
    const [created] = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/decisions?taxonId=${t.id}`)).body.rows;
    const path = `/api/studies/${study.studyId}/decisions/${created.id}/revert`;
    const noReason = await cast.people.coder.agent.post(path).send({ reason: " " });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields.reason).toMatch(/reason is required/);
    expect((await cast.people.reviewer.agent.post(path).send({ reason: "No" })).status).toBe(403);
  });
});
