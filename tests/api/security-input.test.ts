// Input-side findings of the security review (issue 14, second half), each as a regression test
// against the real app and PostgreSQL: uploads are refused before their body is read; PATCH
// leaves alone what it does not name; lone UTF-16 surrogates, control characters in one-line
// fields, ages older than the Earth and broken Content-Encoding get a 4xx naming the problem.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { request as httpRequest, type IncomingMessage } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { gzipSync } from "node:zlib";
import request from "supertest";
import { PASSWORD, startTestServer, type TestApp } from "../support/server";
import { studyWithCodebook, uploadCsv, type CodebookStudy } from "../support/traitTables";
import { castOfRoles, type Cast, type Person } from "./fixtures";

let app: TestApp & { url: string };
let cast: Cast;
let study: CodebookStudy;
const uploadDir = mkdtempSync(join(tmpdir(), "stratasieve-security-input-"));

beforeAll(async () => {
  app = await startTestServer({ uploadDir });
  cast = await castOfRoles(app);
  study = await studyWithCodebook(app, cast, "Invented security-input study");
});

afterAll(async () => {
  await app.close();
  rmSync(uploadDir, { recursive: true, force: true });
});

const filesInUploadDir = () => readdirSync(uploadDir).length;

/** The session cookie of a person, for requests sent by hand. */
async function cookieOf(person: Person): Promise<string> {
  const res = await request(app.app).post("/api/auth/login").send({ email: person.email, password: PASSWORD });
  expect(res.status).toBe(200);
  return (res.headers["set-cookie"] as unknown as string[]).map((c) => c.split(";")[0]).join("; ");
}

/**
 * Announces a 20 MB multipart upload but sends only its first 64 KB, then waits for the answer:
 * an app that reads the body before checking the session never answers (the test times out).
 */
function partialUpload(path: string, cookie: string | null): Promise<{ status: number; body: { error: { code: string } } }> {
  const boundary = "----invented-boundary";
  const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.csv"\r\nContent-Type: text/csv\r\n\r\nname\r\n`);
  const declared = 20 * 1024 * 1024;
  return new Promise((resolve, reject) => {
    const req = httpRequest(`${app.url}${path}`, {
      method: "POST",
      headers: {
        "content-type": `multipart/form-data; boundary=${boundary}`,
        "content-length": String(declared),
        ...(cookie ? { cookie } : {}),
      },
    });
    req.on("response", (res: IncomingMessage) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => {
        req.destroy();
        resolve({ status: res.statusCode ?? 0, body: JSON.parse(Buffer.concat(chunks).toString("utf8")) });
      });
    });
    req.on("error", (err) => reject(err));
    req.write(head);
    req.write(Buffer.alloc(64 * 1024, "a"));
    // The rest of the body is never sent.
  });
}

