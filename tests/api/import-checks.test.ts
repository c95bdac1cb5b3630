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
const BASE_FILE = `${HEADER}\nIdiospira,Strophomenida,470,450,epifaunal\nOrthambonites,Orthida,485,460,epifaunal\nRafinesquina,Strophomenida,458,444,infaunal\n`;

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
    const file = `${HEADER}\nPlatystrophia,Indet.,465,455,Indet.\nSowerbyella,Strophomenida,462,450,?\n`;
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
    const platystrophia = await liveTaxon(study.studyId, "Platystrophia");
    expect(platystrophia.higherTaxon).toBe("");
    expect(platystrophia.traitValues).toEqual({});
  });

  it("are read as missing in an occurrence upload, the higher taxon included", async () => {
    const studyId = await cast.makeStudy();
    await cast.people.owner.agent.put(`/api/studies/${studyId}/import-settings`).send({ missingTokens: ["Indet."] });
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, "taxon,higher_taxon,max_ma,min_ma\nIdiospira,Indet.,470,468\nIdiospira,Strophomenida,455,452\n");
    const mapping = { taxon: "taxon", higherTaxon: "higher_taxon", maxMa: "max_ma", minMa: "min_ma" };
    const path = `/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}`;
    const res = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping });
    expect(res.status).toBe(200);
    expect(res.body.checks.missingRead).toEqual([{ column: "higher_taxon", token: "Indet.", count: 1, firstRows: [2] }]);
    expect(res.body.sample.map((o: { higherTaxon: string | null }) => o.higherTaxon)).toEqual([null, "Strophomenida"]);
    expect((await cast.people.coder.agent.post(`${path}/commit`).send({ mapping, skipInvalid: false })).status).toBe(200);
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId));
    expect(stored.map((o) => o.higherTaxon).sort()).toEqual(["Strophomenida", null].sort());
  });
});

