// The invented demo study written into the real database: accounts in every role that can sign
// in, a trait table equal to the generated data with an honest audit trail, threads, the modern
// list, and the guarantee that none of it is ever created with NODE_ENV=production.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { randomUUID } from "node:crypto";
import pg from "pg";
import { and, count, eq, inArray, isNull } from "drizzle-orm";
import { activity, codingDecisions, imports, memberships, modernLists, modernSpecies, studies, taxa, threadPosts, threads, traits, users } from "../../db/schema/index";
import { runMigrations } from "../../db/migrate";
import { seedIfEmpty } from "../../scripts/seed/seed";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { generateDemoStudy, IUCN_CATEGORIES } from "../../scripts/seed/demo/generator";
import { DEMO_OCCURRENCE_FILE, DEMO_POORLY_SAMPLED_STAGE, generateDemoOccurrences } from "../../scripts/seed/demo/occurrences";
import { STUDY_ROLES } from "../../shared/roles";
import { SUGGESTED_CODEBOOK } from "../../shared/codebook";
import { passwordSchema } from "../../shared/schemas/auth";
import { createTestApp, uniqueEmail, type TestApp } from "../support/server";

let app: TestApp;
const data = generateDemoStudy();
// Unique addresses: the test database is shared by every API test file.
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`demo-${a.role}`) }));
let seeded: DemoSeedResult;

