// The default analysis on the invented demo study finds what the generator planted: a narrow
// geographic range and deposit feeding raise the odds of dying out at the base of the Turonian,
// and the infaunal life habit, which has no effect of its own, is flagged by the confounding check
// because most infaunal genera belong to the hard-hit family. The runs the seed saved read the
// same data and give the same numbers as a run computed through the job queue.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { eq } from "drizzle-orm";
import { comparisons, modernLists } from "../../db/schema/index";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { DEMO_COMPARISON_NAME, DEMO_CRISIS_RUN_NAME, DEMO_SWEEP_RUN_NAME, DEMO_SWEEP_STAGES } from "../../scripts/seed/demo/analyses";
import { generateDemoStudy, MODERN_CROSSWALK } from "../../scripts/seed/demo/generator";
import type { Crosswalk } from "../../shared/comparison/index";
import type { ComparisonResults } from "../../shared/schemas/comparisons";
import type { Run, RunList, RunParamsInput } from "../../shared/schemas/runs";
import type { Trait } from "../../shared/schemas/traits";
import { findUnit } from "../../shared/timescale/index";
import { createTestApp, uniqueEmail, type TestApp } from "../support/server";

const data = generateDemoStudy();
const planted = data.plantedEffects;
// Unique addresses: the test database is shared by every API test file.
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`demo-analysis-${a.role}`) }));

let app: TestApp;
let seeded: DemoSeedResult;
let analyst: ReturnType<typeof request.agent>;
let codebook: Trait[];
let run: Run;

const traitId = (key: string) => codebook.find((t) => t.key === key)!.id;

