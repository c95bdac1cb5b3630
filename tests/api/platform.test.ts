import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { sql } from "drizzle-orm";
import { createTestApp, PASSWORD, signedInAgent, type TestApp } from "../support/server";

let app: TestApp;
beforeAll(async () => {
  app = await createTestApp();
});
afterAll(() => app.close());

describe("health and the API description", () => {
  it("reports the database as reachable", async () => {
    const res = await request(app.app).get("/api/health");
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: "ok", database: "ok" });
  });

  it("serves an OpenAPI 3.1 document generated from the shared schemas", async () => {
    const res = await request(app.app).get("/api/openapi.json");
    expect(res.status).toBe(200);
    expect(res.body.openapi).toBe("3.1.0");
    expect(res.body.paths["/api/studies/{studyId}/invitations"].post.requestBody).toBeDefined();
    expect(res.body.components.schemas.SignupRequest.properties.password.minLength).toBe(10);
  });

  it("answers unknown API paths with a JSON 404", async () => {
    const res = await request(app.app).get("/api/no-such-thing");
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe("not_found");
  });

  it("answers malformed JSON with a clear 400", async () => {
    const res = await request(app.app).post("/api/auth/login").set("Content-Type", "application/json").send("{not json");
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("invalid_json");
  });
});

describe("cross-origin requests", () => {
  it("refuses a state-changing request from another origin", async () => {
    const { agent } = await signedInAgent(app);
    const res = await agent.post("/api/studies").set("Origin", "https://evil.example").send({ name: "Sneaky" });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe("cross_origin");
    const own = await agent.post("/api/studies").set("Origin", app.ctx.config.appUrl).send({ name: "Fine" });
    expect(own.status).toBe(201);
  });

  it("sets security headers", async () => {
    const res = await request(app.app).get("/api/health");
    expect(res.headers["content-security-policy"]).toMatch(/default-src 'self'/);
    expect(res.headers["x-content-type-options"]).toBe("nosniff");
    expect(res.headers["x-powered-by"]).toBeUndefined();
  });
});

describe("sign-in rate limiting", () => {
  it("slows an account's sign-ins down after failed ones instead of locking it (details in security-accounts.test.ts)", async () => {
    const limited = await createTestApp({ loginLimit: { windowMs: 60_000, perIp: 1000, perAccount: 3, delayMs: 50 } });
    try {
      const { email } = await signedInAgent(limited, "target");
      for (let i = 0; i < 6; i++) {
        expect((await request(limited.app).post("/api/auth/login").send({ email, password: "wrong guess!" })).status).toBe(401);
      }
      const owner = await request(limited.app).post("/api/auth/login").send({ email, password: PASSWORD });
      expect(owner.status).toBe(200);
    } finally {
      await limited.close();
    }
  });

  it("limits attempts per address across accounts", async () => {
    await app.ctx.db.execute(sql`DELETE FROM rate_limit_hits WHERE key LIKE 'login-ip:%'`);
    const limited = await createTestApp({ loginLimit: { windowMs: 60_000, perIp: 4, perAccount: 1000 } });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) {
        statuses.push((await request(limited.app).post("/api/auth/login").send({ email: `nobody${i}@example.test`, password: "whatever1234" })).status);
      }
      expect(statuses).toEqual([401, 401, 401, 401, 429]);
    } finally {
      await app.ctx.db.execute(sql`DELETE FROM rate_limit_hits WHERE key LIKE 'login-ip:%'`);
      await limited.close();
    }
  });
});
