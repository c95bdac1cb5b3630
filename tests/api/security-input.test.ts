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
  const routes = () => [`/api/studies/${study.studyId}/imports`, `/api/studies/${study.studyId}/modern-lists/uploads`];

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
      .post(`/api/studies/${study.studyId}/modern-lists/uploads`)
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
    const modernEmpty = await cast.people.analyst.agent.post(`/api/studies/${study.studyId}/modern-lists/uploads`).attach("file", Buffer.from("", "utf8"), "empty.csv");
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
