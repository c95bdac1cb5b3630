// Comparing two stored runs: beyond the numbers, the verdicts of the checks a run makes of its
// findings (does each contrast hold once sampling is allowed for, the robustness panel, crisis
// against background). Two invented runs of an invented study differ in one verdict of each
// check; a run saved before the checks existed has none of them, which is said, not read as a
// change. The expected verdicts follow from the invented results by the definition of each check
// (shared/schemas/samplingCheck.ts, runChecks.ts); the sentences are the product's own wording.
import { describe, expect, it } from "vitest";
import { compareRuns } from "../../../shared/runs/compareRuns";
import { runDiffSchema } from "../../../shared/schemas/runDiff";
import { runSchema, type Run, type RunResults } from "../../../shared/schemas/runs";
import type { RobustnessPanel, RunCrisis } from "../../../shared/schemas/runChecks";
import type { SamplingCheck } from "../../../shared/schemas/samplingCheck";

const STUDY = "5d7c6a0e-2f41-4c3a-9a55-0f1e2d3c4b5a";
const HABIT = "0b6f0d52-8a7e-4b61-9d2c-3e4f5a6b7c8d";
const FEEDING = "1c2d3e4f-5a6b-4c7d-8e9f-0a1b2c3d4e5f";

type SamplingVerdict = SamplingCheck["contrasts"][number]["verdict"];
type RobustnessStatus = RobustnessPanel["contrasts"][number]["verdict"]["crude"]["status"];

const interval = (estimate: number, low: number, high: number) => ({ estimate, ci: [low, high] as [number, number] });

function sampling(habit: SamplingVerdict, feeding: SamplingVerdict): SamplingCheck {
  const row = (traitKey: string, traitLabel: string, contrast: string, verdict: SamplingVerdict, withSampling: number) => ({
    traitKey,
    traitLabel,
    state: contrast.split(" vs ")[0]!,
    contrast,
    withoutSampling: interval(2.3, 1.4, 3.8),
    withSampling: interval(withSampling, withSampling / 1.8, withSampling * 1.8),
    verdict,
    words: "Invented words.",
  });
  return {
    covariates: ["occurrences"],
    taxa: 400,
    withoutOccurrences: 10,
    covariateTerms: [{ covariate: "occurrences", label: "Number of occurrences (log10)", oddsRatio: interval(0.6, 0.4, 0.9), pValue: 0.01 }],
    contrasts: [
      row("life_habit", "Life habit", "Infaunal vs Epifaunal", habit, habit === "holds" ? 2.1 : 1.2),
      row("feeding", "Feeding mode", "Suspension feeder vs Deposit feeder", feeding, 2.6),
    ],
    note: null,
    method: "Invented method.",
    caution: "Invented caution.",
  };
}

type Verdicts = { crude: RobustnessStatus; adjusted: RobustnessStatus; changedUnder?: string[] };
function panel(boundaryMa: number, habit: Verdicts, feeding: Verdicts): RobustnessPanel {
  const verdict = (status: RobustnessStatus, changedUnder: string[]) => ({ status, changedUnder: status === "fragile" ? changedUnder : [], sentence: `Invented: ${status}.` });
  const contrast = (traitKey: string, traitLabel: string, contrast: string, v: Verdicts) => ({
    traitKey,
    traitLabel,
    contrast,
    state: contrast.split(" vs ")[0]!,
    estimates: [{ variant: "run", crude: interval(2, 1.2, 3.3), adjusted: interval(1.9, 1.1, 3.2) }],
    jackknife: { crude: null, adjusted: null },
    verdict: { crude: verdict(v.crude, v.changedUnder ?? []), adjusted: verdict(v.adjusted, v.changedUnder ?? []) },
  });
  return {
    boundaryMa,
    windowMyr: 6.2,
    truncationMyr: 1.55,
    variants: [{ id: "run", kind: "run", label: "The run’s own choice", victims: 163, survivors: 247 }],
    contrasts: [contrast("life_habit", "Life habit", "Infaunal vs Epifaunal", habit), contrast("feeding", "Feeding mode", "Suspension feeder vs Deposit feeder", feeding)],
    notes: [],
    method: "Invented method.",
  };
}