describe("uploads are refused before their body is read", () => {
  const routes = () => [`/api/studies/${study.studyId}/imports`, `/api/studies/${study.studyId}/modern-list-uploads`];

  it("an anonymous upload gets 401 while its body is still on the way, and no file is stored", async () => {
    for (const path of routes()) {
      const before = filesInUploadDir();
      const res = await partialUpload(path, null);
      expect(res.status, path).toBe(401);
      expect(res.body.error.code).toBe("unauthorized");
      expect(filesInUploadDir(), path).toBe(before);
    }
  });

  it("a viewer's and a stranger's uploads get 403 while their bodies are still on the way, and no file is stored", async () => {
    for (const who of ["viewer", "stranger"] as const) {
      const cookie = await cookieOf(cast.people[who]);
      for (const path of routes()) {
        const before = filesInUploadDir();
        const res = await partialUpload(path, cookie);
        expect(res.status, `${who} ${path}`).toBe(403);
        expect(filesInUploadDir(), `${who} ${path}`).toBe(before);
      }
    }
  });

  it("an authorised upload is streamed into UPLOAD_DIR and kept there as the upload's file", async () => {
    const before = filesInUploadDir();
    const res = await uploadCsv(cast.people.coder.agent, study.studyId, "name,higher_taxon\nAlphella invented,Inventidae\n");
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(filesInUploadDir()).toBe(before + 1);
    const modern = await cast.people.analyst.agent
      .post(`/api/studies/${study.studyId}/modern-list-uploads`)
      .attach("file", Buffer.from("species,category\nInventa modernis,EN\n", "utf8"), "invented-modern.csv");
    expect(modern.status, JSON.stringify(modern.body)).toBe(201);
    expect(filesInUploadDir()).toBe(before + 2);
  });

  it("an authorised upload that is refused after it was stored (not text, no rows) leaves no file", async () => {
    const before = filesInUploadDir();
    const binary = await uploadCsv(cast.people.coder.agent, study.studyId, Buffer.from([0x00, 0x01, 0x02, 0xff, 0xfe, 0x00]), "binary.csv");
    expect(binary.status).toBe(415);
    const headerOnly = await uploadCsv(cast.people.coder.agent, study.studyId, "name,higher_taxon\n", "header-only.csv");
    expect(headerOnly.status).toBe(400);
    const modernEmpty = await cast.people.analyst.agent.post(`/api/studies/${study.studyId}/modern-list-uploads`).attach("file", Buffer.from("", "utf8"), "empty.csv");
    expect(modernEmpty.status).toBe(400);
    expect(filesInUploadDir()).toBe(before);
  });
});


describe("PATCH changes only the fields it names", () => {
  it("PATCH /studies/:id with a name keeps the description", async () => {
    const owner = cast.people.owner.agent;
    const created = await owner.post("/api/studies").send({ name: "Invented patch study", description: "Benthic basin, invented." });
    expect(created.status).toBe(201);
    const res = await owner.patch(`/api/studies/${created.body.id}`).send({ name: "Invented patch study, renamed" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body).toMatchObject({ name: "Invented patch study, renamed", description: "Benthic basin, invented." });
    const described = await owner.patch(`/api/studies/${created.body.id}`).send({ description: "Now longer, still invented." });
    expect(described.body).toMatchObject({ name: "Invented patch study, renamed", description: "Now longer, still invented." });
    expect((await owner.get(`/api/studies/${created.body.id}`)).body).toMatchObject({ name: "Invented patch study, renamed", description: "Now longer, still invented." });
  });

  it("PATCH /studies/:id/traits/:id with a label keeps states, unit, bounds and coding rule", async () => {
    const created = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/traits`).send({
      key: "patch_width",
      label: "Width",
      kind: "numeric",
      unit: "mm",
      minValue: 0,
      maxValue: 90,
      codingRule: "Widest point of the invented shell.",
    });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const res = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${created.body.id}`).send({ label: "Shell width" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.trait).toMatchObject({ key: "patch_width", label: "Shell width", kind: "numeric", unit: "mm", minValue: 0, maxValue: 90, codingRule: "Widest point of the invented shell.", retired: false });
  });

  it("PATCH /studies/:id/taxa/:id with a name keeps higher taxon, notes, range and values", async () => {
    const feeding = study.trait.feeding.id;
    const created = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/taxa`)
      .send({ name: "Patchella invented", higherTaxon: "Inventidae", notes: "Kept notes.", fad: { ma: 70 }, lad: { ma: 66 }, values: { [feeding]: "suspension" } });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const t = created.body.taxon;
    const res = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/taxa/${t.id}`).send({ version: t.version, changes: { name: "Patchella renamed" }, reason: "Spelling." });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.taxon).toMatchObject({ name: "Patchella renamed", higherTaxon: "Inventidae", notes: "Kept notes.", fadMa: 70, ladMa: 66, values: { [feeding]: "suspension" } });
  });

  it("PATCH /studies/:id/members/:id with a role keeps the member's name, address and joining date", async () => {
    const studyId = await cast.makeStudy("Invented member patch study");
    const path = `/api/studies/${studyId}/members`;
    const before = (await cast.people.owner.agent.get(path)).body.members.find((m: { userId: string }) => m.userId === cast.people.coder.user.id);
    const res = await cast.people.owner.agent.patch(`${path}/${cast.people.coder.user.id}`).send({ role: "analyst" });
    expect(res.status, JSON.stringify(res.body)).toBe(204);
    const after = (await cast.people.owner.agent.get(path)).body.members.find((m: { userId: string }) => m.userId === cast.people.coder.user.id);
    expect(after).toEqual({ ...before, role: "analyst" });
  });

  it("PATCH /auth/me with a name keeps the address", async () => {
    const person = cast.people.stranger;
    const res = await person.agent.patch("/api/auth/me").send({ name: "Renamed stranger" });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const me = await person.agent.get("/api/auth/me");
    expect(me.body.user).toMatchObject({ email: person.email, name: "Renamed stranger" });
  });
});

