// The codebook through the API: traits, their checks, reordering, retiring, and changes of states
// that would orphan values (refused with the taxa holding them until a remap says where they go).
// All taxa and traits are invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { codingDecisions } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

describe("the suggested codebook", () => {
  it("is a choice at creation, not a default: a study created without asking has an empty codebook", async () => {
    const created = await cast.people.owner.agent.post("/api/studies").send({ name: "Invented empty codebook study" });
    expect(created.status).toBe(201);
    const res = await cast.people.owner.agent.get(`/api/studies/${created.body.id}/traits`);
    expect(res.body.traits).toEqual([]);
    const refused = await cast.people.owner.agent.post("/api/studies").send({ name: "Invented study", suggestedCodebook: "yes" });
    expect(refused.status).toBe(400);
    expect(refused.body.error.fields).toHaveProperty("suggestedCodebook");
  });

  it("a new study asking for it starts with: environment, life habit, feeding mode, body size, geographic range", async () => {
    const created = await cast.people.owner.agent.post("/api/studies").send({ name: "Invented codebook study", suggestedCodebook: true });
    const res = await cast.people.owner.agent.get(`/api/studies/${created.body.id}/traits`);
    expect(res.body.traits.map((t: { key: string; kind: string }) => [t.key, t.kind])).toEqual([
      ["environment", "binary"],
      ["life_habit", "categorical"],
      ["feeding", "categorical"],
      ["body_size", "numeric"],
      ["geographic_range", "numeric"],
    ]);
    expect(res.body.traits[3]).toMatchObject({ unit: "mm", transform: "log10", aspect: "ecology", retired: false });
  });
});

