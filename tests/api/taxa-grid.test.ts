// The grid's filter, sort and count come from a per-process copy of the study's columns. These
// tests hold that copy to two things a coder relies on: it answers exactly what a plain SQL query
// over the table answers (the oracle below states the grid's documented order and filters in SQL),
// and it is never stale: a change committed by anyone (another process writing directly, an import,
// a removal) is in the very next page, and a change not yet committed is not. All taxa are invented.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql, type SQL } from "drizzle-orm";
import request from "supertest";
import { createTestApp, PASSWORD, type TestApp } from "../support/server";
import { importCsv, studyWithCodebook, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";
import { commitOccurrences } from "../support/occurrences";
import { createUniformSource } from "@shared/stats/random";
import { randomUUID } from "node:crypto";
import { createTaxaGrid } from "../../server/services/taxaGrid";
import { loadCodebookById } from "../../server/services/codebookStore";
import { TAXA_MAX_BULK, taxaListQuerySchema } from "../../shared/schemas/taxa";

let app: TestApp;
let cast: Cast;
let study: CodebookStudy;

const TAXA = 240;

/** A deterministic invented file with ties, gaps, mixed-case names, intervals and empty cells. */
function inventedCsv(): string {
  const random = createUniformSource(6061);
  const pick = <T>(list: readonly T[]) => list[Math.floor(random() * list.length)];
  const lines = ["name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range"];
  for (let i = 0; i < TAXA; i++) {
    const fad = 70 + Math.floor(random() * 20);
    const ranges = random() < 0.2 ? ["Santonian", "Campanian"] : random() < 0.1 ? ["", ""] : [String(fad), String(fad - Math.floor(random() * 6))];
    lines.push(
      [
        `${pick(["Invented", "invented", "INVENTED"])}ella ${pick(["alba", "Borea", "cauda", "dorsa"])} ${String(i).padStart(3, "0")}`,
        random() < 0.15 ? "" : `Clade ${pick(["A", "B", "c", "D"])}`,
        ...ranges,
        random() < 0.1 ? "" : pick(["marine", "nonmarine"]),
        random() < 0.1 ? "" : pick(["epifaunal", "infaunal", "nektonic"]),
        random() < 0.1 ? "" : pick(["suspension", "deposit", "predator", "grazer"]),
        random() < 0.15 ? "" : pick(["1", "2.5", "2.5", "10", "40", "300"]), // ties on purpose
        random() < 0.15 ? "" : String(Math.floor(random() * 12)),
      ].join(","),
    );
  }
  return lines.join("\n");
}

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  study = await studyWithCodebook(app, cast, "Invented grid-copy study");
  const { commit } = await importCsv(cast.people.coder.agent, study, inventedCsv());
  if (commit.status !== 200) throw new Error(`test setup: import ${commit.status} ${JSON.stringify(commit.body)}`);
  const finds = await commitOccurrences(cast.people.coder.agent, study.studyId, await inventedFinds(), { fileName: "invented-grid-finds.csv" });
  if (finds.commit.status !== 200) throw new Error(`test setup: occurrences ${finds.commit.status} ${JSON.stringify(finds.commit.body)}`);
});

/**
 * Invented finds for about two taxa in three, 0 to 6 each, in 1 to 5 collections (some blank), so the
 * counts have ties, zeros and a finds count that differs from the collections count.
 */
async function inventedFinds(): Promise<string> {
  const random = createUniformSource(7177);
  const names = (await app.ctx.db.execute(sql`SELECT name FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL ORDER BY name`)).rows as Array<{ name: string }>;
  const lines = ["taxon,max_ma,min_ma,collection"];
  for (const { name } of names) {
    if (random() < 0.33) continue;
    const finds = Math.floor(random() * 7);
    for (let i = 0; i < finds; i++) lines.push(`${name},${80 - i},${79 - i},${random() < 0.2 ? "" : `C${Math.floor(random() * 5)}`}`);
  }
  return lines.join("\n");
}
afterAll(() => app.close());

interface GridQuery {
  filter?: string[];
  missing?: string[];
  sort?: string;
  dir?: "asc" | "desc";
}