describe("implausible ages", () => {
  it("warn by row and column against the study's span, and the rows can still be committed", async () => {
    const study = await baseStudy();
    // The study spans 485 to 444 Ma (width 41 Myr). Row 2: 4 and 3 Ma look like interval numbers
    // (4 <= 444 / 10). Row 3: 380 Ma is 64 Myr younger than 444, beyond 41. Row 4 lies within.
    const file = `${HEADER}\nGlyptorthis,Orthida,4,3,epifaunal\nHebertella,Orthida,380,379,epifaunal\nDalmanella,Orthida,466,455,epifaunal\n`;
    const { res, importId } = await preview(study, file);
    expect(res.status).toBe(200);
    expect(res.body.problemCount).toBe(0);
    expect(res.body.checks.ageSpan).toEqual({ oldestMa: 485, youngestMa: 444, source: "study" });
    expect(res.body.checks.warnings.map((w: { row: number; column: string; taxon: string; kind: string }) => [w.row, w.column, w.taxon, w.kind])).toEqual([
      [2, "first_appearance", "Glyptorthis", "age_interval_number"],
      [2, "last_appearance", "Glyptorthis", "age_interval_number"],
      [3, "first_appearance", "Hebertella", "age_far_outside"],
      [3, "last_appearance", "Hebertella", "age_far_outside"],
    ]);
    expect(res.body.checks.warningCount).toBe(4);
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), skipInvalid: false });
    expect(commit.status).toBe(200);
    expect((await liveTaxon(study.studyId, "Glyptorthis")).fadMa).toBe(4);
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
    const file = `${HEADER}\nidiospira,Strophomenida,470,450,infaunal\n`;
    const apart = await preview(study, file);
    expect(apart.res.body.checks.similarNames).toEqual([
      {
        key: "idiospira",
        spellings: [
          { name: "Idiospira", fileRows: 0, firstRows: [], inStudy: true },
          { name: "idiospira", fileRows: 1, firstRows: [2], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    expect(apart.res.body.counts.create).toBe(1);

    const merged = await preview(study, file, { idiospira: "Idiospira" });
    expect(merged.res.body.checks.similarNames[0].mergedInto).toBe("Idiospira");
    expect(merged.res.body.counts).toMatchObject({ create: 0, update: 1 });
    expect(merged.res.body.sample[0]).toMatchObject({ row: 2, name: "Idiospira", action: "update" });
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${merged.importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), nameMerges: { idiospira: "Idiospira" }, skipInvalid: false });
    expect(commit.status).toBe(200);
    expect(await liveTaxon(study.studyId, "idiospira")).toBeUndefined();
    expect((await liveTaxon(study.studyId, "Idiospira")).traitValues).toEqual({ [study.trait.life_habit.id]: "infaunal" });
  });

  it("covers higher taxa too (qualified ones left out), read as the chosen clade when asked", async () => {
    const study = await baseStudy();
    const file = `${HEADER}\nPlatystrophia,strophomenida ,465,455,epifaunal\nPlaesiomys,Orthida?,466,455,epifaunal\n`;
    const apart = await preview(study, file);
    expect(apart.res.body.checks.similarHigherTaxa).toEqual([
      {
        key: "strophomenida",
        spellings: [
          { name: "Strophomenida", fileRows: 0, firstRows: [], inStudy: true },
          { name: "strophomenida", fileRows: 1, firstRows: [2], inStudy: false },
        ],
        mergedInto: null,
      },
    ]);
    const merged = await preview(study, file, undefined, { strophomenida: "Strophomenida" });
    expect(merged.res.body.checks.similarHigherTaxa[0].mergedInto).toBe("Strophomenida");
    const commit = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${merged.importId}/commit`)
      .send({ mapping: templateMapping(study, ["life_habit"]), higherTaxonMerges: { strophomenida: "Strophomenida" }, skipInvalid: false });
    expect(commit.status).toBe(200);
    expect((await liveTaxon(study.studyId, "Platystrophia")).higherTaxon).toBe("Strophomenida");
    expect((await liveTaxon(study.studyId, "Plaesiomys")).higherTaxon).toBe("Orthida?");
  });

  it("refuses a merge of names that differ by more", async () => {
    const study = await baseStudy();
    const { res } = await preview(study, `${HEADER}\nidiospira,Strophomenida,470,450,infaunal\n`, { idiospira: "Orthambonites" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields["nameMerges.idiospira"]).toBe('"idiospira" and "Orthambonites" differ by more than case, spaces or punctuation');
  });

  it("are found within an occurrence file and merged there when chosen", async () => {
    const studyId = await cast.makeStudy();
    const csv = "taxon,max_ma,min_ma\nIdiospira,470,468\nidiospira ,466,464\nIdio-spira,460,458\n";
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, csv);
    const path = `/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}`;
    const mapping = { taxon: "taxon", maxMa: "max_ma", minMa: "min_ma" };
    const apart = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping });
    expect(apart.body.checks.similarNames.map((g: { spellings: Array<{ name: string }> }) => g.spellings.map((s) => s.name))).toEqual([["Idio-spira", "Idiospira", "idiospira"]]);
    expect(apart.body.counts.taxa).toBe(3);
    const nameMerges = { idiospira: "Idiospira", "Idio-spira": "Idiospira" };
    const merged = await cast.people.coder.agent.post(`${path}/preview`).send({ mapping, nameMerges });
    expect(merged.body.counts.taxa).toBe(1);
    expect((await cast.people.coder.agent.post(`${path}/commit`).send({ mapping, nameMerges, skipInvalid: false })).status).toBe(200);
    const stored = await app.ctx.db.select().from(occurrences).where(eq(occurrences.studyId, studyId));
    expect(new Set(stored.map((o) => o.taxon))).toEqual(new Set(["Idiospira"]));
  });
});

describe("qualified higher taxa", () => {
  it("are kept as written and listed as qualified in both previews", async () => {
    const study = await baseStudy();
    const { res, importId } = await preview(study, `${HEADER}\nPlaesiomys,Anazygidae?,466,455,epifaunal\nHesperorthis,cf. Orthida,470,460,epifaunal\n`);
    expect(res.body.checks.qualifiedHigherTaxa).toEqual([
      { name: "Anazygidae?", base: "Anazygidae", qualifier: "?", rows: 1, firstRow: 2 },
      { name: "cf. Orthida", base: "Orthida", qualifier: "cf.", rows: 1, firstRow: 3 },
    ]);
    await cast.people.coder.agent.post(`/api/studies/${study.studyId}/imports/${importId}/commit`).send({ mapping: templateMapping(study, ["life_habit"]), skipInvalid: false });
    expect((await liveTaxon(study.studyId, "Plaesiomys")).higherTaxon).toBe("Anazygidae?");

    const studyId = await cast.makeStudy();
    const upload = await uploadOccurrences(cast.people.coder.agent, studyId, "taxon,higher_taxon,max_ma,min_ma\nPlaesiomys,Anazygidae?,466,455\nPlaesiomys,Anazygidae?,460,455\n");
    const occ = await cast.people.coder.agent
      .post(`/api/studies/${studyId}/occurrence-uploads/${upload.body.upload.id}/preview`)
      .send({ mapping: { taxon: "taxon", higherTaxon: "higher_taxon", maxMa: "max_ma", minMa: "min_ma" } });
    expect(occ.body.checks.qualifiedHigherTaxa).toEqual([{ name: "Anazygidae?", base: "Anazygidae", qualifier: "?", rows: 2, firstRow: 2 }]);
  });
});
