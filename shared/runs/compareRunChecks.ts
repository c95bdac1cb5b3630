// The checks a run makes of its own findings, compared between two runs: does each contrast hold
// once sampling is allowed for, the robustness panel's verdicts, and crisis against background.
// Verdicts only, not every number: an analyst re-running wants to see which conclusions moved.
// A run saved before a check existed holds none of it; that is said, not read as a change.
import type { Run, RunResults } from "../schemas/runs";
import type { RunDiffCheckSide, RunDiffCrisis, RunDiffRobustness, RunDiffSampling } from "../schemas/runDiff";
import type { SamplingVerdict } from "../schemas/samplingCheck";
import type { RobustnessPanel } from "../schemas/runChecks";
import { pairBy, presence } from "./pairBy";

type Boundary = RunResults["boundaries"][number];
type Side = RunDiffCheckSide;
type Check = "sampling" | "robustness" | "crisis";

const ABSENT_WHY: Record<Check, string> = {
  sampling: "it added no sampling covariates, or was saved before runs could.",
  robustness: "it was saved before runs computed a robustness panel.",
  crisis: "it was saved before runs compared a crisis with background.",
};

const computed: Side = { status: "computed", reason: null };
const absent: Side = { status: "absent", reason: null };

/** When only one of the two runs has the check, what the other lacks; null when both or neither have it. */
function noteFor(check: Check, base: Side, run: Side): string | null {
  if ((base.status === "computed") === (run.status === "computed")) return null;
  const [missing, which] = base.status === "computed" ? [run, "later"] : [base, "earlier"];
  return missing.status === "absent" ? `Not in the ${which} run: ${ABSENT_WHY[check]}` : `Not computed in the ${which} run: ${missing.reason}`;
}

/** Verdicts are compared only where both runs hold the check (and, per boundary, both have the boundary). */
const compares = (base: Side, run: Side, comparable: boolean) => comparable && base.status === "computed" && run.status === "computed";

function checkFields(check: Check, base: Side, run: Side, comparable: boolean, changes: string[]) {
  const kept = compares(base, run, comparable) ? changes : [];
  return { base, run, note: comparable ? noteFor(check, base, run) : null, changes: kept, changed: kept.length > 0 };
}

const arrow = (base: string, run: string) => `${base} → ${run}`;
const onlyIn = (p: "baseOnly" | "runOnly") => (p === "baseOnly" ? "only in the earlier run" : "only in the later run");

// ---------------------------------------------------------------- sampling

const SAMPLING_WORDS: Record<SamplingVerdict, string> = {
  holds: "holds",
  does_not_hold: "does not hold",
  no_signal: "no effect to explain",
  not_estimable: "not estimable",
};
const samplingPhrase = (v: SamplingVerdict, clause: boolean) => SAMPLING_WORDS[v] + (clause && (v === "holds" || v === "does_not_hold") ? " once sampling is allowed for" : "");

function samplingSide(b: Boundary | null): Side {
  const s = b?.sampling;
  if (!s) return absent;
  // A check that found nothing to compare (no finds, too few taxa) says why in its note.
  if (s.contrasts.length === 0 && s.note) return { status: "not-computed", reason: s.note };
  return computed;
}

/**
 * Each contrast's "does it hold once sampling is allowed for" in the two runs at one boundary.
 *
 * @example
 * compareSampling(baseBoundary, runBoundary, true).changes;
 * // ["Life habit, Infaunal vs Epifaunal: holds once sampling is allowed for → does not hold"]
 */
