// A run's checks of its own findings on the invented demo study: crisis against background and the
// robustness panel. For crisis against background, the
// generator (scripts/seed/demo/generator.ts) makes background extinction the same chance for every
// genus and the crisis at the base of the Turonian selective on narrow range, deposit feeding and
// one hard-hit clade; so a four-boundary run that names the Turonian base as the crisis must find
// that the crisis treated range and feeding differently from background, and store, reopen and
// export it.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import request from "supertest";
import { DEMO_ACCOUNTS, seedDemo, type DemoAccount, type DemoSeedResult } from "../../scripts/seed/demo/seed";
import { DEMO_SWEEP_RUN_NAME, DEMO_SWEEP_STAGES } from "../../scripts/seed/demo/analyses";
import { generateDemoStudy } from "../../scripts/seed/demo/generator";
import type { Run, RunList, RunParamsInput } from "../../shared/schemas/runs";
import type { Trait } from "../../shared/schemas/traits";
import { findUnit } from "../../shared/timescale/index";
import { createTestApp, uniqueEmail, type TestApp } from "../support/server";

const data = generateDemoStudy();
const accounts: DemoAccount[] = DEMO_ACCOUNTS.map((a) => ({ ...a, email: uniqueEmail(`run-checks-${a.role}`) }));

let app: TestApp;
let seeded: DemoSeedResult;
let analyst: ReturnType<typeof request.agent>;
let codebook: Trait[];
let run: Run;

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

const sweepBody = (extra: Partial<RunParamsInput> = {}): RunParamsInput => ({
  name: "Four boundaries, the Turonian base as crisis",
  boundaries: DEMO_SWEEP_STAGES.map((stage) => ({ boundaryMa: findUnit(stage)!.base })),
  traits: codebook.filter((t) => !t.retired).map((t) => ({ traitId: t.id })),
  crisisBoundary: DEMO_SWEEP_STAGES.indexOf("Turonian"),
  ...extra,
});

beforeAll(async () => {
  app = await createTestApp();
  seeded = await seedDemo(app.ctx.db, { data, accounts, env: { NODE_ENV: "test" } });
  analyst = request.agent(app.app);
  const account = accounts.find((a) => a.role === "analyst")!;
  const login = await analyst.post("/api/auth/login").send({ email: account.email, password: account.password });
  expect(login.status).toBe(200);
  codebook = (await analyst.get(`/api/studies/${seeded.studyId}/traits`)).body.traits as Trait[];
  const created = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(sweepBody());
  expect(created.status, JSON.stringify(created.body)).toBe(202);
  run = await finished(seeded.studyId, created.body.id);
  expect(run.status, run.error ?? "").toBe("succeeded");
}, 180_000);
afterAll(() => app?.close());