function crisis(feedingDiffers: boolean, habitTested = true): RunCrisis {
  const trait = (key: string, label: string, contrast: string, differs: boolean, tested: boolean) => ({
    key,
    label,
    kind: "categorical" as const,
    reference: contrast.split(" vs ")[1]!,
    used: 800,
    test: tested ? { statistic: differs ? 9.1 : 0.4, df: 1, pValue: differs ? 0.003 : 0.53, adjustedPValue: differs ? 0.006 : 0.53 } : null,
    contrasts: [
      {
        contrast,
        state: contrast.split(" vs ")[0]!,
        backgroundOddsRatio: 1.1,
        backgroundCi: [0.7, 1.7] as [number, number],
        crisisOddsRatio: differs ? 3.2 : 1.3,
        crisisCi: [1.9, 5.4] as [number, number],
        ratio: differs ? interval(2.9, 1.5, 5.6) : interval(1.2, 0.6, 2.3),
        sentence: differs ? "Invented: the crisis differed." : null,
      },
    ],
    differs: tested && differs,
    summary: "Invented summary.",
    method: null,
    notes: [],
  });
  return {
    status: "computed",
    result: {
      crisis: { index: 0, label: "Base of the Danian, 66.0 Ma" },
      background: ["Base of the Turonian, 93.9 Ma"],
      correction: "bh",
      level: 0.95,
      traits: [trait("feeding", "Feeding mode", "Suspension feeder vs Deposit feeder", feedingDiffers, true), trait("life_habit", "Life habit", "Infaunal vs Epifaunal", false, habitTested)],
      method: "Invented method.",
    },
  };
}

type Checks = { sampling?: SamplingCheck; robustness?: RunResults["robustness"]; crisis?: RunCrisis };

const boundary = (boundaryMa: number, label: string, s: SamplingCheck | undefined) => ({
  boundaryMa,
  windowMyr: 6.2,
  windowDefaultFrom: null,
  label,
  victims: 163,
  survivors: 247,
  notAtRisk: 10,
  overridesApplied: 0,
  completeCases: 400,
  result: { design: { victims: 163, survivors: 247, droppedByTrait: {}, completeCases: 400 }, traits: [], model: null, modelNote: null },
  ...(s ? { sampling: s } : {}),
});

/** A finished run of the invented study at the Danian (the crisis) and the Turonian (background). */
function makeRun(id: string, checks: Checks, extraParams: Record<string, unknown> = {}): Run {
  return runSchema.parse({
    id,
    studyId: STUDY,
    name: `Invented run ${id.slice(0, 4)}`,
    appVersion: "invented",
    createdBy: null,
    createdAt: "2026-12-01T10:00:00.000Z",
    status: "succeeded",
    progress: 1,
    progressNote: "Done",
    params: {
      name: "Invented run",
      boundaries: [{ boundaryMa: 66 }, { boundaryMa: 93.9 }],
      traits: [{ traitId: HABIT, reference: "epifaunal" }, { traitId: FEEDING, reference: "deposit" }],
      crisisBoundary: 0,
      samplingCovariates: ["occurrences"],
      ...extraParams,
    },
    dataHash: "a".repeat(64),
    dataHashShort: "a".repeat(12),
    rowCount: 820,
    error: null,
    attempt: 1,
    rerunOf: null,
    startedAt: "2026-12-01T10:00:00.000Z",
    finishedAt: "2026-12-01T10:00:05.000Z",
    heartbeatAt: null,
    results: {
      boundaries: [boundary(66, "Base of the Danian, 66.0 Ma", checks.sampling), boundary(93.9, "Base of the Turonian, 93.9 Ma", undefined)],
      traits: [
        { traitId: HABIT, key: "life_habit", label: "Life habit" },
        { traitId: FEEDING, key: "feeding", label: "Feeding mode" },
      ],
      cautions: ["Invented caution."],
      ...(checks.robustness ? { robustness: checks.robustness } : {}),
      ...(checks.crisis ? { crisisVersusBackground: checks.crisis } : {}),
    },
  });
}

const robustness = (habit: Verdicts, feeding: Verdicts): RunResults["robustness"] => ({
  status: "computed",
  windowFactors: [0.5, 1.5, 2],
  boundaries: [
    { index: 0, label: "Base of the Danian, 66.0 Ma", panel: panel(66, habit, feeding), reason: null },
    { index: 1, label: "Base of the Turonian, 93.9 Ma", panel: null, reason: "Invented: too few victims for the panel." },
  ],
});

