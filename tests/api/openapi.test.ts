// The API description is clean enough for generated clients: a well-known OpenAPI linter
// (Redocly's, with its "recommended" rules) finds no error in it, and every operation has a
// readable, unique operationId declared with its route.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createConfig, lintFromString } from "@redocly/openapi-core";
import { createTestApp, type TestApp } from "../support/server";

let app: TestApp;
beforeAll(async () => {
  app = await createTestApp();
});
afterAll(() => app?.close());

type Operation = { operationId?: string };
const operations = () =>
  Object.entries(app.openapi.paths as Record<string, Record<string, Operation>>).flatMap(([path, ops]) =>
    Object.entries(ops).map(([method, op]) => ({ where: `${method.toUpperCase()} ${path}`, operationId: op.operationId })),
  );

describe("the OpenAPI document", () => {
  it("passes Redocly's recommended lint rules without an error", async () => {
    // "recommended-strict" turns every warning of the recommended set into an error; the app is not
    // published under a licence, so the document names none.
    const config = await createConfig({ extends: ["recommended-strict"], rules: { "info-license": "off" } });
    const problems = await lintFromString({ source: JSON.stringify(app.openapi), absoluteRef: "openapi.json", config });
    const errors = problems.filter((p) => p.severity === "error").map((p) => `${p.ruleId}: ${p.message} at ${p.location[0]?.pointer ?? "?"}`);
    const warnings = problems.filter((p) => p.severity === "warn");
    if (warnings.length) console.log(`[openapi] ${warnings.length} lint warnings (${[...new Set(warnings.map((w) => w.ruleId))].join(", ")})`);
    expect(errors).toEqual([]);
  });

  it("gives every operation a readable, unique operationId", () => {
    const all = operations();
    expect(all.length).toBeGreaterThan(50);
    expect(all.filter((o) => !o.operationId).map((o) => o.where)).toEqual([]);
    // lowerCamelCase words, as generated clients name their methods.
    expect(all.filter((o) => !/^[a-z][a-zA-Z0-9]+$/.test(o.operationId!)).map((o) => `${o.where}: ${o.operationId}`)).toEqual([]);
    const seen = new Map<string, string>();
    const doubled = all.filter((o) => (seen.has(o.operationId!) ? true : (seen.set(o.operationId!, o.where), false)));
    expect(doubled.map((o) => `${o.operationId} (${o.where} and ${seen.get(o.operationId!)})`)).toEqual([]);
  });
});