beforeAll(async () => {
  app = await createTestApp();
  seeded = await seedDemo(app.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
});
afterAll(() => app.close());

describe("seedDemo", () => {
  it("makes one member per role, and each demo account signs in with its printed password and sees the study", async () => {
    const rows = await app.ctx.db.select({ role: memberships.role, userId: memberships.userId }).from(memberships).where(eq(memberships.studyId, seeded.studyId));
    expect(rows.map((r) => r.role).sort()).toEqual([...STUDY_ROLES].sort());
    expect(seeded.createdAccounts.map((a) => a.email).sort()).toEqual(accounts.map((a) => a.email).sort());
    for (const account of accounts) {
      const agent = request.agent(app.app);
      const login = await agent.post("/api/auth/login").send({ email: account.email, password: account.password });
      expect(login.status, account.email).toBe(200);
      const list = await agent.get("/api/studies");
      const study = list.body.studies.find((s: { id: string }) => s.id === seeded.studyId);
      expect(study, account.email).toMatchObject({ name: data.study.name, role: account.role, memberCount: 5 });
    }
  });

  it("gives every demo account a password the sign-up form would accept", () => {
    expect(DEMO_ACCOUNTS.map((a) => a.role).sort()).toEqual([...STUDY_ROLES].sort());
    for (const account of DEMO_ACCOUNTS) expect(passwordSchema.safeParse(account.password).success, account.email).toBe(true);
  });

  it("marks the study as invented", async () => {
    const [study] = await app.ctx.db.select().from(studies).where(eq(studies.id, seeded.studyId));
    expect(study.name).toMatch(/invented/);
    expect(study.description).toMatch(/^Invented demonstration data/);
  });

  it("stores the generated trait table with values keyed by the study's trait ids", async () => {
    const traitRows = await app.ctx.db.select().from(traits).where(eq(traits.studyId, seeded.studyId));
    expect(traitRows.map((t) => t.key).sort()).toEqual(SUGGESTED_CODEBOOK.map((t) => t.key).sort());
    const keyOf = new Map(traitRows.map((t) => [t.id, t.key]));
    const rows = await app.ctx.db.select().from(taxa).where(and(eq(taxa.studyId, seeded.studyId), isNull(taxa.deletedAt)));
    expect(rows).toHaveLength(data.taxa.length);
    expect(seeded.counts.taxa).toBe(data.taxa.length);
    const byName = new Map(rows.map((r) => [r.name, r]));
    for (const t of data.taxa) {
      const row = byName.get(t.name)!;
      const values = Object.fromEntries(Object.entries(row.traitValues).map(([id, v]) => [keyOf.get(id), v]));
      expect({ higherTaxon: row.higherTaxon, fad: row.fadMa, lad: row.ladMa, fadInterval: row.fadInterval, ladInterval: row.ladInterval, notes: row.notes, values }).toEqual({
        higherTaxon: t.higherTaxon,
        fad: t.fadMa,
        lad: t.ladMa,
        fadInterval: t.fadInterval ?? null,
        ladInterval: t.ladInterval ?? null,
        notes: t.notes,
        values: t.values,
      });
    }
  });

  it("records one import decision per taxon and the later edits with their reasons", async () => {
    const [taxaImport] = await app.ctx.db.select().from(imports).where(and(eq(imports.studyId, seeded.studyId), eq(imports.target, "taxa")));
    expect(taxaImport).toMatchObject({ status: "committed", rowCount: data.taxa.length, createdCount: data.taxa.length });
    const decisions = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.studyId, seeded.studyId));
    const creates = decisions.filter((d) => d.action === "create");
    expect(creates).toHaveLength(data.taxa.length);
    expect(new Set(creates.map((d) => d.taxonId)).size).toBe(data.taxa.length);
    expect(creates.every((d) => d.importId === taxaImport.id && d.field === "taxon")).toBe(true);

    const updates = decisions.filter((d) => d.action === "update");
    expect(updates.length).toBeGreaterThanOrEqual(2);
    expect(seeded.counts.decisions).toBe(decisions.length);
    const edited = await app.ctx.db.select().from(taxa).where(inArray(taxa.id, updates.map((u) => u.taxonId!)));
    for (const update of updates) {
      expect(update.reason.length).toBeGreaterThan(10);
      const row = edited.find((r) => r.id === update.taxonId)!;
      expect(row.version).toBe(2);
      // The edit wrote the value the taxon holds now, and the import held the old one.
      const importedSnapshot = creates.find((c) => c.taxonId === update.taxonId)!.newValue as { values: Record<string, unknown>; lad: unknown };
      if (update.traitId) {
        expect(row.traitValues[update.traitId]).toBe(update.newValue);
        expect(importedSnapshot.values[update.traitId]).toBe(update.oldValue);
      } else {
        expect(update.field).toBe("lad");
        expect((update.newValue as { ma: number }).ma).toBe(row.ladMa);
        expect(importedSnapshot.lad).toEqual(update.oldValue);
      }
    }
  });

  it("opens threads on coding decisions, one resolved by the edit it asked for", async () => {
    const rows = await app.ctx.db.select().from(threads).where(eq(threads.studyId, seeded.studyId));
    expect(rows.length).toBeGreaterThanOrEqual(3);
    const resolved = rows.filter((t) => t.status === "resolved");
    expect(resolved).toHaveLength(1);
    const [decision] = await app.ctx.db.select().from(codingDecisions).where(eq(codingDecisions.id, resolved[0].resolutionDecisionId!));
    expect(decision.action).toBe("update");
    expect(decision.taxonId).toBe(resolved[0].targetId);
    expect(decision.traitId).toBe(resolved[0].traitId);
    const [{ n }] = await app.ctx.db.select({ n: count() }).from(threadPosts).where(inArray(threadPosts.threadId, rows.map((t) => t.id)));
    expect(n).toBe(seeded.counts.posts);
    expect(n).toBeGreaterThanOrEqual(rows.length * 2);
  });

  it("stores the invented modern list with its columns and IUCN 3.1 categories", async () => {
    const [list] = await app.ctx.db.select().from(modernLists).where(eq(modernLists.studyId, seeded.studyId));
    expect(list.name).toMatch(/invented/);
    expect(list.speciesCount).toBe(data.modernList.species.length);
    expect(list.columns.map((c) => c.name).sort()).toEqual(["diet", "ecoregions", "habitat", "length_mm", "position"]);
    expect(list.columns.find((c) => c.name === "habitat")!.values).toEqual(["freshwater", "land", "sea"]);
    const species = await app.ctx.db.select().from(modernSpecies).where(eq(modernSpecies.listId, list.id));
    expect(species).toHaveLength(data.modernList.species.length);
    expect(species.every((s) => (IUCN_CATEGORIES as readonly string[]).includes(s.category) && s.name.endsWith("(invented)"))).toBe(true);
  });

  it("stores the invented finds as one committed upload, from which the trait table's ranges derive unchanged", async () => {
    const finds = generateDemoOccurrences(data);
    const [upload] = await app.ctx.db.select().from(imports).where(and(eq(imports.studyId, seeded.studyId), eq(imports.target, "occurrences")));
    expect(upload).toMatchObject({ fileName: DEMO_OCCURRENCE_FILE, status: "committed", createdCount: finds.length });
    expect(upload.fileName).toMatch(/invented/);
    expect(seeded.counts.occurrences).toBe(finds.length);
    const agent = request.agent(app.app);
    const analyst = accounts.find((a) => a.role === "analyst")!;
    expect((await agent.post("/api/auth/login").send({ email: analyst.email, password: analyst.password })).status).toBe(200);
    // The preview through the API: nothing would change, no new taxa; the 7 genera without a compiled range have no finds.
    const preview = await agent.post(`/api/studies/${seeded.studyId}/occurrences/ranges/preview`).send({ ageMode: "bounds", maxSpanMyr: null });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    const withoutRange = data.taxa.filter((t) => t.fadMa === null || t.ladMa === null).map((t) => t.name);
    expect(preview.body).toMatchObject({ changes: [], newTaxa: [], unchanged: data.taxa.length - withoutRange.length, occurrenceCount: finds.length });
    expect((preview.body.withoutOccurrences as Array<{ name: string }>).map((t) => t.name).sort()).toEqual([...withoutRange].sort());
    // Sampling at the crisis boundary (base of the Turonian) is good; the Coniacian is poorly sampled on purpose.
    const sampling = await agent.get(`/api/studies/${seeded.studyId}/occurrences/three-timer?boundaryMa=${data.plantedEffects.boundary.ageMa}`);
    expect(sampling.status).toBe(200);
    expect(sampling.body.boundary).toMatchObject({ below: { bin: "Cenomanian" }, above: { bin: "Turonian" }, warnings: [] });
    const poor = (sampling.body.stages as Array<{ bin: string; samplingCompleteness: number | null }>).find((s) => s.bin === DEMO_POORLY_SAMPLED_STAGE)!;
    expect(poor.samplingCompleteness).toBeLessThan(0.5);
    // The trait table counts each genus's finds.
    const page = await agent.get(`/api/studies/${seeded.studyId}/taxa?sort=occurrences&dir=desc&pageSize=5`);
    expect(page.status).toBe(200);
    const top = page.body.rows[0] as { name: string; occurrences: number; collections: number };
    expect(top.occurrences).toBe(finds.filter((f) => f.taxon === top.name).length);
    expect(top.collections).toBe(new Set(finds.filter((f) => f.taxon === top.name).map((f) => f.collection)).size);
  });

  it("writes the activity feed", async () => {
    const rows = await app.ctx.db.select({ kind: activity.kind }).from(activity).where(eq(activity.studyId, seeded.studyId));
    const kinds = rows.map((r) => r.kind);
    expect(kinds.filter((k) => k === "member.joined")).toHaveLength(4);
    expect(kinds).toContain("import.committed");
    expect(kinds).toContain("occurrences.committed");
    expect(kinds).toContain("thread.resolved");
  });

  it("reuses existing demo accounts on a second call and makes a new study", async () => {
    const again = await seedDemo(app.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
    expect(again.createdAccounts).toEqual([]);
    expect(again.userIds).toEqual(seeded.userIds);
    expect(again.studyId).not.toBe(seeded.studyId);
    const [{ n }] = await app.ctx.db.select({ n: count() }).from(users).where(inArray(users.email, accounts.map((a) => a.email)));
    expect(n).toBe(accounts.length);
  });

  it("refuses with NODE_ENV=production and writes nothing", async () => {
    const others = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`prod-${a.role}`) }));
    const [{ n: before }] = await app.ctx.db.select({ n: count() }).from(studies);
    await expect(seedDemo(app.ctx.db, { data, accounts: others, env: { NODE_ENV: "production" } })).rejects.toThrow(/NODE_ENV=production/);
    const [{ n: after }] = await app.ctx.db.select({ n: count() }).from(studies);
    expect(after).toBe(before);
    const [{ n: made }] = await app.ctx.db.select({ n: count() }).from(users).where(inArray(users.email, others.map((a) => a.email)));
    expect(made).toBe(0);
  });
});