describe("a body that cannot be read as sent gets a 4xx", () => {
  const json = JSON.stringify({ name: "Invented encoding study" });

  it("an unknown Content-Encoding gets 415 naming it", async () => {
    const res = await cast.people.owner.agent.post("/api/studies").set("Content-Type", "application/json").set("Content-Encoding", "x-invented").send(json);
    expect(res.status, JSON.stringify(res.body)).toBe(415);
    expect(res.body.error.code).toBe("unsupported_content_encoding");
    expect(res.body.error.message).toContain('"x-invented"');
  });

  it("a body that is not what its Content-Encoding says (plain JSON sent as gzip, deflate or br) gets 400", async () => {
    for (const encoding of ["gzip", "deflate", "br"]) {
      const res = await cast.people.owner.agent.post("/api/studies").set("Content-Type", "application/json").set("Content-Encoding", encoding).send(json);
      expect(res.status, `${encoding}: ${JSON.stringify(res.body)}`).toBe(400);
      expect(res.body.error.message, encoding).toMatch(/could not be (read|decompressed)/);
    }
  });

  it("a correctly gzipped body is still read", async () => {
    const body = gzipSync(json);
    const cookie = await cookieOf(cast.people.owner);
    const res = await new Promise<{ status: number; body: { name?: string } }>((resolve, reject) => {
      const req = httpRequest(`${app.url}/api/studies`, { method: "POST", headers: { cookie, "content-type": "application/json", "content-encoding": "gzip", "content-length": String(body.length) } });
      req.on("response", (r: IncomingMessage) => {
        const chunks: Buffer[] = [];
        r.on("data", (c: Buffer) => chunks.push(c));
        r.on("end", () => resolve({ status: r.statusCode ?? 0, body: JSON.parse(Buffer.concat(chunks).toString("utf8")) }));
      });
      req.on("error", reject);
      req.end(body);
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.name).toBe("Invented encoding study");
  });

  it("an unknown charset gets 415", async () => {
    const res = await cast.people.owner.agent.post("/api/studies").set("Content-Type", "application/json; charset=x-invented").send(json);
    expect(res.status, JSON.stringify(res.body)).toBe(415);
    expect(res.body.error.code).toBe("unsupported_charset");
  });

  it("a multipart upload that breaks off in the middle gets 400 and leaves no file", async () => {
    const before = filesInUploadDir();
    const boundary = "----invented-boundary";
    const res = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports`)
      .set("Content-Type", `multipart/form-data; boundary=${boundary}`)
      .send(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="cut.csv"\r\nContent-Type: text/csv\r\n\r\nname\r\nAlphella`);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.code).toBe("unreadable_upload");
    expect(filesInUploadDir()).toBe(before);
  });
});