export function compareSampling(base: Boundary | null, run: Boundary | null, comparable: boolean): RunDiffSampling {
  const sides = { base: samplingSide(base), run: samplingSide(run) };
  const compared = compares(sides.base, sides.run, comparable);
  const key = (c: { traitKey: string; contrast: string }) => `${c.traitKey}\u0000${c.contrast}`;
  const contrasts = pairBy(base?.sampling?.contrasts ?? [], run?.sampling?.contrasts ?? [], key).map((p) => {
    const c = (p.run ?? p.base)!;
    const verdict = { base: p.base?.verdict ?? null, run: p.run?.verdict ?? null };
    return {
      traitKey: c.traitKey,
      traitLabel: c.traitLabel,
      contrast: c.contrast,
      presence: presence(p),
      verdict,
      withSampling: { base: p.base?.withSampling?.estimate ?? null, run: p.run?.withSampling?.estimate ?? null },
      changed: compared && verdict.base !== verdict.run,
    };
  });
  const changes = contrasts
    .filter((c) => c.changed)
    .map((c) => {
      const name = `${c.traitLabel}, ${c.contrast}`;
      if (c.presence !== "both") return `${name}: ${onlyIn(c.presence)} (${samplingPhrase((c.verdict.run ?? c.verdict.base)!, true)})`;
      const b = c.verdict.base!;
      return `${name}: ${arrow(samplingPhrase(b, true), samplingPhrase(c.verdict.run!, b !== "holds" && b !== "does_not_hold"))}`;
    });
  return { ...checkFields("sampling", sides.base, sides.run, comparable, changes), contrasts };
}

// ---------------------------------------------------------------- robustness

type RobustnessStatus = RobustnessPanel["contrasts"][number]["verdict"]["crude"]["status"];
type Measure = "crude" | "adjusted";
const STATUSES: RobustnessStatus[] = ["holds", "fragile", "never-there", "not-estimated"];
const STATUS_WORDS: Record<RobustnessStatus, string> = { holds: "holds", fragile: "fragile", "never-there": "never there", "not-estimated": "not estimated" };
const MEASURE_WORDS: Record<Measure, string> = { crude: "crude", adjusted: "adjusted for the other traits" };

/** The panel a run stored for the boundary at `index` of its results, or why it has none. */
function robustnessOf(run: Run, index: number): { side: Side; panel: RobustnessPanel | null } {
  const stored = run.results?.robustness;
  if (!stored || index < 0) return { side: absent, panel: null };
  if (stored.status === "not-computed") return { side: { status: "not-computed", reason: stored.reason }, panel: null };
  const entry = stored.boundaries.find((b) => b.index === index);
  if (!entry) return { side: absent, panel: null };
  if (!entry.panel) return { side: { status: "not-computed", reason: entry.reason ?? "The robustness panel was not computed for this boundary." }, panel: null };
  return { side: computed, panel: entry.panel };
}

type Counts = Record<RobustnessStatus, number>;
function countsOf(panel: RobustnessPanel | null, measure: Measure): Counts | null {
  if (!panel) return null;
  const counts: Counts = { holds: 0, fragile: 0, "never-there": 0, "not-estimated": 0 };
  for (const c of panel.contrasts) counts[c.verdict[measure].status] += 1;
  return counts;
}
const countWords = (c: Counts) =>
  STATUSES.filter((s) => c[s] > 0)
    .map((s) => `${c[s]} ${s === "holds" && c[s] !== 1 ? "hold" : STATUS_WORDS[s]}`)
    .join(", ") || "no contrast";
const sameCounts = (a: Counts | null, b: Counts | null) => STATUSES.every((s) => a?.[s] === b?.[s]);
const sameList = (a: string[] | null, b: string[] | null) => (a ?? []).join("\u0000") === (b ?? []).join("\u0000");

