// Selectivity runs through the API, on an invented study with planted effects: a feeding mode that
// truly raises the odds of extinction, and a life habit that only shares a hard-hit clade with
// extinction. The run finds the first and flags the second; a reopened run returns the same
// numbers; a re-run on changed data reads a different hash and the comparison shows the change; an
// interrupted run is swept to failed and can be retried.
import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { and, eq, inArray, sql, type SQL } from "drizzle-orm";
import { randomUUID } from "node:crypto";
import PgBoss from "pg-boss";
import { SELECTIVITY_RUN_JOB } from "../../server/services/runJob";
import Papa from "papaparse";
import { activity, runs, taxa, traits } from "../../db/schema/index";
import { runParamsSchema, type Run, type RunList, type RunParamsInput, type RunPreview } from "../../shared/schemas/runs";
import type { RunDiff } from "../../shared/schemas/runDiff";
import { createTestApp, type TestApp } from "../support/server";
import { castOfRoles, type Cast } from "./fixtures";
import { HARD_HIT, NO_HABIT, NOT_AT_RISK, plantedTaxa, SPARED } from "../support/plantedSelectivity";

const APP_VERSION = (JSON.parse(readFileSync(new URL("../../package.json", import.meta.url), "utf8")) as { version: string }).version;
const CAUTION = "Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.";

let app: TestApp;
let cast: Cast;
let studyId: string;
let feedingId: string;
let habitId: string;

// ---------------------------------------------------------------- the invented study (tests/support/plantedSelectivity.ts)

const PLANTED = plantedTaxa("Sievella");
const VICTIMS = PLANTED.filter((t) => t.victim).length;
const SURVIVORS = PLANTED.length - VICTIMS;

async function buildStudy(): Promise<void> {
  studyId = await cast.makeStudy("Invented basin: planted selectivity");
  const [feeding, habit] = await app.ctx.db
    .insert(traits)
    .values([
      {
        studyId,
        key: "feeding",
        label: "Feeding mode",
        kind: "categorical",
        states: [
          { code: "suspension", label: "Suspension feeder", order: 0 },
          { code: "deposit", label: "Deposit feeder", order: 1 },
        ],
        sortOrder: 0,
      },
      {
        studyId,
        key: "life_habit",
        label: "Life habit",
        kind: "categorical",
        states: [
          { code: "epifaunal", label: "Epifaunal", order: 0 },
          { code: "infaunal", label: "Infaunal", order: 1 },
        ],
        sortOrder: 1,
      },
    ])
    .returning();
  feedingId = feeding.id;
  habitId = habit.id;
  // Survivors range across 66 Ma; victims are last seen at 67 Ma, inside the Maastrichtian window
  // below it; the not-at-risk taxa were gone long before.
  await app.ctx.db.insert(taxa).values([
    ...PLANTED.map((t) => ({
      studyId,
      name: t.name,
      higherTaxon: t.clade,
      fadMa: 70,
      ladMa: t.victim ? 67 : 60,
      traitValues: { [feedingId]: t.feeding, ...(t.habit ? { [habitId]: t.habit } : {}) },
    })),
    ...Array.from({ length: NOT_AT_RISK }, (_, k) => ({
      studyId,
      name: `Priscella ${k + 1} (invented)`,
      higherTaxon: SPARED[1],
      fadMa: 100,
      ladMa: 90,
      traitValues: { [feedingId]: "deposit", [habitId]: "epifaunal" },
    })),
  ]);
}

const params = (extra: Partial<RunParamsInput> = {}): RunParamsInput => ({
  name: "Planted effects",
  boundaries: [{ boundaryMa: 66 }],
  traits: [
    { traitId: feedingId, reference: "deposit" },
    { traitId: habitId, reference: "epifaunal" },
  ],
  ...extra,
});

