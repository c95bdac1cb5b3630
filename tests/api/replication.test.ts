// A saved run re-checked outside the app: the download holds the exact rows the run analysed and
// an R script that recomputes the numbers with base R's own functions (fisher.test,
// mantelhaen.test, glm, p.adjust). Run on the demo's crisis run, R must agree with the app to
// 1e-6 relative wherever both compute the same quantity by the same method.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import request from "supertest";
import { unzipSync, strFromU8 } from "fflate";
import Papa from "papaparse";
import { eq } from "drizzle-orm";
import { taxa } from "../../db/schema/index";
import { DEMO_ACCOUNTS, seedDemo, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import type { Run } from "../../shared/schemas/runs";
import { createTestApp, uniqueEmail, type TestApp } from "../support/server";

const accounts = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`replication-${a.role}`) }));
const rscript = spawnSync("Rscript", ["--version"]).status === 0;
// CI installs R from Debian (r-base-core, in .ci/run); a developer without it is told, not failed.
const needR = rscript || process.env.CI === "true";

let app: TestApp;
let seeded: DemoSeedResult;
let analyst: ReturnType<typeof request.agent>;
let crisisRun: Run;
let files: Record<string, string>;
let work: string;

/** supertest collects a binary body as a Buffer with this parser. */
function binary(res: NodeJS.ReadableStream, done: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = [];
  res.on("data", (c: Buffer) => chunks.push(c));
  res.on("end", () => done(null, Buffer.concat(chunks)));
}

beforeAll(async () => {
  app = await createTestApp();
  seeded = await seedDemo(app.ctx.db, { accounts, env: { NODE_ENV: "test" } });
  analyst = request.agent(app.app);
  const account = accounts.find((a) => a.role === "analyst")!;
  expect((await analyst.post("/api/auth/login").send({ email: account.email, password: account.password })).status).toBe(200);
  crisisRun = (await analyst.get(`/api/studies/${seeded.studyId}/runs/${seeded.analyses.crisisRunId}`)).body as Run;
  const res = await analyst.get(`/api/studies/${seeded.studyId}/runs/${crisisRun.id}/replication.zip`).buffer(true).parse(binary as never);
  expect(res.status, String(res.body)).toBe(200);
  expect(res.headers["content-type"]).toMatch(/application\/zip/);
  const unzipped = unzipSync(new Uint8Array(res.body as Buffer));
  files = Object.fromEntries(Object.entries(unzipped).map(([name, bytes]) => [name.split("/").pop()!, strFromU8(bytes)]));
  work = mkdtempSync(join(tmpdir(), "stratasieve-rerun-"));
  for (const [name, text] of Object.entries(files)) writeFileSync(join(work, name), text);
}, 180_000);
afterAll(async () => {
  if (work && !process.env.KEEP_RERUN_DIR) rmSync(work, { recursive: true, force: true });
  await app?.close();
});

const parse = (text: string) => Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;

