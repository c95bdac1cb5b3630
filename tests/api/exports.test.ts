// CSV downloads: the template from the codebook, the table in wide and tidy long forms with the
// codebook as a second file, cells neutralised against formula injection (OWASP "CSV Injection":
// text starting with = + - @ tab or CR gets a leading '), and a round trip through the importer.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseCsv } from "../../shared/csv/parse";
import { createTestApp, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, templateMapping, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

let app: TestApp;
let cast: Cast;
let study: CodebookStudy;
beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  study = await studyWithCodebook(app, cast, "Invented Export Basin");
  const rows = [
    "name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range",
    "Betella,=HYPERLINK(1),80,70,marine,infaunal,deposit,4,2",
    'Alphella,"Invented A, north",Campanian,Maastrichtian,marine,epifaunal,suspension,12.5,3',
  ];
  const { commit } = await importCsv(cast.people.coder.agent, study, rows.join("\n"));
  if (commit.status !== 200) throw new Error(`test setup: ${JSON.stringify(commit.body)}`);
});
afterAll(() => app.close());

const get = (path: string) => cast.people.viewer.agent.get(`/api/studies/${study.studyId}/exports/${path}`).buffer(true);

describe("exports", () => {
  it("the template has the taxon columns and one column per active trait, and nothing else", async () => {
    const res = await get("template.csv");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/csv/);
    expect(res.headers["content-disposition"]).toBe('attachment; filename="invented-export-basin-template.csv"');
    expect(res.text).toBe("name,higher_taxon,first_appearance,last_appearance,notes,environment,life_habit,feeding,body_size,geographic_range\r\n");
  });

  it("the wide form has one row per taxon by name, numbers as numbers and formula-like text neutralised", async () => {
    const res = await get("taxa.csv?form=wide");
    const parsed = parseCsv(res.text);
    expect(parsed.header).toEqual(["name", "higher_taxon", "fad_ma", "lad_ma", "fad_interval", "lad_interval", "notes", "environment", "life_habit", "feeding", "body_size", "geographic_range"]);
    expect(parsed.rows.map((r) => r.cells)).toEqual([
      // Campanian base 83.6 Ma, Maastrichtian top 66.0 Ma (ICS chart v2024/12, Cohen et al. 2025).
      ["Alphella", "Invented A, north", "83.6", "66", "Campanian", "Maastrichtian", "", "marine", "epifaunal", "suspension", "12.5", "3"],
      ["Betella", "'=HYPERLINK(1)", "80", "70", "", "", "", "marine", "infaunal", "deposit", "4", "2"],
    ]);
  });

  it("the long form has one row per taxon and trait, missing values as empty cells", async () => {
    const res = await get("taxa.csv?form=long");
    const parsed = parseCsv(res.text);
    expect(parsed.header).toEqual(["name", "higher_taxon", "fad_ma", "lad_ma", "trait", "kind", "value", "unit"]);
    expect(parsed.rows).toHaveLength(2 * 5);
    expect(parsed.rows.slice(0, 5).map((r) => [r.cells[0], r.cells[4], r.cells[6], r.cells[7]])).toEqual([
      ["Alphella", "environment", "marine", ""],
      ["Alphella", "life_habit", "epifaunal", ""],
      ["Alphella", "feeding", "suspension", ""],
      ["Alphella", "body_size", "12.5", "mm"],
      ["Alphella", "geographic_range", "3", "regions"],
    ]);
  });

  it("the codebook file has one row per state, and a numeric trait one row with its unit", async () => {
    const parsed = parseCsv((await get("codebook.csv")).text);
    const life = parsed.rows.filter((r) => r.cells[0] === "life_habit").map((r) => r.cells[10]);
    expect(life).toEqual(["epifaunal", "infaunal", "nektonic", "planktonic", "terrestrial"]);
    const size = parsed.rows.filter((r) => r.cells[0] === "body_size");
    expect(size).toHaveLength(1);
    expect(size[0].cells.slice(0, 9)).toEqual(["body_size", "Body size", "numeric", "ecology", "mm", "log10", "0", "", "false"]);
  });

  it("a wide export imports back into a new study unchanged", async () => {
    const wide = (await get("taxa.csv?form=wide")).text.replace("'=HYPERLINK", "=HYPERLINK");
    const copy = await studyWithCodebook(app, cast);
    const mapping = { ...templateMapping(copy), firstAppearance: "fad_ma", lastAppearance: "lad_ma" };
    const { commit } = await importCsv(cast.people.coder.agent, copy, wide, { mapping });
    expect(commit.body).toMatchObject({ status: "committed", createdCount: 2 });
    const strip = (text: string) => parseCsv(text).rows.map((r) => [...r.cells.slice(0, 4), ...r.cells.slice(7)]);
    const again = (await cast.people.viewer.agent.get(`/api/studies/${copy.studyId}/exports/taxa.csv?form=wide`).buffer(true)).text;
    expect(strip(again)).toEqual(strip((await get("taxa.csv?form=wide")).text));
  });
});