/** Polls a run until it has finished (the client polls the same way). */
async function finished(runId: string): Promise<Run> {
  const deadline = Date.now() + 60_000;
  for (;;) {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${runId}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    if (res.body.status === "succeeded" || res.body.status === "failed") return res.body as Run;
    if (Date.now() > deadline) throw new Error(`Run ${runId} is still ${res.body.status} (${res.body.progressNote})`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

async function startRun(body: RunParamsInput): Promise<Run> {
  const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs`).send(body);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return res.body as Run;
}

beforeAll(async () => {
  app = await createTestApp();
  cast = await castOfRoles(app);
  await buildStudy();
}, 60_000);
afterAll(() => app.close());

// ---------------------------------------------------------------- preview

describe("preview", () => {
  it("counts survivors, victims, taxa not at risk and taxa dropped for a missing value, without running tests", async () => {
    const res = await cast.people.viewer.agent.post(`/api/studies/${studyId}/runs/preview`).send(params());
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const [b] = (res.body as RunPreview).boundaries;
    expect(b).toMatchObject({ boundaryMa: 66, victims: VICTIMS, survivors: SURVIVORS, notAtRisk: NOT_AT_RISK, completeCases: PLANTED.length - NO_HABIT });
    // The default window is the stage below 66 Ma: the Maastrichtian, 72.2 - 66 Ma (ICS chart v2024/12).
    expect(b.windowMyr).toBeCloseTo(6.2, 9);
    expect(b.windowDefaultFrom?.name).toBe("Maastrichtian");
    const [feeding, habit] = b.traits;
    expect(feeding).toMatchObject({ key: "feeding", used: PLANTED.length, droppedMissing: 0, reference: "deposit" });
    expect(habit).toMatchObject({ key: "life_habit", used: PLANTED.length - NO_HABIT, droppedMissing: NO_HABIT, reference: "epifaunal" });
    const infaunal = PLANTED.filter((t) => t.habit === "infaunal");
    expect(habit.states.find((s) => s.code === "infaunal")).toMatchObject({
      victims: infaunal.filter((t) => t.victim).length,
      survivors: infaunal.filter((t) => !t.victim).length,
    });
    expect(b.summary).toContain(`${NO_HABIT} taxa dropped for missing values`);
    // Nothing is stored by a preview.
    const list = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs`);
    expect(list.body.total).toBe(0);
  });

  it("previews several boundaries, each with its own window and label", async () => {
    const res = await cast.people.viewer.agent
      .post(`/api/studies/${studyId}/runs/preview`)
      .send(params({ boundaries: [{ boundaryMa: 66 }, { boundaryMa: 66, windowMyr: 0.5, label: "66 Ma, half a million years below" }] }));
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const [stage, narrow] = (res.body as RunPreview).boundaries;
    expect(stage.victims).toBe(VICTIMS);
    // Victims were last seen at 67 Ma, outside a 0.5 Myr window (66 to 66.5 Ma): none is at risk.
    expect(narrow).toMatchObject({ label: "66 Ma, half a million years below", windowMyr: 0.5, windowDefaultFrom: null, victims: 0, survivors: SURVIVORS });
    expect(narrow.notAtRisk).toBe(NOT_AT_RISK + VICTIMS);
  });

  it("names the parameter that does not fit the codebook", async () => {
    const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs/preview`).send(
      params({
        traits: [
          { traitId: feedingId, reference: "grazer" },
          { traitId: habitId, transform: "log10" },
          { traitId: "00000000-0000-4000-8000-000000000000" },
        ],
      }),
    );
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toMatchObject({
      "traits.0.reference": expect.stringContaining("not a state of Feeding mode"),
      "traits.1.transform": expect.stringContaining("Only numeric traits"),
      "traits.2.traitId": expect.stringContaining("No trait of this study"),
    });
  });

  it("refuses malformed parameters with the field at fault", async () => {
    const none = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs`).send(params({ boundaries: [] }));
    expect(none.status).toBe(400);
    expect(none.body.error.fields.boundaries).toMatch(/at least one boundary/);
    const twice = await cast.people.analyst.agent
      .post(`/api/studies/${studyId}/runs`)
      .send(params({ traits: [{ traitId: feedingId }, { traitId: feedingId }] }));
    expect(twice.status).toBe(400);
    expect(twice.body.error.fields["traits.1.traitId"]).toMatch(/same trait/);
    // Below the oldest stage (base of the Fortunian, 538.8 Ma) there is no default window.
    const deep = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs`).send(params({ boundaries: [{ boundaryMa: 600 }] }));
    expect(deep.status).toBe(400);
    expect(deep.body.error.fields["boundaries.0.windowMyr"]).toMatch(/give a window/);
    const list = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs`);
    expect(list.body.total, "nothing is stored for refused parameters").toBe(0);
  });
});