describe("lone UTF-16 surrogates are refused with 400 wherever text comes in", () => {
  // JSON.stringify writes a lone surrogate as the escape \ud800 (ES2019 well-formed JSON.stringify), as an attacker would send it.
  const send = (agent: Person["agent"], method: "post" | "patch", path: string, body: unknown) =>
    agent[method](path).set("Content-Type", "application/json").send(JSON.stringify(body));

  it("in a taxon's name and notes (once a 500 from PostgreSQL's jsonb), in a PATCH, a post and a study; nothing is written", async () => {
    const coder = cast.people.coder.agent;
    const taxa = `/api/studies/${study.studyId}/taxa`;
    const countBefore = (await coder.get(taxa)).body.total;
    for (const body of [{ name: "Alphella\ud800" }, { name: "Alphella surrogate", notes: "broken \udc00 notes" }]) {
      const res = await send(coder, "post", taxa, body);
      expect(res.status, JSON.stringify(res.body)).toBe(400);
      expect(res.body.error.code).toBe("validation_failed");
      expect(Object.values(res.body.error.fields as Record<string, string>)[0]).toMatch(/lone UTF-16 surrogate \(U\+D(800|C00)\)/);
    }
    expect((await coder.get(taxa)).body.total).toBe(countBefore);

    const created = await coder.post(taxa).send({ name: "Surrogatella invented" });
    const patched = await send(coder, "patch", `${taxa}/${created.body.taxon.id}`, { version: 1, changes: { values: { [study.trait.feeding.id]: "sus\ud83dpension" } } });
    expect(patched.status, JSON.stringify(patched.body)).toBe(400);
    expect(patched.body.error.fields[`changes.values.${study.trait.feeding.id}`]).toMatch(/lone UTF-16 surrogate \(U\+D83D\)/);

    const thread = await send(coder, "post", `/api/studies/${study.studyId}/threads`, { target: { type: "taxon", id: created.body.taxon.id }, body: "A question \udfff" });
    expect(thread.status, JSON.stringify(thread.body)).toBe(400);
    expect(thread.body.error.fields.body).toMatch(/lone UTF-16 surrogate \(U\+DFFF\)/);

    const studyRes = await send(cast.people.owner.agent, "post", "/api/studies", { name: "Invented", description: "\ud800" });
    expect(studyRes.status).toBe(400);
    expect(studyRes.body.error.fields.description).toMatch(/lone UTF-16 surrogate/);
  });

  it("a deeply nested body (100,000 levels) is refused with 400, the check does not overflow", async () => {
    const nested = `{"name":"Invented","description":${"[".repeat(100_000)}"\\ud800"${"]".repeat(100_000)}}`;
    const res = await cast.people.owner.agent.post("/api/studies").set("Content-Type", "application/json").send(nested);
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(400);
    expect(res.body.error.message).toMatch(/lone UTF-16 surrogate \(U\+D800\)/);
    const clean = await cast.people.owner.agent.post("/api/studies").set("Content-Type", "application/json").send(nested.replace("\\ud800", "x"));
    expect(clean.status).toBe(400);
    expect(clean.body.error.fields.description).toBeDefined();
  });

  it("a well-formed pair (an emoji) is stored as it is", async () => {
    const res = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Emojella \ud83e\udeb8 invented", notes: "\u00e9t\u00e9 \ud83d\ude00" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.taxon).toMatchObject({ name: "Emojella \u{1FAB8} invented", notes: "\u00e9t\u00e9 \u{1F600}" });
  });

  it("in an uploaded CSV file (UTF-16 with a byte-order mark), as a row problem naming row and column", async () => {
    const text = "name,higher_taxon,notes\r\nAlphella utf16,Inventidae,fine\r\nBetella utf16,Inventidae,bro\ud800ken\r\n";
    const bytes = Buffer.alloc(2 + text.length * 2);
    bytes.writeUInt16LE(0xfeff, 0);
    for (let i = 0; i < text.length; i++) bytes.writeUInt16LE(text.charCodeAt(i), 2 + 2 * i);
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, bytes, "utf16.csv");
    expect(upload.status, JSON.stringify(upload.body)).toBe(201);
    const preview = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${upload.body.import.id}/preview`)
      .send({ mapping: { name: "name", higherTaxon: "higher_taxon", firstAppearance: null, lastAppearance: null, notes: "notes", traits: {} } });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    expect(preview.body.problems).toEqual([{ row: 3, column: "notes", message: expect.stringMatching(/^The cell holds a lone UTF-16 surrogate \(U\+D800\)/) }]);
  });
});

describe("one-line fields refuse line breaks and control characters, naming the field", () => {
  it("a person's name at sign-up and on the account, a study's name, a taxon's name and higher taxon, a trait's label", async () => {
    const signup = await request(app.app).post("/api/auth/signup").send({ email: "linebreak@example.test", password: PASSWORD, name: "Invented\r\nBcc: victim@example.test" });
    expect(signup.status).toBe(400);
    expect(signup.body.error.fields.name).toBe("Name must be one line of text: it holds a line break");

    const me = await cast.people.viewer.agent.patch("/api/auth/me").send({ name: "Viewer\nSecond line" });
    expect(me.status).toBe(400);
    expect(me.body.error.fields.name).toBe("Name must be one line of text: it holds a line break");

    const newStudy = await cast.people.owner.agent.post("/api/studies").send({ name: "Invented\u0085study" });
    expect(newStudy.status).toBe(400);
    expect(newStudy.body.error.fields.name).toBe("Name must be one line of text: it holds a control character (U+0085)");
    const renamed = await cast.people.owner.agent.patch(`/api/studies/${study.studyId}`).send({ name: "Invented\tstudy" });
    expect(renamed.status).toBe(400);
    expect(renamed.body.error.fields.name).toBe("Name must be one line of text: it holds a tab");
    const described = await cast.people.owner.agent.patch(`/api/studies/${study.studyId}`).send({ description: "Descriptions\nmay span lines." });
    expect(described.status).toBe(200);

    const taxon = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Line\nbreakella", higherTaxon: "Inven\u2028tidae" });
    expect(taxon.status).toBe(400);
    expect(taxon.body.error.fields).toEqual({ name: "Name must be one line of text: it holds a line break", higherTaxon: "Higher taxon must be one line of text: it holds a control character (U+2028)" });

    const run = await cast.people.analyst.agent
      .post(`/api/studies/${study.studyId}/runs/preview`)
      .send({ name: "Invented\nrun", boundaries: [{ boundaryMa: 66, label: "K\u2029Pg" }], traits: [{ traitId: study.trait.feeding.id }] });
    expect(run.status, JSON.stringify(run.body)).toBe(400);
    expect(run.body.error.fields).toMatchObject({ name: "Name must be one line of text: it holds a line break", "boundaries.0.label": "Label must be one line of text: it holds a control character (U+2029)" });

    const kept = await cast.people.coder.agent.post(`/api/studies/${study.studyId}/taxa`).send({ name: "Bulkella invented", higherTaxon: "Inventidae" });
    const bulk = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/taxa/bulk`)
      .send({ taxonIds: [kept.body.taxon.id], field: "higherTaxon", value: "Inven\ntidae", reason: "Bulk." });
    expect(bulk.status, JSON.stringify(bulk.body)).toBe(400);
    expect(bulk.body.error.fields.value).toBe("Higher taxon must be one line of text: it holds a line break");
    const bulkNotes = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/taxa/bulk`)
      .send({ taxonIds: [kept.body.taxon.id], field: "notes", value: "  Notes may\nspan lines.  ", reason: "Bulk." });
    expect(bulkNotes.status, JSON.stringify(bulkNotes.body)).toBe(200);
    expect((await cast.people.coder.agent.get(`/api/studies/${study.studyId}/taxa/${kept.body.taxon.id}`)).body).toMatchObject({ higherTaxon: "Inventidae", notes: "Notes may\nspan lines." });

    const trait = await cast.people.coder.agent.patch(`/api/studies/${study.studyId}/traits/${study.trait.feeding.id}`).send({ label: "Feeding\r\nmode" });
    expect(trait.status).toBe(400);
    expect(trait.body.error.fields.label).toBe("Label must be one line of text: it holds a line break");
  });
});

describe("ages older than the Earth (4,567 Ma, common practice) are refused", () => {
  it("when a taxon is created, edited in the grid (PATCH) and bulk-edited; nothing is stored", async () => {
    const coder = cast.people.coder.agent;
    const taxa = `/api/studies/${study.studyId}/taxa`;
    const created = await coder.post(taxa).send({ name: "Ancientella invented", fad: { ma: 1e300 } });
    expect(created.status).toBe(400);
    expect(created.body.error.fields["fad.ma"]).toBe("Age must be at most 4,567 Ma: nothing is older than the Earth");

    const ok = await coder.post(taxa).send({ name: "Ancientella invented", fad: { ma: 4567 }, lad: { ma: 4000 } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    const id = ok.body.taxon.id as string;
    const grid = await coder.patch(`${taxa}/${id}`).send({ version: 1, changes: { fad: { ma: 4600 } }, reason: "Older." });
    expect(grid.status).toBe(400);
    expect(grid.body.error.fields["changes.fad.ma"]).toBe("Age must be at most 4,567 Ma: nothing is older than the Earth");

    const bulk = await coder.post(`${taxa}/bulk`).send({ taxonIds: [id], field: "lad", value: { ma: 5000 }, reason: "Older." });
    expect(bulk.status, JSON.stringify(bulk.body)).toBe(400);
    expect(JSON.stringify(bulk.body.error)).toContain("4,567 Ma");

    const stored = (await coder.get(`${taxa}/${id}`)).body;
    expect(stored.taxon ?? stored).toMatchObject({ fadMa: 4567, ladMa: 4000 });
  });

  it("as a boundary of an outcome query or a run", async () => {
    const outcomes = await cast.people.analyst.agent.get(`/api/studies/${study.studyId}/outcomes?boundary=5000`);
    expect(outcomes.status).toBe(400);
    expect(outcomes.body.error.fields.boundary).toBe("Boundary must be an age in Ma (a number greater than 0, at most 4,567)");
    const run = await cast.people.analyst.agent
      .post(`/api/studies/${study.studyId}/runs/preview`)
      .send({ name: "Invented run", boundaries: [{ boundaryMa: 1e300 }], traits: [{ traitId: study.trait.feeding.id }] });
    expect(run.status, JSON.stringify(run.body)).toBe(400);
    expect(run.body.error.fields["boundaries.0.boundaryMa"]).toBe("Boundary must be at most 4,567 Ma: nothing is older than the Earth");
  });

  it("in an imported CSV file, as a row problem naming row and column", async () => {
    const upload = await uploadCsv(cast.people.coder.agent, study.studyId, "name,higher_taxon,first_appearance\nOldella,Inventidae,1e300\nYoungella,Inventidae,70\n", "ages.csv");
    expect(upload.status).toBe(201);
    const preview = await cast.people.coder.agent
      .post(`/api/studies/${study.studyId}/imports/${upload.body.import.id}/preview`)
      .send({ mapping: { name: "name", higherTaxon: "higher_taxon", firstAppearance: "first_appearance", lastAppearance: null, notes: null, traits: {} } });
    expect(preview.status, JSON.stringify(preview.body)).toBe(200);
    expect(preview.body.problems).toEqual([{ row: 2, column: "first_appearance", message: "First appearance: 1e300 is not an age: age must be at most 4,567 Ma: nothing is older than the Earth" }]);
  });
});
