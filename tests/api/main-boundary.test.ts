// A study's main boundary: set on the overview (PATCH /studies/:id) or taken from the newest run's
// crisis boundary, whichever is later; kept in studies.settings. Unit bases from ICS v2024/12 (Cohen,
// Harper, Gibbard & Car 2025, Episodes 48: 105-115): Turonian base 93.9 Ma, Danian base 66.0 Ma.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runs } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

/** A run row as the runs service stores it (only what the main boundary reads matters here). */
async function storeRun(studyId: string, params: Record<string, unknown>, status = "succeeded", createdAt = new Date()) {
  const [row] = await app.ctx.db
    .insert(runs)
    .values({ studyId, name: `Invented run ${createdAt.toISOString()}`, status, params, appVersion: "test", createdBy: cast.people.analyst.user.id, createdAt })
    .returning({ id: runs.id, name: runs.name });
  return row;
}

describe("the study's main boundary", () => {
  it("is null for a new study, set by the study lead by unit or by age, and refused for an unknown unit", async () => {
    const studyId = await cast.makeStudy();
    const owner = cast.people.owner.agent;
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toBeNull();

    const byUnit = await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: { unit: "turonian" } });
    expect(byUnit.status, JSON.stringify(byUnit.body)).toBe(200);
    expect(byUnit.body.mainBoundary).toMatchObject({ boundaryMa: 93.9, unit: "Turonian", windowMyr: null, source: "study", runId: null });
    // The name and description stay as they were.
    expect(byUnit.body.name).toBe("Invented basin study");

    const byAge = await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: { boundaryMa: 94.2 } });
    expect(byAge.body.mainBoundary).toMatchObject({ boundaryMa: 94.2, unit: null, source: "study" });
    expect((await cast.people.viewer.agent.get(`/api/studies/${studyId}`)).body.mainBoundary).toMatchObject({ boundaryMa: 94.2 });
    expect((await owner.get("/api/studies")).body.studies.find((s: { id: string }) => s.id === studyId).mainBoundary).toMatchObject({ boundaryMa: 94.2 });

    const unknown = await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: { unit: "Invented stage" } });
    expect(unknown.status).toBe(400);
    expect(JSON.stringify(unknown.body.error.fields)).toMatch(/not a unit of the time scale/);
    const both = await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: { unit: "Turonian", boundaryMa: 66 } });
    expect(both.status).toBe(400);
    expect(JSON.stringify(both.body.error.fields)).toMatch(/either a unit/);

    expect((await cast.people.coder.agent.patch(`/api/studies/${studyId}`).send({ mainBoundary: { unit: "Turonian" } })).status).toBe(403);
  });

  it("follows the newest run's crisis boundary when the run is newer than the choice, and the choice again when made later", async () => {
    const studyId = await cast.makeStudy();
    const owner = cast.people.owner.agent;
    // A failed run does not count; a run naming boundary 1 of two as its crisis gives that boundary and its window.
    await storeRun(studyId, { boundaries: [{ boundaryMa: 93.9 }], traits: [] }, "failed");
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toBeNull();
    const run = await storeRun(studyId, { boundaries: [{ boundaryMa: 93.9 }, { boundaryMa: 66, windowMyr: 1.5 }], crisisBoundary: 1, traits: [] });
    // 66.0 Ma is the base of the Cenozoic, Paleogene, Paleocene and Danian: named by the narrowest, the stage.
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toMatchObject({ boundaryMa: 66, unit: "Danian", windowMyr: 1.5, source: "run", runId: run.id, runName: run.name });

    // Chosen on the overview after the run: the choice counts.
    await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: { unit: "Turonian" } });
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toMatchObject({ boundaryMa: 93.9, source: "study" });

    // A newer run without a named crisis: its first boundary.
    await storeRun(studyId, { boundaries: [{ boundaryMa: 72.2 }], traits: [] }, "queued", new Date(Date.now() + 1000));
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toMatchObject({ boundaryMa: 72.2, unit: "Maastrichtian", windowMyr: null, source: "run" });
    // An age that is no unit's base keeps no unit.
    await storeRun(studyId, { boundaries: [{ boundaryMa: 94.2 }], traits: [] }, "queued", new Date(Date.now() + 2000));
    expect((await owner.get(`/api/studies/${studyId}`)).body.mainBoundary).toMatchObject({ boundaryMa: 94.2, unit: null, source: "run" });

    // Clearing the choice leaves the runs' word.
    const cleared = await owner.patch(`/api/studies/${studyId}`).send({ mainBoundary: null });
    expect(cleared.body.mainBoundary).toMatchObject({ boundaryMa: 94.2, source: "run" });
  });
});