// ---------------------------------------------------------------- a run, reopened, re-run, compared, exported

describe("a run on the planted study", () => {
  let first: Run;

  beforeAll(async () => {
    const queued = await startRun(params({ name: "=SUM(1,2) planted effects" }));
    expect(queued).toMatchObject({ status: "queued", results: null, attempt: 1, rerunOf: null });
    first = await finished(queued.id);
  }, 90_000);

  it("finds the feeding mode that raises extinction odds", () => {
    expect(first.status, first.error ?? "").toBe("succeeded");
    const result = first.results!.boundaries[0].result;
    expect(result.design).toMatchObject({ victims: VICTIMS, survivors: SURVIVORS });
    const feeding = result.traits.find((t) => t.key === "feeding")!;
    expect(feeding.test.adjustedPValue).toBeLessThan(0.05);
    const [contrast] = feeding.contrasts;
    expect(contrast).toMatchObject({ state: "suspension", reference: "deposit" });
    expect(contrast.crude.estimate).toBeGreaterThan(1);
    expect(contrast.crude.ci[0]).toBeGreaterThan(1);
    // Worked by hand from the stored table: sample odds ratio ad / bc with a = suspension victims,
    // b = suspension survivors, c = deposit victims, d = deposit survivors.
    const [s, d] = feeding.table;
    expect(contrast.crude.estimate).toBeCloseTo((s.victims * d.survivors) / (s.survivors * d.victims), 9);
    // Every clade's table has the planted odds ratio 8/3, so the Mantel-Haenszel ratio over clades,
    // sum(a_i d_i / n_i) / sum(b_i c_i / n_i), is 8/3 too (worked by hand: a_i d_i = 8/3 b_i c_i in each term).
    expect(contrast.cladeAdjusted!.estimate).toBeCloseTo(8 / 3, 9);
  });

  it("flags the life habit that only shares a clade with extinction", () => {
    const habit = first.results!.boundaries[0].result.traits.find((t) => t.key === "life_habit")!;
    const [contrast] = habit.contrasts;
    expect(contrast).toMatchObject({ state: "infaunal", reference: "epifaunal", flagged: true });
    expect(contrast.crude.estimate).toBeGreaterThan(1.5);
    expect(habit.confoundingNote).toMatch(/\w+/);
    // Mantel-Haenszel common odds ratio over clades (Mantel & Haenszel 1959, J Natl Cancer Inst
    // 22:719): sum(a_i d_i / n_i) / sum(b_i c_i / n_i), computed here from the planted taxa.
    let numerator = 0;
    let denominator = 0;
    for (const clade of [...HARD_HIT, ...SPARED]) {
      const coded = PLANTED.filter((t) => t.clade === clade && t.habit !== null);
      const cell = (habit: string, victim: boolean) => coded.filter((t) => t.habit === habit && t.victim === victim).length;
      numerator += (cell("infaunal", true) * cell("epifaunal", false)) / coded.length;
      denominator += (cell("infaunal", false) * cell("epifaunal", true)) / coded.length;
    }
    expect(contrast.cladeAdjusted!.estimate).toBeCloseTo(numerator / denominator, 9);
    // Both habits die at the same rate within each clade, so every clade's odds ratio is 1 and so is theirs.
    expect(contrast.cladeAdjusted!.estimate).toBeCloseTo(1, 9);
  });

  it("stores the parameters, a hash of the data read, the row count, the app version, who and when, and the cautions", () => {
    expect(first.params).toMatchObject({ correction: "bh", forceFirth: false, level: 0.95, stratifyBy: "higherTaxon" });
    expect(first.dataHash).toMatch(/^[0-9a-f]{64}$/);
    expect(first.dataHashShort).toBe(first.dataHash!.slice(0, 12));
    expect(first.rowCount).toBe(PLANTED.length);
    expect(first.appVersion).toBe(APP_VERSION);
    expect(first.createdBy).toEqual({ id: cast.people.analyst.user.id, name: cast.people.analyst.user.name });
    expect(first.progress).toBe(1);
    expect(first.startedAt && first.finishedAt).toBeTruthy();
    expect(first.results!.cautions[0]).toBe(CAUTION);
    expect(first.results!.traits.map((t) => t.key)).toEqual(["feeding", "life_habit"]);
  });

  it("is reopened with identical numbers, without recomputing", async () => {
    const again = await cast.people.reviewer.agent.get(`/api/studies/${studyId}/runs/${first.id}`);
    expect(again.body).toEqual(first);
    const exported = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}/export?format=json`);
    expect(exported.status).toBe(200);
    expect(exported.headers["content-disposition"]).toMatch(/^attachment; filename="sum12-planted-effects_\d{4}-\d\d-\d\d_[0-9a-f]{12}\.json"$/);
    expect(JSON.parse(exported.text)).toEqual(first);
  });

  it("recorded its start and its end in the study's activity", async () => {
    const rows = await app.ctx.db.select().from(activity).where(and(eq(activity.refType, "run"), eq(activity.refId, first.id)));
    expect(rows.map((r) => r.kind).sort()).toEqual(["run.started", "run.succeeded"]);
  });

  it("exports its tables as CSV with formula injection neutralised", async () => {
    const all = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}/export?format=csv`);
    expect(all.status).toBe(200);
    expect(all.headers["content-type"]).toMatch(/^text\/csv/);
    const lines = all.text.split("\r\n");
    expect(lines[0].startsWith("table,field,value,boundary_ma,")).toBe(true);
    const tablesPresent = new Set(lines.slice(1).filter(Boolean).map((l) => l.split(",")[0]));
    // one boundary: no crisis table; the robustness panel is computed for every run
    expect([...tablesPresent]).toEqual(["run", "design", "states", "tests", "contrasts", "coefficients", "terms", "robustness"]);
    // The run's name starts with "=": a spreadsheet must read it as text (OWASP, CSV Injection).
    expect(all.text).toContain(`run,name,"'=SUM(1,2) planted effects"`);
    expect(all.text).toContain(`run,data_hash_sha256,${first.dataHash}`);
    expect(all.text).toContain(CAUTION);

    const contrasts = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}/export?format=csv&table=contrasts`);
    const [columns, ...rows] = Papa.parse<string[]>(contrasts.text.trim()).data;
    expect(columns.slice(0, 6)).toEqual(["boundary_ma", "window_myr", "boundary_label", "trait_key", "trait_label", "contrast"]);
    expect(rows.every((r) => r.length === columns.length)).toBe(true);
    const feedingRow = rows.find((cells) => cells[3] === "feeding")!;
    const stored = first.results!.boundaries[0].result.traits[0].contrasts[0];
    expect(Number(feedingRow[columns.indexOf("crude_or")])).toBe(stored.crude.estimate);
    expect(feedingRow[columns.indexOf("flagged")]).toBe(String(stored.flagged));

    const bad = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}/export?format=csv&table=everything`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.table).toMatch(/table must be one of/);
  });

  it("re-run on unchanged data reads the same hash and the same numbers", async () => {
    const res = await cast.people.owner.agent.post(`/api/studies/${studyId}/runs/${first.id}/rerun`).send({});
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    expect(res.body.rerunOf).toBe(first.id);
    const rerun = await finished(res.body.id);
    expect(rerun.status, rerun.error ?? "").toBe("succeeded");
    expect(rerun.dataHash).toBe(first.dataHash);
    expect(rerun.results).toEqual(first.results);
    const diff = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${rerun.id}/diff?against=${first.id}`)).body as RunDiff;
    expect(diff.hashChanged).toBe(false);
    expect(diff.paramsChanged).toEqual([]);
    expect(diff.boundaries[0].traits.every((t) => !t.changed)).toBe(true);
    // The checks of the findings: the robustness panel in both runs, the same verdicts; no sampling
    // covariates asked for and one boundary only (no crisis), so nothing to compare there.
    expect(diff.boundaries[0].robustness).toMatchObject({ base: { status: "computed" }, run: { status: "computed" }, note: null, changes: [], changed: false });
    expect(diff.boundaries[0].robustness.contrasts.length).toBeGreaterThan(0);
    expect(diff.boundaries[0].sampling).toMatchObject({ base: { status: "absent" }, run: { status: "absent" }, note: null, contrasts: [] });
    expect(diff.crisis).toMatchObject({ base: { status: "not-computed" }, run: { status: "not-computed" }, note: null, changes: [], changed: false });
  });

  it("compares the verdicts of the run's checks, and names the checks a run saved before them lacks", async () => {
    const stored = first.results!;
    expect(stored.robustness?.status).toBe("computed");
    if (stored.robustness?.status !== "computed") return;
    const panel = stored.robustness.boundaries[0].panel!;
    const insertCopy = async (name: string, results: Record<string, unknown>) =>
      (
        await app.ctx.db
          .insert(runs)
          .values({ studyId, name, params: first.params as unknown as Record<string, unknown>, appVersion: "invented", status: "succeeded", progress: 1, dataHash: first.dataHash, rowCount: first.rowCount, results })
          .returning()
      )[0];
    const diffOf = async (runId: string, againstId: string) => {
      const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${runId}/diff?against=${againstId}`);
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      return res.body as RunDiff;
    };

    // The first run as a run saved before runs computed the robustness panel and crisis against background.
    const { robustness: _panel, crisisVersusBackground: _crisis, ...beforeChecks } = stored;
    void _panel;
    void _crisis;
    const older = await insertCopy("Planted effects, saved before the checks (invented)", beforeChecks);

    // The first run with invented verdicts: the life habit's crude robustness verdict turned, and a
    // sampling check saying its contrast does not hold once sampling is allowed for.
    const habit = panel.contrasts.find((c) => c.traitKey === "life_habit")!;
    const turned = habit.verdict.crude.status === "holds" ? "never-there" : "holds";
    const edited = structuredClone(stored);
    if (edited.robustness?.status !== "computed") return;
    edited.robustness.boundaries[0].panel!.contrasts.find((c) => c.traitKey === "life_habit")!.verdict.crude = { status: turned, changedUnder: [], sentence: "Invented for this test." };
    edited.boundaries[0].sampling = {
      covariates: ["occurrences"],
      taxa: PLANTED.length,
      withoutOccurrences: 0,
      covariateTerms: [],
      contrasts: [{ traitKey: "life_habit", traitLabel: "Life habit", state: "infaunal", contrast: habit.contrast, withoutSampling: null, withSampling: null, verdict: "does_not_hold", words: "Invented for this test." }],
      note: null,
      method: "Invented for this test.",
      caution: "Invented for this test.",
    };
    const invented = await insertCopy("Planted effects, verdicts invented", edited as unknown as Record<string, unknown>);
    try {
      const fromOlder = await diffOf(first.id, older.id);
      expect(fromOlder.boundaries[0].robustness).toMatchObject({
        base: { status: "absent" },
        run: { status: "computed" },
        note: "Not in the earlier run: it was saved before runs computed a robustness panel.",
        changes: [],
        changed: false,
      });
      // The older run has no crisis part; the first run did not compute one (one boundary): no note either way.
      expect(fromOlder.crisis).toMatchObject({ base: { status: "absent" }, run: { status: "not-computed" }, note: null, changes: [] });

      const words = { holds: "holds", fragile: "fragile", "never-there": "never there", "not-estimated": "not estimated" } as const;
      const toInvented = await diffOf(invented.id, first.id);
      expect(toInvented.boundaries[0].robustness.changes).toContain(`Life habit, ${habit.contrast} (crude): ${words[habit.verdict.crude.status]} → ${words[turned]}`);
      expect(toInvented.boundaries[0].robustness.contrasts.filter((c) => c.changed).map((c) => c.traitKey)).toEqual(["life_habit"]);
      expect(toInvented.boundaries[0].sampling).toMatchObject({
        base: { status: "absent" },
        run: { status: "computed" },
        note: "Not in the earlier run: it added no sampling covariates, or was saved before runs could.",
        changes: [],
      });
      // Compared the other way, the stored sampling check is the one the later run lacks.
      const back = await diffOf(first.id, invented.id);
      expect(back.boundaries[0].sampling.note).toBe("Not in the later run: it added no sampling covariates, or was saved before runs could.");
      expect(back.boundaries[0].robustness.changes).toContain(`Life habit, ${habit.contrast} (crude): ${words[turned]} → ${words[habit.verdict.crude.status]}${habit.verdict.crude.status === "fragile" ? ` (changes under ${habit.verdict.crude.changedUnder.join("; ")})` : ""}`);
    } finally {
      await app.ctx.db.delete(runs).where(inArray(runs.id, [older.id, invented.id]));
    }
  });

  it("re-run after a value changed reads a different hash, and the comparison shows what changed", async () => {
    // One deposit-feeding victim is recoded as a suspension feeder.
    const recoded = PLANTED.find((t) => t.feeding === "deposit" && t.victim && t.habit !== null)!;
    await app.ctx.db
      .update(taxa)
      .set({ traitValues: { [feedingId]: "suspension", [habitId]: recoded.habit! } })
      .where(and(eq(taxa.studyId, studyId), eq(taxa.name, recoded.name)));
    try {
      const res = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs/${first.id}/rerun`).send({ name: "Planted effects, recoded" });
      expect(res.status).toBe(202);
      const rerun = await finished(res.body.id);
      expect(rerun).toMatchObject({ status: "succeeded", name: "Planted effects, recoded", rerunOf: first.id, rowCount: first.rowCount });
      expect(rerun.dataHash).not.toBe(first.dataHash);

      const res2 = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${rerun.id}/diff?against=${first.id}`);
      expect(res2.status, JSON.stringify(res2.body)).toBe(200);
      const diff = res2.body as RunDiff;
      expect(diff).toMatchObject({ hashChanged: true, rowCount: { base: PLANTED.length, run: PLANTED.length, change: 0 }, paramsChanged: [] });
      const feeding = diff.boundaries[0].traits.find((t) => t.key === "feeding")!;
      expect(feeding.changed).toBe(true);
      const contrast = feeding.contrasts[0];
      expect(contrast.crudeOddsRatio.base).toBe(first.results!.boundaries[0].result.traits[0].contrasts[0].crude.estimate);
      expect(contrast.crudeOddsRatio.run).toBe(rerun.results!.boundaries[0].result.traits[0].contrasts[0].crude.estimate);
      // One more suspension-feeding victim and one fewer deposit-feeding victim raise the odds ratio.
      expect(contrast.crudeOddsRatio.run!).toBeGreaterThan(contrast.crudeOddsRatio.base!);
      // The first run is untouched by the change.
      const reopened = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}`);
      expect(reopened.body).toEqual(first);
    } finally {
      await app.ctx.db
        .update(taxa)
        .set({ traitValues: { [feedingId]: recoded.feeding, [habitId]: recoded.habit! } })
        .where(and(eq(taxa.studyId, studyId), eq(taxa.name, recoded.name)));
    }
  });

  it("lists runs newest first with status, who, when and the short hash", async () => {
    const res = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs?pageSize=2`);
    expect(res.status).toBe(200);
    const list = res.body as RunList;
    expect(list.total).toBeGreaterThanOrEqual(3);
    expect(list.runs).toHaveLength(2);
    expect(list.runs[0].createdAt >= list.runs[1].createdAt).toBe(true);
    expect(list.runs[0]).not.toHaveProperty("results");
    const all = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs?pageSize=100`)).body as RunList;
    const listed = all.runs.find((r) => r.id === first.id)!;
    expect(listed).toMatchObject({ status: "succeeded", dataHashShort: first.dataHash!.slice(0, 12), createdBy: first.createdBy, name: first.name });
  });

  it("refuses to retry a run that did not fail, and to compare with an unfinished run", async () => {
    const retry = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs/${first.id}/retry`);
    expect(retry.status).toBe(409);
    expect(retry.body.error.message).toMatch(/Only a failed run can be retried; this one is succeeded/);
    const [queued] = await app.ctx.db
      .insert(runs)
      .values({ studyId, name: "Waiting", params: first.params as unknown as Record<string, unknown>, appVersion: APP_VERSION, status: "queued" })
      .returning();
    const diff = await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${first.id}/diff?against=${queued.id}`);
    expect(diff.status).toBe(409);
    expect(diff.body.error.fields.against).toMatch(/queued/);
    await app.ctx.db.delete(runs).where(eq(runs.id, queued.id));
  });

  it("answers 404 for a run of another study", async () => {
    const other = await cast.makeStudy("Another invented study");
    const res = await cast.people.viewer.agent.get(`/api/studies/${other}/runs/${first.id}`);
    expect(res.status).toBe(404);
  });
});

// ---------------------------------------------------------------- failures

describe("a run that cannot be computed", () => {
  it("fails with a reason a person can act on", async () => {
    // The trait was deleted after the run was queued: the job finds its parameters no longer fit.
    const stored = runParamsSchema.parse(params({ name: "Trait gone", traits: [{ traitId: "00000000-0000-4000-8000-000000000001" }] }));
    const [queued] = await app.ctx.db
      .insert(runs)
      .values({ studyId, name: stored.name, params: stored as unknown as Record<string, unknown>, appVersion: APP_VERSION, createdBy: cast.people.analyst.user.id })
      .returning();
    await app.ctx.jobs.send("selectivity-run", { runId: queued.id, attempt: 1 });
    const failed = await finished(queued.id);
    expect(failed.status).toBe("failed");
    expect(failed.error).toMatch(/No trait of this study has this id/);
    expect(failed.results).toBeNull();
    const rows = await app.ctx.db.select().from(activity).where(and(eq(activity.refId, queued.id), eq(activity.kind, "run.failed")));
    expect(rows[0]?.summary).toMatch(/The run "Trait gone" failed: /);
  });
});

// ---------------------------------------------------------------- interrupted runs

/** A run row written directly, as a process would have left it, its heartbeat some seconds old. */
function insertRun(name: string, heartbeatSecondsAgo: number, fields: Omit<Partial<typeof runs.$inferInsert>, "startedAt"> & { startedAt?: SQL }) {
  const stored = runParamsSchema.parse(params({ name }));
  return app.ctx.db
    .insert(runs)
    .values({
      studyId,
      name,
      params: stored as unknown as Record<string, unknown>,
      appVersion: APP_VERSION,
      createdBy: cast.people.analyst.user.id,
      heartbeatAt: sql`now() - make_interval(secs => ${heartbeatSecondsAgo})`,
      ...fields,
    })
    .returning();
}

describe("a run interrupted by a crash", () => {
  it("is marked failed with its reason by the sweep, and can be retried", async () => {
    const insert = (name: string, heartbeatSecondsAgo: number) =>
      insertRun(name, heartbeatSecondsAgo, { status: "running", progress: 0.4, startedAt: sql`now() - interval '15 minutes'` });
    // A process that stopped ten minutes ago, and one still beating.
    const [stopped] = await insert("Interrupted", 600);
    const [alive] = await insert("Still computing", 1);

    await app.ctx.services.runs.sweepInterrupted();

    const swept = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${stopped.id}`)).body as Run;
    expect(swept.status).toBe("failed");
    const lastBeat = stopped.heartbeatAt!.toISOString().replace("T", " ").replace(/\.\d+Z$/, " UTC");
    expect(swept.error).toBe(
      `Interrupted: the process computing this run stopped before it finished (no heartbeat since ${lastBeat}). Retry to compute it again.`,
    );
    const untouched = (await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${alive.id}`)).body as Run;
    expect(untouched.status).toBe("running");
    await app.ctx.db.delete(runs).where(eq(runs.id, alive.id));

    const failedActivity = await app.ctx.db.select().from(activity).where(and(eq(activity.refId, stopped.id), eq(activity.kind, "run.failed")));
    expect(failedActivity).toHaveLength(1);

    const retried = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs/${stopped.id}/retry`);
    expect(retried.status, JSON.stringify(retried.body)).toBe(202);
    expect(retried.body).toMatchObject({ id: stopped.id, status: "queued", attempt: 2, error: null });
    const done = await finished(stopped.id);
    expect(done.status, done.error ?? "").toBe("succeeded");
    expect(done.results!.boundaries[0].result.design).toMatchObject({ victims: VICTIMS, survivors: SURVIVORS });
  });
});

