// The database stopping and starting under a running app. This file runs its own PostgreSQL
// cluster, so stopping it does not disturb the other test files.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { chmodSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { PostgresCluster, freePort } from "../../db/cluster";
import { runMigrations } from "../../db/migrate";
import { createTestApp, PASSWORD, uniqueEmail, type TestApp } from "../support/server";

let dir: string;
let cluster: PostgresCluster;
let app: TestApp;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "stratasieve-reliability-"));
  chmodSync(dir, 0o755);
  cluster = new PostgresCluster({ dataDir: join(dir, "pg"), runDir: join(dir, "run"), port: await freePort(), throwaway: true }, () => {});
  cluster.init();
  cluster.start();
  cluster.createDatabase("reliability");
  await runMigrations(cluster.url("reliability"));
  app = await createTestApp({ databaseUrl: cluster.url("reliability") });
});

afterAll(async () => {
  await app?.close().catch(() => undefined);
  cluster?.stop();
  rmSync(dir, { recursive: true, force: true });
});

describe("database outage", () => {
  it("answers 503 with a clear message while the database is down, writes nothing, and recovers without a restart", async () => {
    const agent = request.agent(app.app);
    const email = uniqueEmail("outage");
    expect((await agent.post("/api/auth/signup").send({ email, password: PASSWORD, name: "Outage" })).status).toBe(201);
    expect((await agent.post("/api/studies").send({ name: "Before the outage" })).status).toBe(201);

    cluster.stop();
    try {
      const health = await agent.get("/api/health");
      expect(health.status).toBe(503);
      expect(health.body).toEqual({ status: "unavailable", database: "unreachable" });

      const read = await agent.get("/api/studies");
      expect(read.status).toBe(503);
      expect(read.body.error.code).toBe("database_unavailable");
      expect(read.body.error.message).toMatch(/database is not reachable/i);
      expect(read.headers["retry-after"]).toBeDefined();

      // Creating a study writes the study, the membership and the suggested codebook together.
      const write = await agent.post("/api/studies").send({ name: "During the outage" });
      expect(write.status).toBe(503);
    } finally {
      cluster.start();
    }

    // The same app (no restart) serves again once the database is back.
    let health = await agent.get("/api/health");
    for (let i = 0; i < 20 && health.status !== 200; i++) {
      await new Promise((r) => setTimeout(r, 250));
      health = await agent.get("/api/health");
    }
    expect(health.status).toBe(200);
    const studies = await agent.get("/api/studies");
    expect(studies.status).toBe(200);
    expect(studies.body.studies.map((s: { name: string }) => s.name)).toEqual(["Before the outage"]);
    const orphans = await app.ctx.database.pool.query(
      "SELECT count(*)::int AS n FROM studies s WHERE NOT EXISTS (SELECT 1 FROM memberships m WHERE m.study_id = s.id)",
    );
    expect(orphans.rows[0].n).toBe(0);
  });
});