describe("the re-run download of a saved run", () => {
  it("holds the exact rows the run analysed, its parameters, its results and the script", () => {
    expect(Object.keys(files).sort()).toEqual(["README.txt", "app-results.csv", "model-columns.csv", "rerun.R", "rows.csv", "run.json", "settings.csv", "traits.csv"]);
    const rows = parse(files["rows.csv"]);
    // One row per taxon at risk at each boundary: the run's own row count.
    expect(rows.length).toBe(crisisRun.rowCount);
    const first = crisisRun.results!.boundaries[0];
    const atFirst = rows.filter((r) => r.boundary === "1");
    expect(atFirst.filter((r) => r.outcome === "1").length).toBe(first.victims);
    expect(atFirst.filter((r) => r.outcome === "0").length).toBe(first.survivors);
    for (const t of crisisRun.results!.traits) expect(Object.keys(rows[0])).toContain(t.key);
    expect(JSON.parse(files["run.json"]).id).toBe(crisisRun.id);
    expect(parse(files["settings.csv"]).find((r) => r.field === "data_hash_sha256")!.value).toBe(crisisRun.dataHash);
  });

  it.runIf(needR)("recomputes the app's numbers with base R and agrees to 1e-6 relative wherever both use the same method", () => {
    const r = spawnSync("Rscript", ["rerun.R", work], { cwd: work, encoding: "utf8", timeout: 120_000 });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/Compared \d+ numbers; largest relative difference/);
    const comparison = parse(readFileSync(join(work, "comparison.csv"), "utf8"));
    const compared = comparison.filter((c) => c.status === "compared");
    // Every kind of quantity the script promises is compared on the demo's crisis run.
    for (const quantity of ["crude_or", "crude_ci_low", "crude_ci_high", "clade_adjusted_or", "clade_adjusted_ci_low", "test_p", "adjusted_p", "coefficient", "coefficient_se"]) {
      expect(compared.some((c) => c.quantity === quantity), `${quantity} compared`).toBe(true);
    }
    const disagreeing = compared.filter((c) => !(Number(c.relative_difference) <= 1e-6));
    expect(disagreeing, JSON.stringify(disagreeing.slice(0, 5))).toEqual([]);
    // What R does not recompute is said, with the reason.
    for (const c of comparison.filter((x) => x.status !== "compared")) expect(c.status).toMatch(/^not compared: .+/);
    console.log(`[replication] R recomputed ${compared.length} numbers of the demo's crisis run; ${comparison.length - compared.length} not compared`);
  });

  it.runIf(needR)("lists a test R's fisher.test cannot finish as not compared, with R's reason, and still compares the rest", () => {
    // The same script with a workspace far too small, so R's network algorithm gives up on every
    // table larger than 2 x 2 at once, as it does with the full workspace on some large tables.
    const cramped = mkdtempSync(join(tmpdir(), "stratasieve-rerun-cramped-"));
    try {
      for (const [name, text] of Object.entries(files)) writeFileSync(join(cramped, name), name === "rerun.R" ? text.replace("workspace = 2e8", "workspace = 10") : text);
      expect(readFileSync(join(cramped, "rerun.R"), "utf8")).toContain("workspace = 10");
      const r = spawnSync("Rscript", ["rerun.R", cramped], { cwd: cramped, encoding: "utf8", timeout: 120_000 });
      expect(r.status, r.stderr).toBe(0);
      const comparison = parse(readFileSync(join(cramped, "comparison.csv"), "utf8"));
      const unfinished = comparison.filter((c) => c.quantity === "test_p" && /fisher\.test did not finish/.test(c.status));
      expect(unfinished.length).toBeGreaterThan(0);
      for (const c of unfinished) {
        expect(comparison.find((x) => x.trait === c.trait && x.boundary === c.boundary && x.quantity === "adjusted_p")!.status).toMatch(/^not compared: stats::fisher\.test did not finish/);
      }
      // The other traits' adjusted p-values still agree: the app's p-value stood in for the missing one.
      const adjusted = comparison.filter((c) => c.quantity === "adjusted_p" && c.status === "compared");
      expect(adjusted.length).toBeGreaterThan(0);
      for (const c of adjusted) expect(Number(c.relative_difference)).toBeLessThanOrEqual(1e-6);
    } finally {
      rmSync(cramped, { recursive: true, force: true });
    }
  });

  it("is refused with the reason once the study's data changed since the run", async () => {
    const [one] = await app.ctx.db.select().from(taxa).where(eq(taxa.studyId, seeded.studyId)).limit(1);
    await app.ctx.db.update(taxa).set({ name: `${one.name} (renamed)` }).where(eq(taxa.id, one.id));
    try {
      const res = await analyst.get(`/api/studies/${seeded.studyId}/runs/${crisisRun.id}/replication.zip`);
      expect(res.status).toBe(409);
      expect(res.body.error.message).toMatch(/data changed since this run/);
    } finally {
      await app.ctx.db.update(taxa).set({ name: one.name }).where(eq(taxa.id, one.id));
    }
  });
});