describe("creating traits", () => {
  it("adds a trait at the end of the codebook", async () => {
    const study = await studyWithCodebook(app, cast);
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/traits`).send({
      key: "shell_mineralogy",
      label: "Shell mineralogy",
      kind: "categorical",
      aspect: "other",
      states: [
        { code: "calcite", label: "Calcite" },
        { code: "aragonite", label: "Aragonite" },
        { code: "bimineralic", label: "Bimineralic" },
      ],
      codingRule: "Dominant mineral of the outer shell layer.",
    });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ key: "shell_mineralogy", sortOrder: 5, states: [{ code: "calcite", order: 0 }, { code: "aragonite", order: 1 }, { code: "bimineralic", order: 2 }] });
  });

  it("checks keys, kinds and states, naming the field", async () => {
    const study = await studyWithCodebook(app, cast);
    const agent = cast.people.coder.agent;
    const badKey = await agent.post(`/api/studies/${study.studyId}/traits`).send({ key: "Body Size", label: "x", kind: "numeric" });
    expect(badKey.body.error.fields.key).toMatch(/lower-case letter/);
    const taken = await agent.post(`/api/studies/${study.studyId}/traits`).send({ key: "feeding", label: "x", kind: "numeric" });
    expect(taken.status).toBe(409);
    const oneState = await agent.post(`/api/studies/${study.studyId}/traits`).send({ key: "x", label: "x", kind: "binary", states: [{ code: "a", label: "A" }] });
    expect(oneState.body.error.fields.states).toBe("A binary trait has exactly two states");
    const unitOnState = await agent.post(`/api/studies/${study.studyId}/traits`).send({ key: "y", label: "y", kind: "ordinal", unit: "mm", states: [{ code: "a", label: "A" }, { code: "b", label: "B" }] });
    expect(unitOnState.body.error.fields.unit).toBe("Only numeric traits have a unit");
  });
});

describe("changing states", () => {
  async function studyWithHabits() {
    const study = await studyWithCodebook(app, cast);
    const rows = [
      "name,life_habit",
      "Alphella,epifaunal",
      "Betella,infaunal",
      "Gammella,infaunal",
      "Deltella,nektonic",
      "Epsilonella,",
    ];
    const { commit } = await importCsv(cast.people.coder.agent, study, rows.join("\n"), {
      mapping: { name: "name", traits: { [study.trait.life_habit.id]: "life_habit" } },
    });
    if (commit.status !== 200) throw new Error(`test setup: ${JSON.stringify(commit.body)}`);
    return study;
  }
  const statesWithout = (removed: string) =>
    [
      ["epifaunal", "Epifaunal"],
      ["infaunal", "Infaunal"],
      ["nektonic", "Nektonic"],
      ["planktonic", "Planktonic"],
      ["terrestrial", "Terrestrial"],
    ]
      .filter(([code]) => code !== removed)
      .map(([code, label]) => ({ code, label }));

  it("removing a state in use answers 409 with the count and the taxa holding it, and changes nothing", async () => {
    const study = await studyWithHabits();
    const habit = study.trait.life_habit.id;
    const res = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${habit}`).send({ states: statesWithout("infaunal") });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe("states_in_use");
    expect(res.body.affected).toEqual([
      { code: "infaunal", label: "Infaunal", count: 2, sample: [expect.objectContaining({ name: "Betella", value: "infaunal" }), expect.objectContaining({ name: "Gammella", value: "infaunal" })] },
    ]);
    const usage = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/traits/${habit}/usage`);
    expect(usage.body.byState.find((s: { code: string }) => s.code === "infaunal").count).toBe(2);
  });

  it("with a remap, moves the values in one transaction, one decision each, and the batch can be reverted", async () => {
    const study = await studyWithHabits();
    const habit = study.trait.life_habit.id;
    const res = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/traits/${habit}`)
      .send({ states: statesWithout("infaunal").concat([{ code: "burrowing", label: "Burrowing" }]), remap: { infaunal: "burrowing" } });
    expect(res.status).toBe(200);
    expect(res.body.remapped).toBe(2);
    const decisions = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.batchId, res.body.batchId));
    expect(decisions.map((d) => [d.oldValue, d.newValue, d.reason])).toEqual([
      ["infaunal", "burrowing", 'Codebook change: state "infaunal" of Life habit mapped to "burrowing"'],
      ["infaunal", "burrowing", 'Codebook change: state "infaunal" of Life habit mapped to "burrowing"'],
    ]);
    const grid = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?filter=${habit}:eq:burrowing`);
    expect(grid.body.rows.map((r: { name: string }) => r.name)).toEqual(["Betella", "Gammella"]);
  });

  it("a remap to null clears the values; a remap to a code the trait will not have is refused", async () => {
    const study = await studyWithHabits();
    const habit = study.trait.life_habit.id;
    const wrong = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${habit}`).send({ states: statesWithout("nektonic"), remap: { nektonic: "swimming" } });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields["remap.nektonic"]).toMatch(/not a state/);
    const cleared = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/traits/${habit}`)
      .send({ states: statesWithout("nektonic"), remap: { nektonic: null }, reason: "Swimmers are coded in a separate trait" });
    expect(cleared.body.remapped).toBe(1);
    const missing = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?missing=${habit}`);
    expect(missing.body.rows.map((r: { name: string }) => r.name)).toEqual(["Deltella", "Epsilonella"]);
  });

  it("tightening a numeric range that existing values break is refused with the count", async () => {
    const study = await studyWithCodebook(app, cast);
    await importCsv(cast.people.coder.agent, study, "name,body_size\nAlphella,12\nBetella,300\n", { mapping: { name: "name", traits: { [study.trait.body_size.id]: "body_size" } } });
    const res = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${study.trait.body_size.id}`).send({ maxValue: 100 });
    expect(res.status).toBe(409);
    expect(res.body).toMatchObject({ error: { code: "values_out_of_range" }, affected: [{ count: 1, sample: [{ name: "Betella", value: 300 }] }] });
  });
});

describe("order and retirement", () => {
  it("reorders with every trait listed once, and retires and restores a trait", async () => {
    const study = await studyWithCodebook(app, cast);
    const ids = Object.values(study.trait).map((t) => t.id);
    const reversed = [...ids].reverse();
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/traits/reorder`).send({ traitIds: reversed });
    expect(res.body.traits.map((t: { id: string }) => t.id)).toEqual(reversed);
    const partial = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/traits/reorder`).send({ traitIds: reversed.slice(1) });
    expect(partial.status).toBe(400);
    expect(partial.body.error.fields.traitIds).toMatch(/1 traits of the study are missing/);

    const retired = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${study.trait.feeding.id}`).send({ retired: true });
    expect(retired.body.trait).toMatchObject({ retired: true, retiredAt: expect.any(String) });
    const taxon = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Alphella" });
    const edit = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/taxa/${taxon.body.taxon.id}`)
      .send({ version: 1, changes: { values: { [study.trait.feeding.id]: "grazer" } } });
    expect(edit.status).toBe(400);
    expect(edit.body.error.message).toMatch(/Feeding mode is retired/);
    const restored = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${study.trait.feeding.id}`).send({ retired: false });
    expect(restored.body.trait.retired).toBe(false);
  });

  it("a reviewer cannot change the codebook; a coder can", async () => {
    const study = await studyWithCodebook(app, cast);
    const path = `/api/studies/${study.studyId}/traits/${study.trait.feeding.id}`;
    expect((await cast.people.reviewer.agent.patch(path).send({ label: "Diet" })).status).toBe(403);
    expect((await cast.people.viewer.agent.patch(path).send({ label: "Diet" })).status).toBe(403);
    expect((await cast.people.coder.agent.patch(path).send({ label: "Diet" })).status).toBe(200);
  });
});
