// Work cut off half-way by a killed process (SIGKILL: no shutdown code runs) leaves nothing partly
// written, and the next process says what happened and lets the person try again: an import whose
// commit was interrupted goes back to "previewed" with the reason; a run whose process stopped is
// marked failed with the reason and can be retried. The taxa are invented.
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { connectDatabase } from "../../server/db";
import { createImportService } from "../../server/services/traitTableImports";
import { call, pollUntil, signUpThrough, startAppProcess, type AppProcess } from "../support/appProcess";

const db = new pg.Pool({ connectionString: process.env.DATABASE_URL, max: 2 });
const uploadDir = mkdtempSync(join(tmpdir(), "stratasieve-interrupted-"));
const started: AppProcess[] = [];

async function appProcess(env: Record<string, string> = {}) {
  const p = await startAppProcess({ UPLOAD_DIR: uploadDir, ...env });
  started.push(p);
  return p;
}

// Every process works the shared job queue: one left from an earlier test could take a later test's run.
afterEach(async () => {
  for (const p of started.splice(0)) await p.stop();
});

afterAll(async () => {
  await db.end();
  rmSync(uploadDir, { recursive: true, force: true });
});

const count = async (query: string, params: unknown[]) => Number((await db.query(query, params)).rows[0].n);

/** A study made through the API, asking for the suggested codebook. */
async function newStudy(base: string, cookie: string, name: string) {
  const study = (await call(base, "POST", "/api/studies", cookie, { name, suggestedCodebook: true })).body as { id: string };
  const traits = (await call(base, "GET", `/api/studies/${study.id}/traits`, cookie)).body.traits as Array<{ id: string; key: string }>;
  return { id: study.id, trait: Object.fromEntries(traits.map((t) => [t.key, t.id])) };
}

/** Waits until some other session waits for a lock; returns what it waits on. */
async function someoneWaits(lockFilter: string): Promise<void> {
  await pollUntil(
    async () => Number((await db.query(`SELECT count(*) AS n FROM pg_locks WHERE NOT granted AND ${lockFilter}`)).rows[0].n),
    (n) => n > 0,
    { everyMs: 20, tries: 3000, what: "a session waiting for the lock" },
  );
}