const EARLIER: Checks = {
  sampling: sampling("holds", "holds"),
  robustness: robustness({ crude: "holds", adjusted: "holds" }, { crude: "holds", adjusted: "fragile", changedUnder: ["Window 3.1 Myr"] }),
  crisis: crisis(true),
};
const LATER: Checks = {
  sampling: sampling("does_not_hold", "holds"),
  robustness: robustness({ crude: "holds", adjusted: "fragile", changedUnder: ["Window 3.1 Myr", "Without Invented clade A"] }, { crude: "holds", adjusted: "fragile", changedUnder: ["Window 12.4 Myr"] }),
  crisis: crisis(false),
};

const BASE_ID = "3f1e0c9a-7b6d-4e5f-8a9b-0c1d2e3f4a5b";
const RUN_ID = "4a2b1c0d-9e8f-4a7b-8c6d-5e4f3a2b1c0d";

describe("compareRuns: the checks of a run's findings", () => {
  it("finds no changed verdict between a run and itself", () => {
    const diff = runDiffSchema.parse(compareRuns(makeRun(BASE_ID, EARLIER), makeRun(RUN_ID, EARLIER)));
    const [danian, turonian] = diff.boundaries;
    for (const part of [danian!.sampling, danian!.robustness, diff.crisis]) expect(part).toMatchObject({ note: null, changes: [], changed: false });
    expect(danian!.sampling.contrasts.map((c) => c.verdict)).toEqual([
      { base: "holds", run: "holds" },
      { base: "holds", run: "holds" },
    ]);
    // The Turonian has no sampling check in either run and no panel in either (the same reason): nothing to say.
    expect(turonian!.sampling).toMatchObject({ base: { status: "absent" }, run: { status: "absent" }, note: null, changed: false });
    expect(turonian!.robustness).toMatchObject({ base: { status: "not-computed", reason: "Invented: too few victims for the panel." }, note: null, changed: false });
  });

  it("lists the verdicts that changed, check by check, in words", () => {
    const diff = runDiffSchema.parse(compareRuns(makeRun(BASE_ID, EARLIER), makeRun(RUN_ID, LATER)));
    const danian = diff.boundaries[0]!;

    expect(danian.sampling.changes).toEqual(["Life habit, Infaunal vs Epifaunal: holds once sampling is allowed for → does not hold"]);
    const habit = danian.sampling.contrasts.find((c) => c.traitKey === "life_habit")!;
    expect(habit).toMatchObject({ verdict: { base: "holds", run: "does_not_hold" }, withSampling: { base: 2.1, run: 1.2 }, changed: true });
    expect(danian.sampling.contrasts.find((c) => c.traitKey === "feeding")!.changed).toBe(false);

    // Adjusted verdicts: earlier 1 holds + 1 fragile, later 2 fragile; crude unchanged (2 hold).
    expect(danian.robustness.counts.adjusted).toEqual({
      base: { holds: 1, fragile: 1, "never-there": 0, "not-estimated": 0 },
      run: { holds: 0, fragile: 2, "never-there": 0, "not-estimated": 0 },
    });
    expect(danian.robustness.changes).toEqual([
      "Verdicts on the odds ratios adjusted for the other traits: 1 holds, 1 fragile → 2 fragile",
      "Life habit, Infaunal vs Epifaunal (adjusted for the other traits): holds → fragile (changes under Window 3.1 Myr; Without Invented clade A)",
      "Feeding mode, Suspension feeder vs Deposit feeder (adjusted for the other traits): still fragile; now also under Window 12.4 Myr; no longer under Window 3.1 Myr",
    ]);
    expect(danian.robustness.contrasts.map((c) => [c.traitKey, c.changed])).toEqual([
      ["life_habit", true],
      ["feeding", true],
    ]);

    expect(diff.crisis.changes).toEqual(["Feeding mode at the crisis: differs from background → does not differ from background"]);
    const feeding = diff.crisis.traits.find((t) => t.key === "feeding")!;
    expect(feeding).toMatchObject({ verdict: { base: "differs", run: "same" }, adjustedPValue: { base: 0.006, run: 0.53 }, changed: true });
    expect(feeding.contrasts[0]).toMatchObject({ verdict: { base: "differs", run: "same" }, ratio: { base: 2.9, run: 1.2 }, changed: true });
    expect(diff.crisis.traits.find((t) => t.key === "life_habit")!.changed).toBe(false);
  });

  it("says a check is not in the earlier run, saved before it existed, instead of inventing a change", () => {
    const older = makeRun(BASE_ID, {});
    const diff = runDiffSchema.parse(compareRuns(older, makeRun(RUN_ID, LATER)));
    const danian = diff.boundaries[0]!;
    expect(danian.sampling).toMatchObject({
      base: { status: "absent", reason: null },
      run: { status: "computed" },
      note: "Not in the earlier run: it added no sampling covariates, or was saved before runs could.",
      changes: [],
      changed: false,
    });
    expect(danian.robustness).toMatchObject({ note: "Not in the earlier run: it was saved before runs computed a robustness panel.", changes: [], changed: false });
    expect(danian.robustness.counts.adjusted).toEqual({ base: null, run: { holds: 0, fragile: 2, "never-there": 0, "not-estimated": 0 } });
    expect(diff.crisis).toMatchObject({ note: "Not in the earlier run: it was saved before runs compared a crisis with background.", changes: [], changed: false, crisis: { base: null, run: "Base of the Danian, 66.0 Ma" } });
    // The later run's verdicts are there to read, none marked changed.
    expect(danian.sampling.contrasts.map((c) => [c.verdict, c.presence, c.changed])).toEqual([
      [{ base: null, run: "does_not_hold" }, "runOnly", false],
      [{ base: null, run: "holds" }, "runOnly", false],
    ]);
    expect(danian.robustness.contrasts.every((c) => !c.changed)).toBe(true);
    expect(diff.crisis.traits.every((t) => !t.changed && t.contrasts.every((c) => !c.changed))).toBe(true);

    // Sides swapped: the later run is the one without.
    const swapped = runDiffSchema.parse(compareRuns(makeRun(RUN_ID, LATER), older));
    expect(swapped.boundaries[0]!.robustness.note).toBe("Not in the later run: it was saved before runs computed a robustness panel.");
    expect(swapped.crisis.note).toBe("Not in the later run: it was saved before runs compared a crisis with background.");
  });

  it("gives the stored reason when a run did not compute a check, and counts an untested trait as such", () => {
    const notComputed: Checks = { ...EARLIER, crisis: { status: "not-computed", reason: "Invented: the run named no crisis." } };
    const diff = runDiffSchema.parse(compareRuns(makeRun(BASE_ID, notComputed), makeRun(RUN_ID, EARLIER)));
    expect(diff.crisis).toMatchObject({ base: { status: "not-computed" }, note: "Not computed in the earlier run: Invented: the run named no crisis.", changes: [] });

    const untested = runDiffSchema.parse(compareRuns(makeRun(BASE_ID, EARLIER), makeRun(RUN_ID, { ...EARLIER, crisis: crisis(true, false) })));
    expect(untested.crisis.changes).toEqual(["Life habit at the crisis: does not differ from background → not tested (the model could not be fitted)"]);
  });

  it("names changed settings of the checks among the parameters", () => {
    const diff = compareRuns(
      makeRun(BASE_ID, EARLIER),
      makeRun(RUN_ID, EARLIER, { crisisBoundary: 1, samplingCovariates: ["occurrences", "collections"], robustness: { windowFactors: [0.5, 2], truncationMyr: 0.5 } }),
    );
    expect(diff.paramsChanged).toEqual([
      "Crisis boundary: 66.0 Ma → 93.9 Ma",
      "Sampling covariates: Number of occurrences (log scale) → Number of occurrences (log scale) and Number of collections",
      "Robustness windows: 0.5, 1.5, 2 times the window → 0.5, 2 times the window",
      "Robustness truncation: a quarter of the window → 0.5 Myr",
    ]);
  });

  it("compares a boundary only one run has without notes about its checks", () => {
    const oneBoundary = makeRun(RUN_ID, LATER, { boundaries: [{ boundaryMa: 66 }], crisisBoundary: undefined });
    const withTwo = makeRun(BASE_ID, EARLIER);
    const trimmed = runSchema.parse({ ...oneBoundary, results: { ...oneBoundary.results!, boundaries: oneBoundary.results!.boundaries.slice(0, 1) } });
    const diff = runDiffSchema.parse(compareRuns(withTwo, trimmed));
    const turonian = diff.boundaries.find((b) => b.boundaryMa === 93.9)!;
    expect(turonian.presence).toBe("baseOnly");
    expect(turonian.robustness).toMatchObject({ note: null, changes: [], changed: false });
    expect(turonian.sampling).toMatchObject({ note: null, changes: [], changed: false });
  });
});
