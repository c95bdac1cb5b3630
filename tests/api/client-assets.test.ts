// The built client as the server sends it: precompressed copies chosen by Accept-Encoding (RFC 9110
// section 12.5.3), hashed assets cached for a year and the page revalidated on every visit (RFC 9111
// section 5.2.2: immutable is RFC 8246). Reads the real dist/ that `npm run build` wrote.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { get, type IncomingHttpHeaders } from "node:http";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { brotliDecompressSync, gunzipSync } from "node:zlib";
import { startTestServer, type TestApp } from "../support/server";

let app: TestApp & { url: string };
const dist = join(process.cwd(), "dist");
const indexHtml = readFileSync(join(dist, "index.html"));
const entryScript = /<script type="module" crossorigin src="(\/assets\/[^"]+\.js)"/.exec(indexHtml.toString())?.[1];

beforeAll(async () => {
  app = await startTestServer();
});
afterAll(() => app.close());

/** The bytes exactly as they crossed the wire (fetch and supertest would decompress them). */
function rawGet(path: string, acceptEncoding?: string): Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    const req = get(`${app.url}${path}`, { headers: acceptEncoding ? { "accept-encoding": acceptEncoding } : {} }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on("error", reject);
  });
}

describe("the built client", () => {
  it("has an entry script named by a content hash", () => {
    expect(entryScript).toMatch(/^\/assets\/index-[\w-]{6,}\.js$/);
  });

  it("sends index.html brotli-compressed when the browser accepts it, revalidated on every visit", async () => {
    const res = await rawGet("/", "gzip, deflate, br");
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toMatch(/^text\/html/);
    expect(res.headers["content-encoding"]).toBe("br");
    expect(res.headers["vary"]).toMatch(/Accept-Encoding/i);
    expect(res.headers["cache-control"]).toBe("no-cache");
    expect(brotliDecompressSync(res.body).equals(indexHtml)).toBe(true);
  });

  it("answers a screen's address with the same page, gzip when brotli is not accepted", async () => {
    const res = await rawGet("/studies/00000000-0000-0000-0000-000000000000/table?sort=name", "gzip");
    expect(res.status).toBe(200);
    expect(res.headers["content-encoding"]).toBe("gzip");
    expect(res.headers["cache-control"]).toBe("no-cache");
    expect(gunzipSync(res.body).equals(indexHtml)).toBe(true);
  });

  it("keeps hashed scripts for a year, compressed or plain as asked", async () => {
    const original = readFileSync(join(dist, entryScript!));
    const br = await rawGet(entryScript!, "br");
    expect(br.status).toBe(200);
    expect(br.headers["content-type"]).toMatch(/javascript/);
    expect(br.headers["content-encoding"]).toBe("br");
    expect(br.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    expect(brotliDecompressSync(br.body).equals(original)).toBe(true);
    expect(br.body.length).toBeLessThan(original.length / 2);

    const plain = await rawGet(entryScript!);
    expect(plain.headers["content-encoding"]).toBeUndefined();
    expect(plain.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    expect(plain.body.equals(original)).toBe(true);
  });

  it("answers a missing asset with 404, never with the page", async () => {
    const res = await rawGet("/assets/index-gone1234.js", "br");
    expect(res.status).toBe(404);
    expect(res.headers["content-type"] ?? "").not.toMatch(/^text\/html/);
    expect(res.headers["cache-control"] ?? "").not.toMatch(/immutable/);
  });

  it("compresses JSON answers as the browser accepts", async () => {
    const br = await rawGet("/api/openapi.json", "gzip, deflate, br");
    expect(br.status).toBe(200);
    expect(br.headers["content-encoding"]).toBe("br");
    const document = JSON.parse(brotliDecompressSync(br.body).toString("utf8"));
    expect(document.openapi).toBe("3.1.0");
    const gzip = await rawGet("/api/openapi.json", "gzip");
    expect(gzip.headers["content-encoding"]).toBe("gzip");
    expect(JSON.parse(gunzipSync(gzip.body).toString("utf8"))).toEqual(document);
    expect(br.body.length).toBeLessThan(Buffer.byteLength(JSON.stringify(document)) / 4);
  });

  it("never gives API answers the assets' year-long cache", async () => {
    const res = await rawGet("/api/health", "br");
    expect(res.status).toBe(200);
    expect(res.headers["cache-control"] ?? "").not.toMatch(/immutable|max-age=31536000/);
  });
});

describe("Server-Timing (W3C Server Timing) on API answers", () => {
  it("says how long the app took and how much of it went to the database", async () => {
    const res = await rawGet("/api/health");
    const header = String(res.headers["server-timing"]);
    const db = /db;dur=([\d.]+);desc="(\d+) queries"/.exec(header);
    const total = /app;dur=([\d.]+)/.exec(header);
    expect(db, header).not.toBeNull();
    expect(total, header).not.toBeNull();
    // The health check asks the database once.
    expect(Number(db![2])).toBeGreaterThanOrEqual(1);
    expect(Number(db![1])).toBeLessThanOrEqual(Number(total![1]));
  });
});