describe("the robustness panel of a run", () => {
  it("is stored for every boundary with the default variants", () => {
    const stored = run.results!.robustness!;
    expect(stored.status).toBe("computed");
    if (stored.status !== "computed") return;
    expect(stored.windowFactors).toEqual([0.5, 1.5, 2]);
    expect(stored.boundaries.map((b) => b.index)).toEqual([0, 1, 2, 3]);
    for (const b of stored.boundaries) {
      expect(b.reason).toBeNull();
      const kinds = b.panel!.variants.map((v) => v.kind);
      expect(kinds.slice(0, 4)).toEqual(["run", "window", "window", "window"]);
      expect(kinds.slice(-3)).toEqual(["single-stage", "truncation-victims", "truncation-survivors"]);
      expect(b.panel!.truncationMyr).toBeCloseTo(b.panel!.windowMyr / 4, 12);
      // the run's own variant reads exactly the rows of the run's analysis at that boundary
      const own = b.panel!.variants[0];
      expect(own.victims).toBe(run.results!.boundaries[b.index].victims);
      expect(own.survivors).toBe(run.results!.boundaries[b.index].survivors);
    }
  });

  it("at the crisis, the planted narrow-range effect holds", () => {
    const stored = run.results!.robustness!;
    if (stored.status !== "computed") throw new Error("not computed");
    const crisis = stored.boundaries[2].panel!;
    for (const c of crisis.contrasts) console.log(`robustness at the crisis, ${c.traitLabel}: ${c.contrast}: crude ${c.verdict.crude.status}, adjusted ${c.verdict.adjusted.sentence}`);
    const range = crisis.contrasts.find((c) => c.traitKey === "geographic_range")!;
    expect(range.verdict.crude.status).toBe("holds");
    // the run's own crude odds ratio is the one the run reported
    const reported = run.results!.boundaries[2].result.traits.find((t) => t.key === "geographic_range")!.contrasts[0].crude;
    expect(range.estimates[0].crude!.estimate).toBeCloseTo(reported.estimate, 8);
  });

  it("travels in the CSV export, one row per boundary, contrast and variant", async () => {
    const stored = run.results!.robustness!;
    if (stored.status !== "computed") throw new Error("not computed");
    const res = await analyst.get(`/api/studies/${seeded.studyId}/runs/${run.id}/export?format=csv&table=robustness`).buffer(true);
    expect(res.status).toBe(200);
    const lines = res.text.trim().split(/\r?\n/);
    expect(lines[0]).toMatch(/^boundary_ma,boundary_label,trait_key,trait_label,contrast,variant,variant_label,run_choice,/);
    expect(lines).toHaveLength(1 + stored.boundaries.reduce((n, b) => n + b.panel!.contrasts.length * b.panel!.variants.length, 0));
  });

  it("refuses a window factor of 1, naming the field", async () => {
    const res = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(sweepBody({ robustness: { windowFactors: [0.5, 1] } }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields["robustness.windowFactors.1"]).toBe("A window factor of 1 is the run's own window; leave it out");
  });
});

describe("crisis against background in a run", () => {
  it("is stored with the run, the Turonian base as the crisis and the other three as background", () => {
    const crisis = run.results!.crisisVersusBackground!;
    expect(crisis.status).toBe("computed");
    if (crisis.status !== "computed") return;
    expect(crisis.result.crisis.index).toBe(2);
    expect(crisis.result.crisis.label).toMatch(/Turonian/);
    expect(crisis.result.background).toHaveLength(3);
    expect(crisis.result.correction).toBe("bh");
    expect(crisis.result.traits.map((t) => t.key).sort()).toEqual(data.traits.map((t) => t.key).sort());
    for (const t of crisis.result.traits) console.log(`crisis vs background, ${t.key}: ${t.summary}`);
  });

  it("finds the planted crisis-only effects of feeding and range, with a sentence for each", () => {
    const crisis = run.results!.crisisVersusBackground!;
    if (crisis.status !== "computed") throw new Error("not computed");
    const feeding = crisis.result.traits.find((t) => t.key === "feeding")!;
    expect(feeding.differs).toBe(true);
    // Deposit feeding raised the odds at the crisis only (+1.1 on the log-odds scale); its crude
    // ratio against suspension feeders is diluted because suspension feeders crowd the hard-hit
    // clade, so only its direction is asserted; the trait as a whole differs.
    const deposit = feeding.contrasts.find((c) => c.state === data.plantedEffects.feedingMode)!;
    for (const c of feeding.contrasts) console.log(`feeding ${c.contrast}: background ${c.backgroundOddsRatio.toFixed(3)}, crisis ${c.crisisOddsRatio.toFixed(3)}, ratio ${c.ratio.estimate.toFixed(3)} (${c.ratio.ci.map((x) => x.toFixed(3)).join("-")})`);
    expect(deposit.ratio.estimate).toBeGreaterThan(1);
    expect(feeding.contrasts.some((c) => c.sentence !== null)).toBe(true);
    const range = crisis.result.traits.find((t) => t.key === "geographic_range")!;
    expect(range.differs).toBe(true);
    // Wider range lowered the odds at the crisis only: the ratio per unit is below 1.
    expect(range.contrasts[0].ratio.ci[1]).toBeLessThan(1);
    expect(range.contrasts[0].sentence).toMatch(/^The crisis favoured higher Geographic range/);
  });

  it("the seeded four-boundary run carries the same result", async () => {
    const list = (await analyst.get(`/api/studies/${seeded.studyId}/runs?pageSize=100`)).body as RunList;
    const sweep = list.runs.find((r) => r.name === DEMO_SWEEP_RUN_NAME)!;
    expect(sweep.params.crisisBoundary).toBe(2);
    const stored = (await analyst.get(`/api/studies/${seeded.studyId}/runs/${sweep.id}`)).body as Run;
    expect(stored.results!.crisisVersusBackground).toEqual(run.results!.crisisVersusBackground);
  });

  it("travels in the CSV export as the crisis table, one row per contrast", async () => {
    const res = await analyst.get(`/api/studies/${seeded.studyId}/runs/${run.id}/export?format=csv&table=crisis`).buffer(true);
    expect(res.status).toBe(200);
    const lines = res.text.trim().split(/\r?\n/);
    expect(lines[0]).toBe(
      "crisis_boundary,background_boundaries,trait_key,trait_label,contrast,state,reference,background_or,background_ci_low,background_ci_high,crisis_or,crisis_ci_low,crisis_ci_high,ratio,ratio_ci_low,ratio_ci_high,lr_statistic,df,p_value,adjusted_p_value,differs,sentence,summary,method",
    );
    const crisis = run.results!.crisisVersusBackground!;
    if (crisis.status !== "computed") throw new Error("not computed");
    expect(lines).toHaveLength(1 + crisis.result.traits.reduce((n, t) => n + Math.max(1, t.contrasts.length), 0));
    expect(lines.filter((l) => l.includes(",geographic_range,"))[0]).toContain(",true,");
    const all = await analyst.get(`/api/studies/${seeded.studyId}/runs/${run.id}/export?format=csv`).buffer(true);
    expect(all.text).toMatch(/\ncrisis,/);
    expect(all.text).toMatch(/\nrun,.*crisis_boundary/);
  });

  it("a run without a crisis stores why there is no test", async () => {
    const created = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(sweepBody({ name: "No crisis named", crisisBoundary: undefined }));
    expect(created.status).toBe(202);
    const done = await finished(seeded.studyId, created.body.id);
    expect(done.results!.crisisVersusBackground).toEqual({ status: "not-computed", reason: "The run names no crisis among its boundaries." });
  });

  it("refuses a crisis that is not one of the run's boundaries, naming the field", async () => {
    const res = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(sweepBody({ crisisBoundary: 4 }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields.crisisBoundary).toBe("crisisBoundary must name one of the 4 boundaries (0 to 3)");
    const single = await analyst.post(`/api/studies/${seeded.studyId}/runs`).send(sweepBody({ boundaries: [{ boundaryMa: 93.9 }], crisisBoundary: 0 }));
    expect(single.status).toBe(400);
    expect(single.body.error.fields.crisisBoundary).toMatch(/needs at least two boundaries/);
  });
});
