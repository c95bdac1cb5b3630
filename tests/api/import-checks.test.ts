// Plausibility and name hygiene at every import, through the real routes: declared missing-value
// tokens, implausible ages (warnings that do not block), names differing only by case, spacing or
// punctuation (kept apart or read as one), qualified higher taxa. Taxa and basin are invented.
// Rows are numbered as a spreadsheet shows them: the header is row 1.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, isNull } from "drizzle-orm";
import { occurrences, taxa } from "../../db/schema/index";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, templateMapping, uploadCsv, type CodebookStudy } from "../support/traitTables";
import { uploadOccurrences } from "../support/occurrences";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
});
afterAll(() => app.close());

const HEADER = "name,higher_taxon,first_appearance,last_appearance,life_habit";
/** An invented Ordovician-like study: ranges between 485 and 444 Ma. */
const BASE_FILE = `${HEADER}\nIdiocrista,Strovelida,470,450,epifaunal\nOrtambelites,Ortevida,485,460,epifaunal\nRafivelina,Strovelida,458,444,infaunal\n`;

async function baseStudy(): Promise<CodebookStudy> {
  const study = await studyWithCodebook(app, cast);
  const { commit } = await importCsv(cast.people.coder.agent, study, BASE_FILE, { mapping: templateMapping(study, ["life_habit"]) });
  expect(commit.status).toBe(200);
  return study;
}

async function preview(study: CodebookStudy, content: string, nameMerges?: Record<string, string>, higherTaxonMerges?: Record<string, string>) {
  const upload = await uploadCsv(cast.people.coder.agent, study.studyId, content);
  expect(upload.status).toBe(201);
  const importId = upload.body.import.id as string;
  const res = await cast.people.coder.agent
    .post(`/api/studies/${study.studyId}/imports/${importId}/preview`)
    .send({ mapping: templateMapping(study, ["life_habit"]), ...(nameMerges ? { nameMerges } : {}), ...(higherTaxonMerges ? { higherTaxonMerges } : {}) });
  return { res, importId };
}

async function liveTaxon(studyId: string, name: string) {
  const [row] = await app.ctx.db.select().from(taxa).where(and(eq(taxa.studyId, studyId), eq(taxa.name, name), isNull(taxa.deletedAt)));
  return row;
}

describe("missing-value tokens", () => {
  it("are kept per study, edited by owners and coders with field messages naming the entry", async () => {
    const studyId = await cast.makeStudy();
    const path = `/api/studies/${studyId}/import-settings`;
    expect((await cast.people.viewer.agent.get(path)).body).toEqual({ missingTokens: [] });
    const bad = await cast.people.coder.agent.put(path).send({ missingTokens: ["Indet.", "indet."] });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields["missingTokens.1"]).toBe('"indet." is already in the list (tokens are matched ignoring case)');
    expect((await cast.people.analyst.agent.put(path).send({ missingTokens: ["?"] })).status).toBe(403);
    const saved = await cast.people.coder.agent.put(path).send({ missingTokens: [" Indet. ", "?"] });
    expect(saved.status).toBe(200);
    expect(saved.body).toEqual({ missingTokens: ["Indet.", "?"] });
    expect((await cast.people.viewer.agent.get(path)).body).toEqual({ missingTokens: ["Indet.", "?"] });
  });

  it("are read as missing in a trait-table import (not as a state), and the preview says where", async () => {
    const study = await baseStudy();
    const file = `${HEADER}\nPlatyvelia,Indet.,465,455,Indet.\nSowavella,Strovelida,462,450,?\n`;
    // Without tokens, "Indet." and "?" are unknown states: row errors.
    const before = await preview(study, file);
    expect(before.res.body.problems.map((p: { row: number; column: string }) => [p.row, p.column])).toEqual([
      [2, "life_habit"],
      [3, "life_habit"],
    ]);
    await cast.people.owner.agent.put(`/api/studies/${study.studyId}/import-settings`).send({ missingTokens: ["Indet.", "?"] });
    const after = await preview(study, file);
    expect(after.res.status).toBe(200);
    expect(after.res.body.problemCount).toBe(0);
    expect(after.res.body.checks.missingTokens).toEqual(["Indet.", "?"]);
    expect(after.res.body.checks.missingRead).toEqual([
      { column: "higher_taxon", token: "Indet.", count: 1, firstRows: [2] },
      { column: "life_habit", token: "Indet.", count: 1, firstRows: [2] },
      { column: "life_habit", token: "?", count: 1, firstRows: [3] },
    ]);
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${after.importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), skipInvalid: false });
    expect(commit.status).toBe(200);
    const platyvelia = await liveTaxon(study.studyId, "Platyvelia");
    expect(platyvelia.higherTaxon).toBe("");
    expect(platyvelia.traitValues).toEqual({});
  });

  it("are read as missing in an occurrence upload, the higher taxon included", async () => {
    const studyId = await cast.makeStudy();
    await cast.people.owner.agent.put(`/api/studies/${studyId}/import-settings`).send({ missingTokens: ["Indet."] });
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, "taxon,higher_taxon,max_ma,min_ma\nIdiocrista,Indet.,470,468\nIdiocrista,Strovelida,455,452\n");
    const mapping = { taxon: "taxon", higherTaxon: "higher_taxon", maxMa: "max_ma", minMa: "min_ma" };
    const path = `/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}`;
    const res = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping });
    expect(res.status).toBe(200);
    expect(res.body.checks.missingRead).toEqual([{ column: "higher_taxon", token: "Indet.", count: 1, firstRows: [2] }]);
    expect(res.body.sample.map((o: { higherTaxon: string | null }) => o.higherTaxon)).toEqual([null, "Strovelida"]);
    expect((await cast.people.coder.agent.post(`${path}/commit`).send({ mapping, skipInvalid: false })).status).toBe(200);
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId));
    expect(stored.map((o) => o.higherTaxon).sort()).toEqual(["Strovelida", null].sort());
  });
});