describe("an import commit killed half-way", () => {
  const ROWS = 30_000;

  it("writes no taxon and no decision; the next process puts the import back with the reason, and committing again works", async () => {
    const first = await appProcess();
    const { cookie } = await signUpThrough(first.url, "importer");
    const study = await newStudy(first.url, cookie, "Invented interrupted-import study");
    const name = (i: number) => `Abruptella ${String(i).padStart(6, "0")}`;
    const lines = ["name,higher_taxon,first_appearance,last_appearance,environment,body_size"];
    for (let i = 0; i < ROWS; i++) lines.push(`${name(i)},Invented clade ${i % 30},${(75 + (i % 20)).toFixed(1)},${(66 + (i % 9)).toFixed(1)},${i % 3 ? "marine" : "nonmarine"},${1 + (i % 250)}`);
    const form = new FormData();
    form.append("file", new Blob([lines.join("\n") + "\n"], { type: "text/csv" }), "invented-abrupt.csv");
    const uploadRes = await fetch(`${first.url}/api/studies/${study.id}/imports`, { method: "POST", headers: { cookie }, body: form });
    expect(uploadRes.status).toBe(201);
    const upload = (await uploadRes.json()) as { import: { id: string }; suggestedMapping: unknown };
    const importId = upload.import.id;
    const importPath = `/api/studies/${study.id}/imports/${importId}`;

    // To stop the commit at a known point, a taxon named like the file's last row is being added
    // meanwhile and not yet committed: the commit writes every earlier chunk of rows, then waits
    // for that name (unique in a study) at the last chunk, and is killed there.
    const holder = await db.connect();
    try {
      await holder.query("BEGIN");
      await holder.query("INSERT INTO taxa (study_id, name) VALUES ($1, $2)", [study.id, name(ROWS - 1)]);
      const commit = call(first.url, "POST", `${importPath}/commit`, cookie, { mapping: upload.suggestedMapping, skipInvalid: false }).catch((err: Error) => err);
      await someoneWaits("locktype = 'transactionid'");
      const midway = await call(first.url, "GET", importPath, cookie);
      expect(midway.body.status).toBe("committing");
      expect(midway.body.progress).toBeGreaterThan(0.5); // most rows are written, inside the commit's transaction
      await first.kill();
      expect(await commit).toBeInstanceOf(Error); // the connection died with the process
    } finally {
      await holder.query("ROLLBACK");
      holder.release();
    }

    // Nothing of the import is in the database; the import row still says "committing".
    expect(await count("SELECT count(*) AS n FROM taxa WHERE study_id = $1", [study.id])).toBe(0);
    expect(await count("SELECT count(*) AS n FROM coding_decisions WHERE import_id = $1 OR study_id = $2", [importId, study.id])).toBe(0);
    expect((await db.query("SELECT status FROM imports WHERE id = $1", [importId])).rows[0].status).toBe("committing");

    // A new process sweeps it back to "previewed", saying why, with nothing written.
    const second = await appProcess();
    const swept = await pollUntil(() => call(second.url, "GET", importPath, cookie), (r) => r.body.status !== "committing", { what: "the sweep" });
    expect(swept.body).toMatchObject({ status: "previewed", progress: 0, createdCount: 0, committedAt: null });
    expect(swept.body.failureReason).toMatch(/^Interrupted: .*nothing was written.*Commit again/);

    // The stored file is still there: committing again through the new process imports every row.
    const again = await call(second.url, "POST", `${importPath}/commit`, cookie, { mapping: upload.suggestedMapping, skipInvalid: false });
    expect(again.status, JSON.stringify(again.body)).toBe(200);
    expect(again.body).toMatchObject({ status: "committed", createdCount: ROWS, failureReason: null });
    expect(await count("SELECT count(*) AS n FROM taxa WHERE study_id = $1 AND deleted_at IS NULL", [study.id])).toBe(ROWS);
    // One "create" decision per new taxon, all from this import.
    expect(await count("SELECT count(*) AS n FROM coding_decisions WHERE study_id = $1 AND import_id = $2 AND action = 'create'", [study.id, importId])).toBe(ROWS);
  }, 240_000);

  it("a commit in progress in a live process is left alone by the sweep", async () => {
    const live = await appProcess();
    const { cookie } = await signUpThrough(live.url, "importer");
    const study = await newStudy(live.url, cookie, "Invented live-import study");
    const form = new FormData();
    form.append("file", new Blob(["name\nVivella prima\nVivella secunda\n"], { type: "text/csv" }), "invented-live.csv");
    const upload = (await (await fetch(`${live.url}/api/studies/${study.id}/imports`, { method: "POST", headers: { cookie }, body: form })).json()) as {
      import: { id: string };
      suggestedMapping: unknown;
    };
    const importPath = `/api/studies/${study.id}/imports/${upload.import.id}`;
    const sweeper = connectDatabase(process.env.DATABASE_URL!);
    const holder = await db.connect();
    try {
      await holder.query("BEGIN");
      await holder.query("INSERT INTO taxa (study_id, name) VALUES ($1, 'Vivella secunda')", [study.id]);
      const commit = call(live.url, "POST", `${importPath}/commit`, cookie, { mapping: upload.suggestedMapping, skipInvalid: false });
      await someoneWaits("locktype = 'transactionid'");
      // A sweep now (as another process would run it) finds this commit's lock held.
      expect(await createImportService(sweeper.db).sweepInterrupted()).not.toContain(upload.import.id);
      expect((await call(live.url, "GET", importPath, cookie)).body).toMatchObject({ status: "committing", failureReason: null });
      await holder.query("ROLLBACK");
      expect((await commit).status).toBe(200);
    } finally {
      await holder.query("ROLLBACK");
      holder.release();
      await sweeper.close();
    }
    expect((await call(live.url, "GET", importPath, cookie)).body).toMatchObject({ status: "committed", createdCount: 2 });
  }, 120_000);
});

