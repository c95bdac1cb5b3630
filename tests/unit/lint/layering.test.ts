// The layering rules of eslint.config.js (docs/architecture.md, "Layers"), run through ESLint's
// Node API on small snippets placed, by file path only, where a real file would sit. Each case is
// a rule of the project, not of an outside source.
import { fileURLToPath } from "node:url";
import { ESLint } from "eslint";
import { beforeAll, describe, expect, it } from "vitest";

const root = fileURLToPath(new URL("../../../", import.meta.url));
const eslint = new ESLint({ cwd: root });

// ESLint's first run loads the whole configuration and the TypeScript parser: seconds on a busy
// machine, so it happens once here, with room, instead of inside the first case's 5 s.
beforeAll(async () => {
  await eslint.lintText("export const warm = 1;\n", { filePath: "shared/warmFixture.ts" });
}, 60_000);

/** Messages of the layering rule for `code` as if it were the file at `filePath` (from the repository root). */
async function layeringErrors(filePath: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath });
  return result.messages.filter((m) => m.ruleId === "no-restricted-imports").map((m) => m.message);
}

describe("shared/ stays pure", () => {
  it.each([
    ['import { x } from "../../server/services/runs";', "server"],
    ['import { x } from "../../src/lib/api";', "client"],
    ['import { x } from "../../db/schema/index";', "database (relative)"],
    ['import { x } from "@db/schema/index";', "database (alias)"],
  ])("refuses %s (%s)", async (code) => {
    const errors = await layeringErrors("shared/stats/layeringFixture.ts", `${code}\nexport const y = x;\n`);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatch(/shared\//);
  });
  it("allows shared/ and packages", async () => {
    const code = 'import { z } from "zod";\nimport { can } from "../roles";\nexport const y = [z, can];\n';
    expect(await layeringErrors("shared/stats/layeringFixture.ts", code)).toEqual([]);
  });
});

describe("db/ does not reach up into the server", () => {
  it("refuses an import of a server service", async () => {
    const errors = await layeringErrors("db/layeringFixture.ts", 'import { x } from "../server/services/runs";\nexport const y = x;\n');
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatch(/db\//);
  });
  it("allows its own schema and shared/", async () => {
    const code = 'import { x } from "./schema/index";\nimport { can } from "../shared/roles";\nexport const y = [x, can];\n';
    expect(await layeringErrors("db/layeringFixture.ts", code)).toEqual([]);
  });
});

describe("services raise domain errors, not HTTP ones", () => {
  it.each([
    ["server/services/layeringFixture.ts", 'import { badRequest } from "../http/errors";'],
    ["server/services/layeringFixture.ts", 'import { x } from "../routes/runs";'],
    // The upload helpers services use (UploadedFile, removingOnFailure) live in services/uploadLifecycle.ts.
    ["server/services/layeringFixture.ts", 'import { csvUpload } from "../http/uploads";'],
    ["server/domain/layeringFixture.ts", 'import { HttpError } from "../http/errors";'],
  ])("refuses %s importing %s", async (filePath, code) => {
    const errors = await layeringErrors(filePath, `${code}\nexport const y = 1;\n`);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatch(/domain errors/);
  });
  it("allows the domain errors and the upload lifecycle", async () => {
    const code = 'import { notFound } from "../domain/errors";\nimport { removingOnFailure } from "./uploadLifecycle";\nexport const y = [notFound, removingOnFailure];\n';
    expect(await layeringErrors("server/services/layeringFixture.ts", code)).toEqual([]);
  });
});

describe("a feature imports no other feature", () => {
  it.each([
    ["src/features/runs/layeringFixture.ts", 'import { x } from "../selectivity/api";'],
    ["src/features/runs/layeringFixture.ts", 'import { x } from "../../features/selectivity/api";'],
    ["src/features/runs/nested/layeringFixture.ts", 'import { x } from "../../boundary/api";'],
  ])("refuses %s importing %s", async (filePath, code) => {
    const errors = await layeringErrors(filePath, `${code}\nexport const y = x;\n`);
    expect(errors).toHaveLength(1);
    expect(errors[0]).toMatch(/no other feature/);
  });
  it("allows its own files, src/components and src/lib", async () => {
    const code =
      'import { a } from "./api";\nimport { b } from "../runs/words";\nimport { c } from "../../components/Button";\nimport { d } from "../../lib/format";\nexport const y = [a, b, c, d];\n';
    expect(await layeringErrors("src/features/runs/layeringFixture.ts", code)).toEqual([]);
  });
  it("keeps src/components free of features", async () => {
    const errors = await layeringErrors("src/components/layeringFixture.ts", 'import { x } from "../features/runs/api";\nexport const y = x;\n');
    expect(errors).toHaveLength(1);
  });
});
