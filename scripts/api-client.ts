// Writes the command line's typed API client from the app's own OpenAPI document:
//   cli/openapi.json         the document, as the routes declare it (ApiRouter.add)
//   cli/generated/           types and one function per operationId, by @hey-api/openapi-ts
// `npm run api:client` after changing a route; tests/api/cli.test.ts fails while these are stale.
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { createClient } from "@hey-api/openapi-ts";
import { describeApi } from "../server/app";
import { loadConfig } from "../server/config";

/** The document as the server would serve it (no database is touched). */
export function apiDocument(): Record<string, unknown> {
  return describeApi(loadConfig({ databaseUrl: "postgres://unused@127.0.0.1/unused", sessionSecret: new TextEncoder().encode("x".repeat(32)) }));
}

/** Generates the client for `document` into `folder` (replacing what is there). */
export async function generateClient(document: Record<string, unknown>, folder: string): Promise<void> {
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(folder, { recursive: true });
  await createClient({
    input: document as never,
    output: { path: folder },
    plugins: ["@hey-api/client-fetch", "@hey-api/typescript", "@hey-api/sdk"],
    logs: { level: "silent" },
  });
}

/** Every file below `folder`, by relative path, for comparing two generated trees. */
export function readTree(folder: string, prefix = ""): Record<string, string> {
  const out: Record<string, string> = {};
  for (const entry of readdirSync(folder, { withFileTypes: true })) {
    const path = join(folder, entry.name);
    if (entry.isDirectory()) Object.assign(out, readTree(path, `${prefix}${entry.name}/`));
    else out[`${prefix}${entry.name}`] = readFileSync(path, "utf8");
  }
  return out;
}

async function main() {
  const document = apiDocument();
  writeFileSync("cli/openapi.json", JSON.stringify(document, null, 2) + "\n");
  await generateClient(document, "cli/generated");
  console.log("Wrote cli/openapi.json and cli/generated/.");
}

if (process.argv[1]?.endsWith("api-client.ts")) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
