// The `sieve` command line against a real app process: with a token and the command line only, a
// script uploads a trait table and an occurrence file, sees their problems, commits them, starts a
// run, waits for it and downloads its exports. Failures exit non-zero with the reason on stderr.
// The client it uses is generated from the app's OpenAPI document and must be up to date.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { spawn } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { unzipSync } from "fflate";
import { eq } from "drizzle-orm";
import { traits } from "../../db/schema/index";
import { apiDocument, generateClient, readTree } from "../../scripts/api-client";
import { createTestApp, type TestApp } from "../support/server";
import { startAppProcess, type AppProcess } from "../support/appProcess";
import { castOfRoles, tokenAgent, type Cast } from "./fixtures";

let app: TestApp;
let proc: AppProcess;
let cast: Cast;
let studyId: string;
let secret: string;
let work: string;

interface Result {
  code: number;
  stdout: string;
  stderr: string;
}

/** Runs `sieve` as a separate process, as a shell script would: by default with SIEVE_URL and SIEVE_TOKEN. */
function sieve(args: string[], env: Record<string, string> = {}): Promise<Result> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["bin/sieve.mjs", ...args], {
      env: { ...process.env, SIEVE_CONFIG: join(work, "cli.json"), SIEVE_URL: proc.url, SIEVE_TOKEN: secret, ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += String(d)));
    child.stderr.on("data", (d) => (stderr += String(d)));
    child.on("close", (code) => resolve({ code: code ?? -1, stdout, stderr }));
  });
}

// Invented taxa of an invented basin across the base of the Danian (66.0 Ma), with a window of 5 Myr:
// nektonic genera last seen in the window (victims), the others ranging through (survivors).
const TRAIT_TABLE = [
  "name,higher_taxon,first_appearance,last_appearance,habit",
  ...Array.from({ length: 30 }, (_, i) => `Clinosulcus ${i + 1},Invented family ${(i % 3) + 1},72,${i % 2 ? 67.5 : 62},${i % 3 ? "nektonic" : "benthic"}`),
].join("\n");
const OCCURRENCES = ["taxon,higher_taxon,max_ma,min_ma,collection", "Clinosulcus 1,Invented family 1,71.5,70.2,C-1", "Clinosulcus 1,Invented family 1,63,62.1,C-2", "Clinosulcus 2,Invented family 2,69,68,C-1"].join("\n");

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  studyId = await cast.makeStudy("Command line study (invented)");
  await app.ctx.db.insert(traits).values({
    studyId,
    key: "habit",
    label: "Habit",
    kind: "binary",
    states: [
      { code: "benthic", label: "Benthic", order: 0 },
      { code: "nektonic", label: "Nektonic", order: 1 },
    ],
  });
  secret = (await tokenAgent(app, cast.people.owner, { studyId, role: "owner" })).secret;
  proc = await startAppProcess();
  work = mkdtempSync(join(tmpdir(), "sieve-cli-"));
  writeFileSync(join(work, "taxa.csv"), TRAIT_TABLE);
  writeFileSync(join(work, "occurrences.csv"), OCCURRENCES);
}, 120_000);
afterAll(async () => {
  await proc?.stop();
  await app?.close();
  if (work) rmSync(work, { recursive: true, force: true });
});