/** Polls a run until it has finished, as the Selectivity screen does. */
async function finished(studyId: string, runId: string): Promise<Run> {
  const deadline = Date.now() + 120_000;
  for (;;) {
    const res = await analyst.get(`/api/studies/${studyId}/runs/${runId}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    if (res.body.status === "succeeded" || res.body.status === "failed") return res.body as Run;
    if (Date.now() > deadline) throw new Error(`Run ${runId} is still ${res.body.status} (${res.body.progressNote})`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

beforeAll(async () => {
  app = await createTestApp();
  seeded = await seedDemo(app.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
  analyst = request.agent(app.app);
  const account = accounts.find((a) => a.role === "analyst")!;
  const login = await analyst.post("/api/auth/login").send({ email: account.email, password: account.password });
  expect(login.status).toBe(200);
  codebook = (await analyst.get(`/api/studies/${seeded.studyId}/traits`)).body.traits as Trait[];

  // What the Selectivity screen sends by default: every trait with no reference (the most common
  // state) and the codebook's transform, one boundary with the default window, the default options.
  const body: RunParamsInput = {
    name: "Selectivity at the base of the Turonian",
    boundaries: [{ boundaryMa: findUnit("Turonian")!.base }],
    traits: codebook.filter((t) => !t.retired).map((t) => ({ traitId: t.id })),
  };
  const created = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(body);
  expect(created.status, JSON.stringify(created.body)).toBe(202);
  run = await finished(seeded.studyId, created.body.id);
  expect(run.status, run.error ?? "").toBe("succeeded");
}, 180_000);
afterAll(() => app?.close());

const boundaryOf = (r: Run) => r.results!.boundaries[0].result;
const traitOf = (r: Run, key: string) => boundaryOf(r).traits.find((t) => t.key === key)!;

describe("the default analysis of the demo study", () => {
  it("tests the genera at risk across the base of the Turonian with the Cenomanian as window", () => {
    const b = run.results!.boundaries[0];
    // Base of the Turonian 93.9 Ma; the Cenomanian, 100.5-93.9 Ma, is 6.6 Myr (ICS chart v2024/12).
    expect(b).toMatchObject({ boundaryMa: planted.boundary.ageMa, windowMyr: planted.boundary.windowMyr, windowDefaultFrom: { name: "Cenomanian" } });
    expect(b.boundaryMa).toBe(93.9);
    expect(b.windowMyr).toBeCloseTo(6.6, 9);
    expect(b.victims).toBeGreaterThan(100);
    expect(b.survivors).toBeGreaterThan(100);
    expect(run.results!.traits.map((t) => t.key).sort()).toEqual(data.traits.map((t) => t.key).sort());
  });

  it("finds that deposit feeding raised the odds of extinction", () => {
    // Planted in scripts/seed/demo/generator.ts: deposit feeders get +1.1 on the log-odds scale (an odds ratio
    // of e^1.1, about 3.0) at the crisis, in every family alike.
    expect(planted).toMatchObject({ feedingMode: "deposit", feedingLogOdds: 1.1 });
    const feeding = traitOf(run, "feeding");
    expect(feeding.test.adjustedPValue).toBeLessThan(0.05);
    const deposit = feeding.contrasts.find((c) => c.state === planted.feedingMode)!;
    expect(deposit.crude.estimate).toBeGreaterThan(1);
    expect(deposit.crude.ci[0]).toBeGreaterThan(1);
    expect(deposit.cladeAdjusted!.estimate).toBeGreaterThan(1);
    expect(deposit.cladeAdjusted!.ci[0]).toBeGreaterThan(1);
    // Beside the other traits in the multiple regression, too.
    const coefficient = boundaryOf(run).model!.coefficients.find((c) => c.label.startsWith("Feeding mode: Deposit feeder"))!;
    expect(coefficient.oddsRatio).toBeGreaterThan(1);
    expect(coefficient.pValue).toBeLessThan(0.05);
  });

  it("finds that a small geographic range raised the odds of extinction", () => {
    // Planted in scripts/seed/demo/generator.ts: genera known from at most 2 regions get +1.4 on the log-odds
    // scale (an odds ratio of e^1.4, about 4.1). The trait is numeric (regions), so a larger range
    // lowers the odds: the odds ratio per region is below 1, and the smallest ranges die out most.
    expect(planted).toMatchObject({ smallRangeMaxRegions: 2, smallRangeLogOdds: 1.4 });
    const range = traitOf(run, "geographic_range");
    expect(range.test.adjustedPValue).toBeLessThan(0.05);
    const [perRegion] = range.contrasts;
    expect(perRegion.crude.estimate).toBeLessThan(1);
    expect(perRegion.crude.ci[1]).toBeLessThan(1);
    expect(perRegion.cladeAdjusted!.ci[1]).toBeLessThan(1);
    // Odds ratio for one region fewer, the small-range reading: above 1.
    expect(1 / perRegion.crude.estimate).toBeGreaterThan(1);
    const bins = range.table;
    expect(bins[0].proportion!).toBeGreaterThan(bins[bins.length - 1].proportion!);
    expect(bins[0].ci![0]).toBeGreaterThan(bins[bins.length - 1].ci![1]);
  });

  it("flags the infaunal life habit, which only shares the hard-hit family with extinction", () => {
    // Planted in scripts/seed/demo/generator.ts: the life habit has no effect of its own (log-odds 0), but 75%
    // of the Quellorbidae are infaunal (the other families: under 15%), and the Quellorbidae get +2.3.
    expect(planted).toMatchObject({ confoundedLifeHabit: "infaunal", confoundedLifeHabitLogOdds: 0, hardHitClade: "Quellorbidae", confoundedShareInHardHitClade: 0.75 });
    const habit = traitOf(run, "life_habit");
    const infaunal = habit.contrasts.find((c) => c.state === planted.confoundedLifeHabit)!;
    // Across all genera it looks strongly selective...
    expect(infaunal.crude.estimate).toBeGreaterThan(2);
    expect(infaunal.crude.ci[0]).toBeGreaterThan(1);
    // ...within families it is not: the Mantel-Haenszel interval holds 1, and the check flags it in words.
    const adjusted = infaunal.cladeAdjusted!;
    expect(adjusted.ci[0]).toBeLessThan(1);
    expect(adjusted.ci[1]).toBeGreaterThan(1);
    expect(infaunal.changeOnCladeAdjustment!).toBeGreaterThan(0.5);
    expect(infaunal.flagged).toBe(true);
    expect(habit.confoundingNote).toContain("Infaunal");
    expect(habit.confoundingNote).toContain("once clade is taken into account");
    // Flagged life habits that read alike share one reading: said once per trait, not once per contrast.
    const habitFlagged = habit.contrasts.filter((c) => c.cladeCheck?.flagged);
    const readings = habit.confoundingNote!.split("a shared cause, not necessarily an effect of the trait").length - 1;
    expect(readings).toBeLessThanOrEqual(1);
    if (habitFlagged.length > 1) expect(habit.confoundingNote).toContain("and that of ");
    // The calibrated flag (crude against the family-standardised odds ratio, beyond its own
    // uncertainty) leaves most other contrasts alone: only the planted confounder is expected.
    const contrasts = run.results!.boundaries[0].result.traits.flatMap((t) => t.contrasts.map((c) => ({ trait: t.key, contrast: c.contrast, flagged: c.flagged })));
    const flagged = contrasts.filter((c) => c.flagged);
    console.log(`Demo run: ${flagged.length} of ${contrasts.length} contrasts flagged: ${flagged.map((c) => `${c.trait} ${c.contrast}`).join("; ")}`);
    expect(flagged.length).toBeLessThanOrEqual(Math.floor(contrasts.length / 3));
    expect(run.results!.boundaries[0].result.confoundingMethod).toMatch(/Greenland, Robins & Pearl 1999/);
    // The caution against reading an association as a mechanism comes with the results.
    expect(run.results!.cautions[0]).toMatch(/not proof of a kill mechanism/);
  });

  it("carries the same flags, the method that decided them and the cautions into the CSV and JSON exports", async () => {
    const base = `/api/studies/${seeded.studyId}/runs/${run.id}/export`;
    // JSON: the stored run as is, so the flags, the method and the cautions are those on screen.
    const json = await analyst.get(`${base}?format=json`);
    expect(json.status).toBe(200);
    const exported = json.body as Run;
    const flagsOf = (r: Run) => r.results!.boundaries[0].result.traits.flatMap((t) => t.contrasts.map((c) => `${t.key}/${c.contrast}:${c.flagged}`));
    expect(flagsOf(exported)).toEqual(flagsOf(run));
    expect(exported.results!.boundaries[0].result.confoundingMethod).toBe(run.results!.boundaries[0].result.confoundingMethod);
    expect(exported.results!.cautions).toEqual(run.results!.cautions);
    // CSV: one row per contrast with the flag, the thin marker and the method that decided the flag.
    const csv = await analyst.get(`${base}?format=csv&table=contrasts`);
    expect(csv.status).toBe(200);
    const lines = csv.text.trim().split(/\r?\n/);
    const header = lines[0].split(",");
    const flaggedAt = header.indexOf("flagged");
    const decidedAt = header.indexOf("flag_decided_by");
    expect(flaggedAt).toBeGreaterThan(-1);
    expect(decidedAt).toBeGreaterThan(-1);
    expect(header).toContain("clade_adjusted_thin");
    const infaunalRow = lines.find((line) => line.includes("life_habit") && line.includes(`,${planted.confoundedLifeHabit},`));
    expect(infaunalRow).toBeDefined();
    const flaggedInCsv = lines.slice(1).filter((line) => /,true,/.test(line)).length;
    const flaggedInRun = flagsOf(run).filter((f) => f.endsWith(":true")).length;
    expect(flaggedInCsv).toBeGreaterThanOrEqual(flaggedInRun);
    expect(csv.text).toContain("Greenland, Robins & Pearl 1999");
  });
});

describe("the analyses the seed saved", () => {
  let saved: RunList;
  const savedRun = async (name: string): Promise<Run> => {
    const summary = saved.runs.find((r) => r.name === name)!;
    expect(summary, name).toBeDefined();
    const res = await analyst.get(`/api/studies/${seeded.studyId}/runs/${summary.id}`);
    expect(res.status).toBe(200);
    return res.body as Run;
  };

  beforeAll(async () => {
    saved = (await analyst.get(`/api/studies/${seeded.studyId}/runs?pageSize=20`)).body as RunList;
  });

  it("holds two finished runs marked as invented, by the demo analyst", () => {
    const seededRuns = saved.runs.filter((r) => r.id !== run.id);
    expect(seededRuns.map((r) => r.name).sort()).toEqual([DEMO_CRISIS_RUN_NAME, DEMO_SWEEP_RUN_NAME].sort());
    for (const r of seededRuns) {
      expect(r.name).toMatch(/invented/);
      expect(r).toMatchObject({ status: "succeeded", progress: 1, createdBy: { id: seeded.userIds.analyst } });
      expect(r.dataHash).toMatch(/^[0-9a-f]{64}$/);
    }
    expect(seeded.analyses.crisisRunId).toBe(seededRuns.find((r) => r.name === DEMO_CRISIS_RUN_NAME)!.id);
  });

  it("computed the crisis run exactly as a run job computes it: same data hash, same numbers", async () => {
    const crisis = await savedRun(DEMO_CRISIS_RUN_NAME);
    expect(crisis.dataHash).toBe(run.dataHash);
    expect(crisis.rowCount).toBe(run.rowCount);
    expect(crisis.results).toEqual(run.results);
  });

  it("tests the five traits across the bases of four stages, where only the crisis stands out", async () => {
    const sweep = await savedRun(DEMO_SWEEP_RUN_NAME);
    const boundaries = sweep.results!.boundaries;
    expect(boundaries.map((b) => b.boundaryMa)).toEqual(DEMO_SWEEP_STAGES.map((s) => findUnit(s)!.base));
    // Every cell of the traits-by-boundaries heat map has an odds ratio.
    for (const b of boundaries) {
      expect(b.result.traits.map((t) => t.key).sort(), b.label).toEqual(data.traits.map((t) => t.key).sort());
      for (const t of b.result.traits) expect(t.contrasts.some((c) => Number.isFinite(c.crude.estimate)), `${b.label}: ${t.label}`).toBe(true);
    }
    // Planted in scripts/seed/demo/generator.ts: background extinction of 0.13-0.16 per stage, against a
    // crisis whose odds start at e^-1.5 (a share of 0.18) and rise with every risk factor.
    const share = (b: (typeof boundaries)[number]) => b.victims / (b.victims + b.survivors);
    const crisis = boundaries.find((b) => b.boundaryMa === planted.boundary.ageMa)!;
    for (const b of boundaries) if (b !== crisis) expect(share(crisis), b.label).toBeGreaterThan(share(b));
  });

  it("saved the modern list's crosswalk and a comparison scored with the crisis run", async () => {
    const [list] = await app.ctx.db.select().from(modernLists).where(eq(modernLists.id, seeded.listId));
    const crosswalk = list.crosswalk as unknown as Crosswalk;
    expect(crosswalk.pairs.map((p) => p.column).sort()).toEqual(Object.keys(MODERN_CROSSWALK).sort());
    const position = crosswalk.pairs.find((p) => p.column === "position")!;
    expect(position.traitId).toBe(traitId("life_habit"));
    expect(position.states).toMatchObject({ burrowing: "infaunal", "on the bottom": "epifaunal", unknown: null });

    const [row] = await app.ctx.db.select().from(comparisons).where(eq(comparisons.id, seeded.analyses.comparisonId));
    expect(row).toMatchObject({ name: DEMO_COMPARISON_NAME, runId: seeded.analyses.crisisRunId, listId: seeded.listId, createdBy: seeded.userIds.analyst });
    const results = row.results as unknown as ComparisonResults;
    // Planted in scripts/seed/demo/generator.ts: the modern categories follow the crisis's risk factors plus
    // noise, so the crisis model ranks threatened species above the others more often than not.
    expect(results.roc!.auc).toBeGreaterThan(0.5);
    expect(results.cautions[0]).toMatch(/screening aid/);
  });
});