describe("a run whose process is killed half-way", () => {
  it("is marked failed with the reason by the next process, and a retry computes it", async () => {
    const first = await appProcess();
    const { cookie } = await signUpThrough(first.url, "analyst");
    const study = await newStudy(first.url, cookie, "Invented interrupted-run study");
    // 400 invented taxa with ranges across 93.9 Ma, half of them marine.
    await db.query(
      `INSERT INTO taxa (study_id, name, higher_taxon, fad_ma, lad_ma, trait_values)
       SELECT $1, 'Interrupta ' || i, 'Invented clade ' || (i % 6), 100 - (i % 5), 80 + (i % 16),
              jsonb_build_object($2::text, CASE WHEN i % 2 = 0 THEN 'nonmarine' ELSE 'marine' END)
       FROM generate_series(1, 400) AS i`,
      [study.id, study.trait.environment],
    );
    // To stop the run at a known point, the trait table is locked: the run starts, then waits to read it.
    const holder = await db.connect();
    let runPath = "";
    try {
      await holder.query("BEGIN");
      await holder.query("LOCK TABLE taxa IN ACCESS EXCLUSIVE MODE");
      const created = await call(first.url, "POST", `/api/studies/${study.id}/runs`, cookie, {
        name: "Cut off half-way",
        boundaries: [{ boundaryMa: 93.9 }],
        traits: [{ traitId: study.trait.environment }],
      });
      expect(created.status, JSON.stringify(created.body)).toBe(202);
      runPath = `/api/studies/${study.id}/runs/${created.body.id}`;
      await someoneWaits("relation = 'taxa'::regclass");
      expect((await call(first.url, "GET", runPath, cookie)).body.status).toBe("running");
      await first.kill();
    } finally {
      await holder.query("ROLLBACK");
      holder.release();
    }
    const runId = runPath.split("/").pop();
    expect((await db.query("SELECT status, results FROM runs WHERE id = $1", [runId])).rows[0]).toEqual({ status: "running", results: null });

    // The next process takes a run silent for two seconds for interrupted (the default is a minute).
    await new Promise((r) => setTimeout(r, 2500));
    const second = await appProcess({ RUN_STALE_SECONDS: "2" });
    const failed = await pollUntil(() => call(second.url, "GET", runPath, cookie), (r) => r.body.status !== "running", { what: "the run sweep" });
    expect(failed.body).toMatchObject({ status: "failed", results: null });
    expect(failed.body.error).toMatch(/^Interrupted: the process computing this run stopped before it finished .*Retry/);

    const retried = await call(second.url, "POST", `${runPath}/retry`, cookie);
    expect(retried.status, JSON.stringify(retried.body)).toBe(202);
    const done = await pollUntil(() => call(second.url, "GET", runPath, cookie), (r) => r.body.status === "succeeded" || r.body.status === "failed", {
      everyMs: 200,
      tries: 600,
      what: "the retried run",
    });
    expect(done.body.status, done.body.error ?? "").toBe("succeeded");
    expect(done.body.attempt).toBe(2);
    // worked by hand: fad = 96..100 Ma, above the boundary for every taxon; lad = 80 + (i % 16) Ma.
    // The default window is the Cenomanian, 100.5-93.9 Ma (ICS chart v2024/12). lad 94 or 95 (i % 16
    // in 14..15) is last seen inside the window: a victim; lad 80..93 crosses the boundary: a survivor.
    // i = 1..400 is 25 full cycles of 16 with 2 victims each: 50 victims of 400.
    const table = done.body.results.boundaries[0].result.traits[0].table as Array<{ victims: number; survivors: number }>;
    expect(table.reduce((n, r) => n + r.victims, 0)).toBe(50);
    expect(table.reduce((n, r) => n + r.victims + r.survivors, 0)).toBe(400);
  }, 300_000);
});