describe("seedIfEmpty on a new database", () => {
  // A database of its own, since the shared test database already has accounts.
  const name = `demo_seed_${randomUUID().slice(0, 8)}`;
  let admin: pg.Client;
  let url: string;
  beforeAll(async () => {
    admin = new pg.Client({ connectionString: process.env.DATABASE_URL });
    await admin.connect();
    await admin.query(`CREATE DATABASE "${name}"`);
    const parsed = new URL(process.env.DATABASE_URL!);
    parsed.pathname = `/${name}`;
    url = parsed.toString();
    await runMigrations(url);
  });
  afterAll(async () => {
    await admin.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await admin.end();
  });

  async function countIn(table: "users" | "studies"): Promise<number> {
    const client = new pg.Client({ connectionString: url });
    await client.connect();
    try {
      return Number((await client.query(`SELECT count(*) AS n FROM ${table}`)).rows[0].n);
    } finally {
      await client.end();
    }
  }

  it("never creates the demo with NODE_ENV=production, and creates it otherwise, printing the accounts", async () => {
    const productionLines = await seedIfEmpty(url, { NODE_ENV: "production" });
    expect(productionLines.join("\n")).not.toMatch(/demo/i);
    expect(await countIn("users")).toBe(0);
    expect(await countIn("studies")).toBe(0);

    const lines = await seedIfEmpty(url, { NODE_ENV: "development" });
    expect(await countIn("users")).toBe(DEMO_ACCOUNTS.length);
    expect(await countIn("studies")).toBe(1);
    const printed = lines.join("\n");
    expect(printed).toMatch(/invented/);
    for (const account of DEMO_ACCOUNTS) {
      expect(printed).toContain(account.email);
      expect(printed).toContain(`password: ${account.password}`);
    }

    // Later starts seed nothing more but still remind of the accounts.
    const later = await seedIfEmpty(url, { NODE_ENV: "development" });
    expect(await countIn("studies")).toBe(1);
    expect(later.join("\n")).toContain(DEMO_ACCOUNTS[0].email);
    expect((await seedIfEmpty(url, { NODE_ENV: "production" })).join("\n")).not.toMatch(/password/);
  });
});