describe("the sieve command line", () => {
  it("signs in with a token and lists the studies it covers", async () => {
    const saved = { SIEVE_URL: "", SIEVE_TOKEN: "" }; // only what login saves
    const login = await sieve(["login", "--url", proc.url, "--token", secret], saved);
    expect(login.code, login.stderr).toBe(0);
    expect(login.stdout).toMatch(/covers 1 study/);
    expect(statSync(join(work, "cli.json")).mode & 0o777).toBe(0o600);
    const studies = await sieve(["studies", "--json"], saved);
    expect(studies.code, studies.stderr).toBe(0);
    expect(JSON.parse(studies.stdout)).toEqual([expect.objectContaining({ id: studyId, role: "owner" })]);
  });

  it("uploads a trait table, shows its problems and commits it; then an occurrence file", async () => {
    const up = await sieve(["upload", join(work, "taxa.csv"), "--study", studyId, "--json"]);
    expect(up.code, up.stderr).toBe(0);
    const uploaded = JSON.parse(up.stdout);
    expect(uploaded.preview.problemCount).toBe(0);
    writeFileSync(join(work, "mapping.json"), JSON.stringify(uploaded.mapping));
    const problems = await sieve(["problems", uploaded.upload.id, "--study", studyId, "--mapping", join(work, "mapping.json")]);
    expect(problems.code, problems.stderr).toBe(0);
    expect(problems.stdout).toMatch(/No problems/);
    const commit = await sieve(["commit", uploaded.upload.id, "--study", studyId, "--mapping", join(work, "mapping.json")]);
    expect(commit.code, commit.stderr).toBe(0);
    expect(commit.stdout).toMatch(/Committed taxa\.csv: 30 valid rows \(30 new/);

    const occurrences = await sieve(["upload", join(work, "occurrences.csv"), "--study", studyId, "--kind", "occurrences", "--commit"]);
    expect(occurrences.code, occurrences.stderr).toBe(0);
    expect(occurrences.stdout).toMatch(/Committed occurrences\.csv: 3 valid rows/);
  });

  it("names each problem by row and column and exits 1 when an upload has problems", async () => {
    writeFileSync(join(work, "bad.csv"), "name,first_appearance,last_appearance\nVexilla (invented),60,70\n");
    const up = await sieve(["upload", join(work, "bad.csv"), "--study", studyId]);
    expect(up.code, up.stderr).toBe(0);
    // The first data row is row 2: rows are counted as a spreadsheet shows them, header first.
    expect(up.stdout).toMatch(/row 2, column first_appearance: First appearance \(60 Ma\) is younger than last appearance \(70 Ma\)/);
    const id = /upload id ([0-9a-f-]{36})/.exec(up.stdout)![1];
    writeFileSync(join(work, "bad-mapping.json"), JSON.stringify({ name: "name", firstAppearance: "first_appearance", lastAppearance: "last_appearance" }));
    const problems = await sieve(["problems", id, "--study", studyId, "--mapping", join(work, "bad-mapping.json")]);
    expect(problems.code).toBe(1);
    expect(problems.stdout).toMatch(/row 2, column first_appearance/);
    const commit = await sieve(["commit", id, "--study", studyId, "--mapping", join(work, "bad-mapping.json")]);
    expect(commit.code).toBe(1);
    expect(commit.stderr).toMatch(/^sieve: The app answered 400/);
  });

  it("starts a run from a parameter file, waits with a progress line and downloads its exports", async () => {
    const [habit] = await app.ctx.db.select().from(traits).where(eq(traits.studyId, studyId));
    writeFileSync(join(work, "params.json"), JSON.stringify({ name: "Scripted run", boundaries: [{ boundaryMa: 66, windowMyr: 5 }], traits: [{ traitId: habit.id }] }));
    const run = await sieve(["run", "--study", studyId, "--params", join(work, "params.json"), "--wait", "--json"]);
    expect(run.code, run.stderr).toBe(0);
    expect(run.stderr).toMatch(/succeeded 100%/);
    const finished = JSON.parse(run.stdout);
    expect(finished.status).toBe("succeeded");
    // 30 taxa: 15 last seen in the window (victims), 15 ranging through (survivors).
    expect(finished.results.boundaries[0]).toMatchObject({ victims: 15, survivors: 15 });

    for (const [format, file] of [["csv", "run.csv"], ["json", "run.json"], ["rerun", "run-rerun.zip"]]) {
      const out = join(work, file);
      const res = await sieve(["export", finished.id, "--study", studyId, "--format", format, "--out", out]);
      expect(res.code, res.stderr).toBe(0);
      expect(existsSync(out)).toBe(true);
    }
    expect(readFileSync(join(work, "run.csv"), "utf8")).toMatch(/^table,/);
    expect(JSON.parse(readFileSync(join(work, "run.json"), "utf8")).id).toBe(finished.id);
    expect(Object.keys(unzipSync(readFileSync(join(work, "run-rerun.zip")))).some((n) => n.endsWith("/rerun.R"))).toBe(true);
  });

  it("fails with a reason on stderr and a non-zero exit: bad token, unknown study, usage", async () => {
    const badToken = await sieve(["studies"], { SIEVE_URL: proc.url, SIEVE_TOKEN: "sieve_wrong" });
    expect(badToken.code).toBe(1);
    expect(badToken.stderr).toMatch(/401: This API token is unknown, expired or revoked/);
    const otherStudy = await sieve(["run", "--study", await cast.makeStudy("Not covered"), "--params", join(work, "params.json")]);
    expect(otherStudy.code).toBe(1);
    expect(otherStudy.stderr).toMatch(/403: This API token does not cover this study/);
    const usage = await sieve(["export", "00000000-0000-4000-8000-000000000000"]);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/Missing --study/);
    const down = await sieve(["studies"], { SIEVE_URL: "http://127.0.0.1:9", SIEVE_TOKEN: secret });
    expect(down.code).toBe(1);
    expect(down.stderr).toMatch(/could not be reached/);
  });

  it("uses a client generated from the app's current OpenAPI document (npm run api:client)", async () => {
    const document = apiDocument();
    expect(JSON.parse(readFileSync("cli/openapi.json", "utf8")), "cli/openapi.json is stale: run npm run api:client").toEqual(document);
    const scratch = mkdtempSync(join(tmpdir(), "sieve-client-check-"));
    try {
      await generateClient(document, scratch);
      expect(readTree("cli/generated"), "cli/generated is stale: run npm run api:client").toEqual(readTree(scratch));
    } finally {
      rmSync(scratch, { recursive: true, force: true });
    }
  });
});