async function gridIds(q: GridQuery, page = 1, pageSize = 500): Promise<{ ids: string[]; total: number }> {
  const params = new URLSearchParams({ page: String(page), pageSize: String(pageSize) });
  if (q.sort) params.set("sort", q.sort);
  if (q.dir) params.set("dir", q.dir);
  for (const f of q.filter ?? []) params.append("filter", f);
  for (const m of q.missing ?? []) params.append("missing", m);
  const res = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?${params}`);
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return { ids: (res.body.rows as Array<{ id: string }>).map((r) => r.id), total: res.body.total as number };
}

const TEXT_COLUMNS: Record<string, SQL> = {
  name: sql`t.name`,
  higherTaxon: sql`NULLIF(t.higher_taxon, '')`,
  fadInterval: sql`t.fad_interval`,
  ladInterval: sql`t.lad_interval`,
};

/** The grid's documented semantics as one SQL query: the oracle. */
async function oracleIds(q: GridQuery): Promise<string[]> {
  const where: SQL[] = [sql`t.study_id = ${study.studyId}`, sql`t.deleted_at IS NULL`];
  for (const f of q.filter ?? []) {
    const [column, op, value] = f.split(":");
    if (column === "name" || column === "higherTaxon") {
      const col = column === "name" ? sql`t.name` : sql`t.higher_taxon`;
      where.push(op === "contains" ? sql`${col} ILIKE ${`%${value}%`}` : sql`${col} = ${value}`);
    } else if (column === "fadMa" || column === "ladMa") {
      const col = column === "fadMa" ? sql`t.fad_ma` : sql`t.lad_ma`;
      where.push(op === "min" ? sql`${col} >= ${Number(value)}` : op === "max" ? sql`${col} <= ${Number(value)}` : sql`${col} = ${Number(value)}`);
    } else {
      const number = sql`(t.trait_values ->> ${column})::float8`;
      if (op === "eq" && Number.isNaN(Number(value))) where.push(sql`t.trait_values ->> ${column} = ${value}`);
      else where.push(op === "min" ? sql`${number} >= ${Number(value)}` : op === "max" ? sql`${number} <= ${Number(value)}` : sql`${number} = ${Number(value)}`);
    }
  }
  for (const m of q.missing ?? []) {
    if (m === "fad") where.push(sql`t.fad_ma IS NULL`);
    else if (m === "higherTaxon") where.push(sql`t.higher_taxon = ''`);
    else where.push(sql`NOT (t.trait_values ? ${m})`);
  }
  const sort = q.sort ?? "name";
  // A taxon's finds are the occurrences of the study whose taxon is its name; collections distinct and non-empty.
  const counted = {
    occurrences: sql`(SELECT count(*) FROM occurrences o WHERE o.study_id = t.study_id AND o.taxon = t.name)`,
    collections: sql`(SELECT count(DISTINCT o.collection) FROM occurrences o WHERE o.study_id = t.study_id AND o.taxon = t.name AND o.collection <> '')`,
  };
  const trait = Object.values(study.trait).find((t) => t.id === sort);
  const key = trait
    ? trait.kind === "numeric"
      ? sql`(t.trait_values ->> ${trait.id})::float8`
      : sql`array_position(${`{${trait.states.map((s) => s.code).join(",")}}`}::text[], t.trait_values ->> ${trait.id})`
    : sort === "occurrences" || sort === "collections"
      ? counted[sort]
      : sort in TEXT_COLUMNS
      ? sql`${TEXT_COLUMNS[sort]} COLLATE "C"`
      : sort === "fadMa"
        ? sql`t.fad_ma`
        : sql`t.lad_ma`;
  const dir = q.dir === "desc" ? sql`DESC` : sql`ASC`;
  const res = await app.ctx.db.execute(sql`SELECT t.id FROM taxa t WHERE ${sql.join(where, sql` AND `)} ORDER BY ${key} ${dir} NULLS LAST, t.name COLLATE "C", t.id`);
  return res.rows.map((r) => (r as { id: string }).id);
}

async function expectSameAsOracle(q: GridQuery): Promise<string[]> {
  const expected = await oracleIds(q);
  const got = await gridIds(q);
  expect(got.total).toBe(expected.length);
  expect(got.ids).toEqual(expected);
  return expected;
}

describe("the grid copy answers what SQL over the table answers", () => {
  it("for every sort column in both directions, unfiltered", async () => {
    const t = study.trait;
    for (const sort of ["name", "higherTaxon", "fadMa", "ladMa", "fadInterval", "occurrences", "collections", t.body_size.id, t.life_habit.id, t.environment.id]) {
      for (const dir of ["asc", "desc"] as const) await expectSameAsOracle({ sort, dir });
    }
  });

  it("for filters on text, ages, states, numeric bounds and missing values, alone and combined", async () => {
    const t = study.trait;
    const cases: GridQuery[] = [
      { filter: ["name:contains:ELLA B"], sort: t.body_size.id, dir: "desc" },
      { filter: ["name:contains:invented"], sort: "ladMa" },
      { filter: ["higherTaxon:eq:Clade c"], sort: t.feeding.id },
      { filter: ["fadMa:min:80", "fadMa:max:85"], sort: t.geographic_range.id, dir: "desc" },
      { filter: [`${t.life_habit.id}:eq:infaunal`], sort: t.body_size.id, dir: "desc" },
      { filter: [`${t.body_size.id}:eq:2.5`], sort: "name", dir: "desc" },
      { filter: [`${t.geographic_range.id}:min:3`, `${t.geographic_range.id}:max:7`, `${t.environment.id}:eq:marine`], sort: t.life_habit.id },
      { missing: [t.body_size.id], sort: t.life_habit.id, dir: "desc" },
      { missing: ["fad", "higherTaxon"] },
      { filter: [`${t.feeding.id}:eq:grazer`], missing: [t.geographic_range.id], sort: "fadMa", dir: "desc" },
    ];
    for (const q of cases) {
      const expected = await expectSameAsOracle(q);
      expect(expected.length, JSON.stringify(q)).toBeGreaterThan(0);
    }
  });

  it("pages are consecutive slices of the whole order", async () => {
    const q: GridQuery = { filter: [`${study.trait.environment.id}:eq:marine`], sort: study.trait.body_size.id, dir: "asc" };
    const whole = await oracleIds(q);
    const third = await gridIds(q, 3, 17);
    expect(third.total).toBe(whole.length);
    expect(third.ids).toEqual(whole.slice(34, 51));
    const beyond = await gridIds(q, 99, 17);
    expect(beyond).toEqual({ ids: [], total: whole.length });
  });
});

describe("the counts of finds and collections", () => {
  it("each row of a page carries its taxon's finds and distinct collections, as SQL counts them", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?pageSize=500`);
    expect(res.status).toBe(200);
    const expected = await app.ctx.db.execute(sql`SELECT t.id,
      (SELECT count(*) FROM occurrences o WHERE o.study_id = t.study_id AND o.taxon = t.name)::int AS occurrences,
      (SELECT count(DISTINCT o.collection) FROM occurrences o WHERE o.study_id = t.study_id AND o.taxon = t.name AND o.collection <> '')::int AS collections
      FROM taxa t WHERE t.study_id = ${study.studyId} AND t.deleted_at IS NULL`);
    const byId = new Map((expected.rows as Array<{ id: string; occurrences: number; collections: number }>).map((r) => [r.id, r]));
    const rows = res.body.rows as Array<{ id: string; occurrences: number; collections: number }>;
    expect(rows.length).toBe(byId.size);
    for (const row of rows) expect({ id: row.id, occurrences: row.occurrences, collections: row.collections }).toEqual(byId.get(row.id));
    // The invented finds give zeros, several finds, and fewer collections than finds somewhere.
    expect(rows.some((r) => r.occurrences === 0)).toBe(true);
    expect(rows.some((r) => r.occurrences >= 3)).toBe(true);
    expect(rows.some((r) => r.collections < r.occurrences && r.collections > 0)).toBe(true);
  });

  it("are read-only: a filter or a missing-value test on them is refused, naming the column", async () => {
    const filtered = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?filter=occurrences:min:2`);
    expect(filtered.status).toBe(400);
    expect(filtered.body.error.message).toContain("filter occurrences:min: min does not apply to occurrences");
    const missing = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa?missing=collections`);
    expect(missing.status).toBe(400);
    expect(missing.body.error.message).toContain("collections");
  });

  it("a sort by them follows a new upload, its revert and a rename at once", async () => {
    const [first] = (await app.ctx.db.execute(sql`SELECT name FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL ORDER BY name COLLATE "C" DESC LIMIT 1`)).rows as Array<{ name: string }>;
    await expectSameAsOracle({ sort: "occurrences", dir: "desc" });
    const many = ["taxon,max_ma,min_ma,collection", ...Array.from({ length: 40 }, (_, i) => `${first.name},75,74,X${i}`)].join("\n");
    const added = await commitOccurrences(cast.people.coder.agent, study.studyId, many, { fileName: "invented-many.csv" });
    expect(added.commit.status, JSON.stringify(added.commit.body)).toBe(200);
    const top = await expectSameAsOracle({ sort: "collections", dir: "desc" });
    const [topName] = (await app.ctx.db.execute(sql`SELECT name FROM taxa WHERE id = ${top[0]}`)).rows as Array<{ name: string }>;
    expect(topName.name).toBe(first.name);
    await expectSameAsOracle({ sort: "occurrences", dir: "desc" });
    // A rename takes the finds away from the row (they name the old name).
    const [row] = (await app.ctx.db.execute(sql`SELECT id FROM taxa WHERE study_id = ${study.studyId} AND name = ${first.name}`)).rows as Array<{ id: string }>;
    await app.ctx.db.execute(sql`UPDATE taxa SET name = ${`${first.name} renamed`} WHERE id = ${row.id}`);
    await expectSameAsOracle({ sort: "occurrences", dir: "desc" });
    await app.ctx.db.execute(sql`UPDATE taxa SET name = ${first.name} WHERE id = ${row.id}`);
    await expectSameAsOracle({ sort: "occurrences", dir: "desc" });
    const reverted = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/occurrence-uploads/${added.uploadId}/revert`).send({});
    expect(reverted.status, JSON.stringify(reverted.body)).toBe(200);
    await expectSameAsOracle({ sort: "occurrences", dir: "desc" });
    await expectSameAsOracle({ sort: "collections" });
  });
});

describe("selecting every matching taxon", () => {
  it("lists the ids of every taxon the filters match, in the grid's order, beyond one page", async () => {
    const q: GridQuery = { filter: [`${study.trait.environment.id}:eq:marine`], sort: study.trait.body_size.id, dir: "desc" };
    const expected = await oracleIds(q);
    expect(expected.length).toBeGreaterThan(100);
    const params = new URLSearchParams({ sort: q.sort!, dir: q.dir! });
    for (const f of q.filter!) params.append("filter", f);
    const res = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa/ids?${params}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toEqual({ ids: expected, total: expected.length });
  });

  it("refuses, saying how many match, when more taxa match than one bulk edit takes", async () => {
    const crowded = await studyWithCodebook(app, cast, "Invented crowded study");
    await app.ctx.db.execute(
      sql`INSERT INTO taxa (study_id, name) SELECT ${crowded.studyId}, 'Invented crowd ' || lpad(g::text, 5, '0') FROM generate_series(1, ${TAXA_MAX_BULK + 1}) g`,
    );
    const res = await cast.people.viewer.agent.get(`/api/studies/${crowded.studyId}/taxa/ids`);
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe("20,001 taxa match; one bulk edit takes at most 20,000. Narrow the filter.");
    const fewer = await cast.people.viewer.agent.get(`/api/studies/${crowded.studyId}/taxa/ids?filter=name:contains:crowd 0000`);
    // By construction: "crowd 0000" is in the names 00001 to 00009 only.
    expect(fewer.body).toMatchObject({ total: 9 });
  });
});

describe("the grid copy is never stale", () => {
  const size = () => study.trait.body_size.id;
  const bigFirst = async () => (await gridIds({ sort: size(), dir: "desc" }, 1, 1)).ids[0];

  it("sees a change another process commits directly in the database", async () => {
    const before = await gridIds({ filter: [`${size()}:min:5000`] });
    expect(before.total).toBe(0);
    const [victim] = (await app.ctx.db.execute(sql`SELECT id FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL ORDER BY name LIMIT 1`)).rows as Array<{ id: string }>;
    await app.ctx.db.execute(sql`UPDATE taxa SET trait_values = trait_values || jsonb_build_object(${size()}::text, 9000) WHERE id = ${victim.id}`);
    expect(await gridIds({ filter: [`${size()}:min:5000`] })).toEqual({ ids: [victim.id], total: 1 });
    expect(await bigFirst()).toBe(victim.id);
  });

  it("does not show a change until its transaction commits, then shows it at once", async () => {
    const client = await app.ctx.database.pool.connect();
    try {
      const [victim] = (await app.ctx.db.execute(sql`SELECT id FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL ORDER BY name DESC LIMIT 1`)).rows as Array<{ id: string }>;
      await client.query("BEGIN");
      await client.query(`UPDATE taxa SET trait_values = trait_values || jsonb_build_object($1::text, 12345) WHERE id = $2`, [size(), victim.id]);
      expect(await bigFirst()).not.toBe(victim.id);
      await client.query("COMMIT");
      expect(await bigFirst()).toBe(victim.id);
    } finally {
      client.release();
    }
  });

  it("follows a new taxon, a rename and a removal through the API, in name order and count", async () => {
    const before = await gridIds({});
    const created = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Aaa invented first" });
    expect(created.status).toBe(201);
    const id = created.body.taxon.id as string;
    let now = await gridIds({});
    expect(now.total).toBe(before.total + 1);
    expect(now.ids[0]).toBe(id);
    const renamed = await cast.people.coder.agent
      .patch(`/api/studies/${study.studyId}/taxa/${id}`)
      .send({ version: created.body.taxon.version, changes: { name: "zzz invented last" }, reason: "moved to the end" });
    expect(renamed.status).toBe(200);
    now = await gridIds({});
    expect(now.ids.at(-1)).toBe(id);
    await expectSameAsOracle({});
    const removed = await cast.people.coder.agent.delete(`/api/studies/${study.studyId}/taxa/${id}?version=${renamed.body.taxon.version}&reason=Duplicate`);
    expect(removed.status).toBe(204);
    now = await gridIds({});
    expect(now.total).toBe(before.total);
    expect(now.ids).not.toContain(id);
  });

  it("keeps every sorted order it holds right through a handful of edits (merged in, not re-sorted)", async () => {
    const t = study.trait;
    const sorts: GridQuery[] = [
      { sort: t.body_size.id },
      { sort: t.life_habit.id, dir: "desc" },
      { sort: "higherTaxon" },
      { sort: "fadMa", dir: "desc" },
      { sort: "name", dir: "desc" },
      { sort: "name", filter: ["name:contains:ORE"] },
    ];
    for (const q of sorts) await expectSameAsOracle(q);
    const rows = (await app.ctx.db.execute(sql`SELECT id FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL ORDER BY id LIMIT 5`)).rows as Array<{ id: string }>;
    const [a, b, c, d, e] = rows.map((r) => r.id);
    await app.ctx.db.execute(sql`UPDATE taxa SET trait_values = trait_values - ${t.body_size.id} WHERE id = ${a}`);
    await app.ctx.db.execute(sql`UPDATE taxa SET trait_values = trait_values || jsonb_build_object(${t.life_habit.id}::text, 'nektonic') WHERE id = ${b}`);
    await app.ctx.db.execute(sql`UPDATE taxa SET higher_taxon = '', fad_ma = 99.5, name = 'Borea invented renamed' WHERE id = ${c}`);
    await app.ctx.db.execute(sql`UPDATE taxa SET deleted_at = now() WHERE id = ${d}`);
    await app.ctx.db.execute(sql`UPDATE taxa SET trait_values = trait_values || jsonb_build_object(${t.body_size.id}::text, 2.5), fad_ma = NULL WHERE id = ${e}`);
    for (const q of sorts) await expectSameAsOracle(q);
  });

  it("reads the study again whole when most of it changed, and still agrees with SQL", async () => {
    await gridIds({});
    await app.ctx.db.execute(sql`UPDATE taxa SET trait_values = trait_values || jsonb_build_object(${study.trait.geographic_range.id}::text, 11 - (trait_values ->> ${study.trait.geographic_range.id})::float8)
      WHERE study_id = ${study.studyId} AND trait_values ? ${study.trait.geographic_range.id}`);
    await expectSameAsOracle({ sort: study.trait.geographic_range.id });
    await expectSameAsOracle({ sort: study.trait.geographic_range.id, dir: "desc", filter: [`${study.trait.geographic_range.id}:max:4`] });
  });

  it("a second app process (its own copy) sees the first one's edits", async () => {
    const other = await createTestApp();
    try {
      const viewer = request.agent(other.app);
      const login = await viewer.post("/api/auth/login").send({ email: cast.people.viewer.email, password: PASSWORD });
      expect(login.status, JSON.stringify(login.body)).toBe(200);
      const viaOther = async () => {
        const res = await viewer.get(`/api/studies/${study.studyId}/taxa?sort=${size()}&dir=desc&pageSize=1`);
        expect(res.status, JSON.stringify(res.body)).toBe(200);
        return (res.body.rows as Array<{ id: string; version: number }>)[0];
      };
      const top = await viaOther();
      const [next] = (await app.ctx.db.execute(sql`SELECT id, version FROM taxa WHERE study_id = ${study.studyId} AND deleted_at IS NULL AND id <> ${top.id} ORDER BY name LIMIT 1`)).rows as Array<{ id: string; version: number }>;
      const edit = await cast.people.coder.agent
        .patch(`/api/studies/${study.studyId}/taxa/${next.id}`)
        .send({ version: next.version, changes: { values: { [size()]: 99999 } }, reason: "largest now" });
      expect(edit.status, JSON.stringify(edit.body)).toBe(200);
      expect((await viaOther()).id).toBe(next.id);
    } finally {
      await other.close();
    }
  });
});

describe("the grid copies' memory and log upkeep", () => {
  it("drops the least recently used study's copy beyond GRID_MAX_TAXA and reads it again when asked", async () => {
    const other = await studyWithCodebook(app, cast, "Invented second grid-copy study");
    const { commit } = await importCsv(
      cast.people.coder.agent,
      other,
      ["name,higher_taxon,first_appearance,last_appearance,environment,life_habit,feeding,body_size,geographic_range", "Invented one,,,,,,,,", "Invented two,,,,,,,,", "Invented three,,,,,,,,"].join("\n"),
    );
    expect(commit.status).toBe(200);
    const grid = createTaxaGrid(app.ctx.db, { maxTaxa: 100 });
    const codebookOf = (s: CodebookStudy) => loadCodebookById(app.ctx.db, s.studyId);
    const everything = taxaListQuerySchema.parse({ pageSize: "500" });
    const first = await grid.page(study.studyId, everything, await codebookOf(study));
    expect(grid.heldTaxa()).toBe(first.total);
    const second = await grid.page(other.studyId, everything, await codebookOf(other));
    expect(second.total).toBe(3);
    // Both would exceed the limit, so the first study's copy went (a single study is always kept).
    expect(grid.heldTaxa()).toBe(3);
    expect(await grid.page(study.studyId, everything, await codebookOf(study))).toEqual(first);
    expect(grid.heldTaxa()).toBe(first.total);
  });

  it("prunes log entries older than six hours and keeps recent ones", async () => {
    const grid = createTaxaGrid(app.ctx.db);
    const studyId = randomUUID();
    await app.ctx.db.execute(sql`INSERT INTO taxa_changes (study_id, taxon_id, changed_at) VALUES
      (${studyId}, ${randomUUID()}, now() - interval '7 hours'), (${studyId}, ${randomUUID()}, now() - interval '5 hours')`);
    await grid.prune();
    const left = await app.ctx.db.execute(sql`SELECT changed_at > now() - interval '6 hours' AS recent FROM taxa_changes WHERE study_id = ${studyId}`);
    expect(left.rows).toEqual([{ recent: true }]);
  });
});