describe("a queued run whose job was lost", () => {
  it("is marked failed with the reason when its job is gone or was never sent, and left alone while its job waits", async () => {
    // While queued, the heartbeat holds when the attempt was queued.
    const insert = (name: string, jobId: string | null, queuedSecondsAgo: number) => insertRun(name, queuedSecondsAgo, { status: "queued", jobId });
    // A real job that waits in the queue for an hour (no process takes it before then).
    const boss = new PgBoss({ connectionString: process.env.DATABASE_URL!, schedule: false, supervise: false });
    await boss.start();
    try {
      const [waiting] = await insert("Waiting behind a long queue", null, 600);
      const waitingJob = await boss.send(SELECTIVITY_RUN_JOB, { runId: waiting.id, attempt: 1 }, { startAfter: 3600 });
      await app.ctx.db.update(runs).set({ jobId: waitingJob }).where(eq(runs.id, waiting.id));
      const [dropped] = await insert("Job dropped", randomUUID(), 600);
      const [neverSent] = await insert("Never queued", null, 600);
      const [justQueued] = await insert("Just queued", null, 1);

      const swept = await app.ctx.services.runs.sweepInterrupted();
      expect(swept).toEqual(expect.arrayContaining([dropped.id, neverSent.id]));
      const read = async (id: string) => (await cast.people.viewer.agent.get(`/api/studies/${studyId}/runs/${id}`)).body as Run;
      expect(await read(dropped.id)).toMatchObject({ status: "failed", error: "The queue dropped this run's job before any process took it. Retry to queue it again." });
      expect(await read(neverSent.id)).toMatchObject({
        status: "failed",
        error: "This run was saved but never reached the job queue (the process stopped in between). Retry to queue it.",
      });
      expect((await read(waiting.id)).status).toBe("queued");
      expect((await read(justQueued.id)).status).toBe("queued");

      // A retry queues it again, now with a job that a process takes.
      const retried = await cast.people.analyst.agent.post(`/api/studies/${studyId}/runs/${neverSent.id}/retry`);
      expect(retried.status, JSON.stringify(retried.body)).toBe(202);
      expect((await finished(neverSent.id)).status).toBe("succeeded");
      await boss.cancel(SELECTIVITY_RUN_JOB, waitingJob!);
      await app.ctx.db.delete(runs).where(inArray(runs.id, [waiting.id, justQueued.id]));
    } finally {
      await boss.stop({ graceful: false });
    }
  });
});