/** A measure's verdict change for one contrast, in words; null when nothing moved. */
function measureChange(m: RunDiffRobustness["contrasts"][number]["crude"], measure: Measure, name: string): string | null {
  const { base, run } = m.status;
  const label = `${name} (${MEASURE_WORDS[measure]})`;
  if (base !== run) return `${label}: ${arrow(STATUS_WORDS[base!], STATUS_WORDS[run!])}${run === "fragile" ? ` (changes under ${m.changedUnder.run!.join("; ")})` : ""}`;
  if (base === "fragile" && !sameList(m.changedUnder.base, m.changedUnder.run)) {
    const added = m.changedUnder.run!.filter((v) => !m.changedUnder.base!.includes(v));
    const gone = m.changedUnder.base!.filter((v) => !m.changedUnder.run!.includes(v));
    return [`${label}: still fragile`, added.length ? `now also under ${added.join("; ")}` : null, gone.length ? `no longer under ${gone.join("; ")}` : null].filter(Boolean).join("; ");
  }
  return null;
}

/**
 * The robustness panel's verdicts at one boundary in the two runs: the verdict counts per measure
 * and each contrast whose verdict (or the variants a fragile verdict names) changed.
 *
 * @example
 * compareRobustness(olderRun, reRun, 0, 0, true).changes;
 * // ["Verdicts on the odds ratios adjusted for the other traits: 2 hold → 1 holds, 1 fragile",
 * //  "Life habit, Infaunal vs Epifaunal (adjusted for the other traits): holds → fragile (changes under Window 3.1 Myr)"]
 */
export function compareRobustness(base: Run, run: Run, baseIndex: number, runIndex: number, comparable: boolean): RunDiffRobustness {
  const b = robustnessOf(base, baseIndex);
  const r = robustnessOf(run, runIndex);
  const compared = compares(b.side, r.side, comparable);
  const key = (c: RobustnessPanel["contrasts"][number]) => `${c.traitKey}\u0000${c.contrast}`;
  const measure = (p: { base: RobustnessPanel["contrasts"][number] | null; run: RobustnessPanel["contrasts"][number] | null }, m: Measure) => ({
    status: { base: p.base?.verdict[m].status ?? null, run: p.run?.verdict[m].status ?? null },
    changedUnder: { base: p.base?.verdict[m].changedUnder ?? null, run: p.run?.verdict[m].changedUnder ?? null },
  });
  const contrasts = pairBy(b.panel?.contrasts ?? [], r.panel?.contrasts ?? [], key).map((p) => {
    const c = (p.run ?? p.base)!;
    const crude = measure(p, "crude");
    const adjusted = measure(p, "adjusted");
    const moved = (x: typeof crude) => x.status.base !== x.status.run || !sameList(x.changedUnder.base, x.changedUnder.run);
    return { traitKey: c.traitKey, traitLabel: c.traitLabel, contrast: c.contrast, presence: presence(p), crude, adjusted, changed: compared && (moved(crude) || moved(adjusted)) };
  });
  const counts = {
    crude: { base: countsOf(b.panel, "crude"), run: countsOf(r.panel, "crude") },
    adjusted: { base: countsOf(b.panel, "adjusted"), run: countsOf(r.panel, "adjusted") },
  };
  const changes: string[] = [];
  for (const m of ["crude", "adjusted"] as const) {
    const { base: cb, run: cr } = counts[m];
    if (cb && cr && !sameCounts(cb, cr)) changes.push(`Verdicts on the ${m === "crude" ? "crude odds ratios" : "odds ratios adjusted for the other traits"}: ${arrow(countWords(cb), countWords(cr))}`);
  }
  for (const c of contrasts.filter((x) => x.changed)) {
    const name = `${c.traitLabel}, ${c.contrast}`;
    if (c.presence !== "both") {
      const side = c.presence === "runOnly" ? "run" : "base";
      changes.push(`${name}: ${onlyIn(c.presence)} (crude ${STATUS_WORDS[c.crude.status[side]!]}, adjusted ${STATUS_WORDS[c.adjusted.status[side]!]})`);
      continue;
    }
    for (const m of ["crude", "adjusted"] as const) {
      const line = measureChange(c[m], m, name);
      if (line) changes.push(line);
    }
  }
  return { ...checkFields("robustness", b.side, r.side, comparable, changes), counts, contrasts };
}

