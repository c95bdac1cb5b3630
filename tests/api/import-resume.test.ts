// An upload left at the mapping step is resumed from the import history: GET .../imports/:id/upload
// reads the stored file again and answers as the upload did, with the mapping last previewed.
// Every taxon is invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createTestApp, type TestApp } from "../support/server";
import { studyWithCodebook, uploadCsv } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

const CSV = "Taxon,Group,From,To,Habit\nVessirella alta,Vessirellidae,112,64,infaunal\nUmbrocardia lata,Umbrocardiidae,105,80,epifaunal\n";

describe("resuming an upload at the mapping step", () => {
  it("answers with the file's columns and rows, first with a suggested mapping, then with the mapping last previewed; a discarded upload cannot be resumed", async () => {
    const study = await studyWithCodebook(app, cast);
    const coder = cast.people.coder.agent;
    const upload = await uploadCsv(coder, study.studyId, CSV);
    expect(upload.status, JSON.stringify(upload.body)).toBe(201);
    const importId = upload.body.import.id as string;

    const fresh = await coder.get(`/api/studies/${study.studyId}/imports/${importId}/upload`);
    expect(fresh.status, JSON.stringify(fresh.body)).toBe(200);
    expect(fresh.body).toMatchObject({ columns: ["Taxon", "Group", "From", "To", "Habit"], rowCount: 2, delimiter: ",", import: { id: importId, status: "previewed" } });
    expect(fresh.body.sampleRows[1]).toEqual(["Umbrocardia lata", "Umbrocardiidae", "105", "80", "epifaunal"]);
    expect(fresh.body.suggestedMapping).toEqual(upload.body.suggestedMapping);

    const mapping = { name: "Taxon", higherTaxon: "Group", firstAppearance: "From", lastAppearance: "To", notes: null, traits: { [study.trait.life_habit.id]: "Habit" } };
    const preview = await coder.post(`/api/studies/${study.studyId}/imports/${importId}/preview`).send({ mapping });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    const resumed = await coder.get(`/api/studies/${study.studyId}/imports/${importId}/upload`);
    expect(resumed.body.suggestedMapping).toMatchObject(mapping);

    // A viewer reads the history but does not import.
    expect((await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/imports/${importId}/upload`)).status).toBe(403);

    expect((await coder.delete(`/api/studies/${study.studyId}/imports/${importId}`)).status).toBe(204);
    const gone = await coder.get(`/api/studies/${study.studyId}/imports/${importId}/upload`);
    expect(gone.status).toBe(409);
  });
});