describe("implausible ages", () => {
  it("warn by row and column against the study's span, and the rows can still be committed", async () => {
    const study = await baseStudy();
    // The study spans 485 to 444 Ma (width 41 Myr). Row 2: 4 and 3 Ma look like interval numbers
    // (4 <= 444 / 10). Row 3: 380 Ma is 64 Myr younger than 444, beyond 41. Row 4 lies within.
    const file = `${HEADER}\nGlyptevis,Ortevida,4,3,epifaunal\nHebrinella,Ortevida,380,379,epifaunal\nDalvorella,Ortevida,466,455,epifaunal\n`;
    const { res, importId } = await preview(study, file);
    expect(res.status).toBe(200);
    expect(res.body.problemCount).toBe(0);
    expect(res.body.checks.ageSpan).toEqual({ oldestMa: 485, youngestMa: 444, source: "study" });
    expect(res.body.checks.warnings.map((w: { row: number; column: string; taxon: string; kind: string }) => [w.row, w.column, w.taxon, w.kind])).toEqual([
      [2, "first_appearance", "Glyptevis", "age_interval_number"],
      [2, "last_appearance", "Glyptevis", "age_interval_number"],
      [3, "first_appearance", "Hebrinella", "age_far_outside"],
      [3, "last_appearance", "Hebrinella", "age_far_outside"],
    ]);
    expect(res.body.checks.warningCount).toBe(4);
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), skipInvalid: false });
    expect(commit.status).toBe(200);
    expect((await liveTaxon(study.studyId, "Glyptevis")).fadMa).toBe(4);
  });

  it("warn in an occurrence upload against the file's own middle half when the study has no ages", async () => {
    const studyId = await cast.makeStudy();
    // Ten finds: maximum ages 470, 468, 466, 464, 462, 460, 458, 456, 454 and 4 (row 11); minimum ages 1 Myr younger.
    const ages = [470, 468, 466, 464, 462, 460, 458, 456, 454, 4];
    const csv = "taxon,max_ma,min_ma\n" + ages.map((a, i) => `Taxon${i},${a},${a - 1}`).join("\n") + "\n";
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, csv);
    const res = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`)
      .send({ mapping: { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" } });
    expect(res.status).toBe(200);
    // The 20 ages sorted: 3, 4, 453, 454, ..., 469, 470. Nearest rank: Q1 = 5th = 455, Q3 = 15th = 465.
    expect(res.body.checks.ageSpan).toEqual({ oldestMa: 465, youngestMa: 455, source: "file" });
    expect(res.body.checks.warnings.map((w: { row: number; column: string; kind: string }) => [w.row, w.column, w.kind])).toEqual([
      [11, "max_ma", "age_interval_number"],
      [11, "min_ma", "age_interval_number"],
    ]);
  });
});

describe("names that differ only by case, spacing or punctuation", () => {
  it("are listed against the study's taxa, kept apart by default, and read as one when chosen", async () => {
    const study = await baseStudy();
    const file = `${HEADER}\nidiocrista,Strovelida,470,450,infaunal\n`;
    const apart = await preview(study, file);
    expect(apart.res.body.checks.similarNames).toEqual([
      {
        key: "idiocrista",
        spellings: [
          { name: "Idiocrista", fileRows: 0, firstRows: [], inStudy: true },
          { name: "idiocrista", fileRows: 1, firstRows: [2], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    expect(apart.res.body.counts.create).toBe(1);

    const merged = await preview(study, file, { idiocrista: "Idiocrista" });
    expect(merged.res.body.checks.similarNames[0].mergedInto).toBe("Idiocrista");
    expect(merged.res.body.counts).toMatchObject({ create: 0, update: 1 });
    expect(merged.res.body.sample[0]).toMatchObject({ row: 2, name: "Idiocrista", action: "update" });
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${merged.importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), nameMerges: { idiocrista: "Idiocrista" }, skipInvalid: false });
    expect(commit.status).toBe(200);
    expect(await liveTaxon(study.studyId, "idiocrista")).toBeUndefined();
    expect((await liveTaxon(study.studyId, "Idiocrista")).traitValues).toEqual({ [study.trait.life_habit.id]: "infaunal" });
  });

  it("covers higher taxa too (qualified ones left out), read as the chosen clade when asked", async () => {
    const study = await baseStudy();
    const file = `${HEADER}\nPlatyvelia,strovelida ,465,455,epifaunal\nPlaevomys,Ortevida?,466,455,epifaunal\n`;
    const apart = await preview(study, file);
    expect(apart.res.body.checks.similarHigherTaxa).toEqual([
      {
        key: "strovelida",
        spellings: [
          { name: "Strovelida", fileRows: 0, firstRows: [], inStudy: true },
          { name: "strovelida", fileRows: 1, firstRows: [2], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    const merged = await preview(study, file, undefined, { strovelida: "Strovelida" });
    expect(merged.res.body.checks.similarHigherTaxa[0].mergedInto).toBe("Strovelida");
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${merged.importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), higherTaxonMerges: { strovelida: "Strovelida" }, skipInvalid: false });
    expect(commit.status).toBe(200);
    expect((await liveTaxon(study.studyId, "Platyvelia")).higherTaxon).toBe("Strovelida");
    expect((await liveTaxon(study.studyId, "Plaevomys")).higherTaxon).toBe("Ortevida?");
  });

  it("refuses a merge of names that differ by more", async () => {
    const study = await baseStudy();
    const { res } = await preview(study, `${HEADER}\nidiocrista,Strovelida,470,450,infaunal\n`, { idiocrista: "Ortambelites" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields["nameMerges.idiocrista"]).toBe('"idiocrista" and "Ortambelites" differ by more than case, spaces or punctuation');
  });

  it("are found within an occurrence file and merged there when chosen", async () => {
    const studyId = await cast.makeStudy();
    const csv = "taxon,max_ma,min_ma\nIdiocrista,470,468\nidiocrista ,466,464\nIdio-crista,460,458\n";
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, csv);
    const path = `/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}`;
    const mapping = { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" };
    const apart = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping });
    expect(apart.body.checks.similarNames.map((g: { spellings: Array<{ name: string }> }) => g.spellings.map((s) => s.name))).toEqual([["Idio-crista", "Idiocrista", "idiocrista"]]);
    expect(apart.body.counts.taxa).toBe(3);
    const nameMerges = { idiocrista: "Idiocrista", "Idio-crista": "Idiocrista" };
    const merged = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping, nameMerges });
    expect(merged.body.counts.taxa).toBe(1);
    expect((await cast.people.coder.agent.post(`${path}/commit`).send({ mapping, nameMerges, skipInvalid: false })).status).toBe(200);
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId));
    expect(new Set(stored.map((o) => o.taxon))).toEqual(new Set(["Idiocrista"]));
  });
});

describe("qualified higher taxa", () => {
  it("are kept as written and listed as qualified in both previews", async () => {
    const study = await baseStudy();
    const { res, importId } = await preview(study, `${HEADER}\nPlaevomys,Anavelidae?,466,455,epifaunal\nHesperorthis,cf. Ortevida,470,460,epifaunal\n`);
    expect(res.body.checks.qualifiedHigherTaxa).toEqual([
      { name: "Anavelidae?", base: "Anavelidae", qualifier: "?", rows: 1, firstRow: 2 },
      { name: "cf. Ortevida", base: "Ortevida", qualifier: "cf.", rows: 1, firstRow: 3 },
    ]);
    await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${importId}/commit`).send({ mapping: templateMapping(study, ["life_habit"]), skipInvalid: false });
    expect((await liveTaxon(study.studyId, "Plaevomys")).higherTaxon).toBe("Anavelidae?");

    const studyId = await cast.makeStudy();
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, "taxon,higher_taxon,max_ma,min_ma\nPlaevomys,Anavelidae?,466,455\nPlaevomys,Anavelidae?,460,455\n");
    const occ = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`)
      .send({ mapping: { taxon: "taxon", higherTaxon: "higher_taxon", maxMa: "max_ma", minMa: "min_ma" } });
    expect(occ.body.checks.qualifiedHigherTaxa).toEqual([{ name: "Anavelidae?", base: "Anavelidae", qualifier: "?", rows: 2, firstRow: 2 }]);
  });
});