// ---------------------------------------------------------------- crisis against background

type CrisisVerdict = "differs" | "same" | "not-tested";
const CRISIS_WORDS: Record<CrisisVerdict, string> = { differs: "differs from background", same: "does not differ from background", "not-tested": "not tested (the model could not be fitted)" };

function crisisOf(run: Run) {
  const stored = run.results?.crisisVersusBackground;
  if (!stored) return { side: absent, result: null };
  if (stored.status === "not-computed") return { side: { status: "not-computed", reason: stored.reason } as Side, result: null };
  return { side: computed, result: stored.result };
}

/**
 * Crisis against background in the two runs: which boundary was the crisis, and each trait's (and
 * contrast's) verdict, differs from background or not.
 *
 * @example
 * compareCrisis(olderRun, reRun).changes;
 * // ["Feeding mode at the crisis: differs from background → does not differ from background"]
 */
export function compareCrisis(base: Run, run: Run): RunDiffCrisis {
  const b = crisisOf(base);
  const r = crisisOf(run);
  const compared = compares(b.side, r.side, true);
  type Trait = NonNullable<typeof b.result>["traits"][number];
  const traitVerdict = (t: Trait | null): CrisisVerdict | null => (t ? (!t.test ? "not-tested" : t.differs ? "differs" : "same") : null);
  const traits = pairBy(b.result?.traits ?? [], r.result?.traits ?? [], (t) => t.key).map((p) => {
    const t = (p.run ?? p.base)!;
    const contrasts = pairBy(p.base?.contrasts ?? [], p.run?.contrasts ?? [], (c) => c.contrast).map((cp) => {
      const verdict = { base: cp.base ? (cp.base.sentence ? "differs" : "same") : null, run: cp.run ? (cp.run.sentence ? "differs" : "same") : null } as const;
      return { contrast: cp.key, presence: presence(cp), verdict, ratio: { base: cp.base?.ratio.estimate ?? null, run: cp.run?.ratio.estimate ?? null }, changed: compared && verdict.base !== verdict.run };
    });
    const verdict = { base: traitVerdict(p.base), run: traitVerdict(p.run) };
    return {
      key: t.key,
      label: t.label,
      presence: presence(p),
      verdict,
      adjustedPValue: { base: p.base?.test?.adjustedPValue ?? null, run: p.run?.test?.adjustedPValue ?? null },
      contrasts,
      changed: compared && (verdict.base !== verdict.run || contrasts.some((c) => c.changed)),
    };
  });
  const crisis = { base: b.result?.crisis.label ?? null, run: r.result?.crisis.label ?? null };
  const changes: string[] = [];
  if (crisis.base !== crisis.run) changes.push(`The crisis: ${arrow(crisis.base ?? "none", crisis.run ?? "none")}`);
  for (const t of traits.filter((x) => x.changed)) {
    if (t.presence !== "both") {
      changes.push(`${t.label}: ${onlyIn(t.presence)} (${CRISIS_WORDS[(t.verdict.run ?? t.verdict.base)!]})`);
      continue;
    }
    if (t.verdict.base !== t.verdict.run) {
      changes.push(`${t.label} at the crisis: ${arrow(CRISIS_WORDS[t.verdict.base!], CRISIS_WORDS[t.verdict.run!])}`);
      continue;
    }
    // The trait's verdict stands; say which of its contrasts moved.
    for (const c of t.contrasts.filter((x) => x.changed)) {
      const name = `${t.label}, ${c.contrast}`;
      if (c.presence !== "both") changes.push(`${name}: ${onlyIn(c.presence)}`);
      else changes.push(`${name} at the crisis: ${arrow(CRISIS_WORDS[c.verdict.base!], CRISIS_WORDS[c.verdict.run!])}`);
    }
  }
  return { ...checkFields("crisis", b.side, r.side, true, changes), crisis, traits };
}
