// Comparing two runs of a study side by side (the "what changed" of a re-run): parameters, data
// hash, row counts and, boundary by boundary and trait by trait, the numbers that moved, and the
// verdicts of the run's own checks (compareRunChecks.ts). Pure, so the server answers the diff
// route with it and anything else can compare two stored runs.
import { formatMa, formatMyr } from "../format/ages";
import { DEFAULT_WINDOW_FACTORS } from "../schemas/runChecks";
import { CORRECTION_LABELS, type RunParams } from "../schemas/runParams";
import type { Run } from "../schemas/runs";
import type { RunDiff } from "../schemas/runDiff";
import { SAMPLING_COVARIATE_LABELS } from "../schemas/samplingCheck";
import { compareCrisis, compareRobustness, compareSampling } from "./compareRunChecks";
import { pairBy, presence } from "./pairBy";

type Pair = { base: number | null; run: number | null };
const pair = (base: number | null | undefined, run: number | null | undefined): Pair => ({ base: base ?? null, run: run ?? null });
const differs = (p: Pair) => p.base !== p.run;

function paramChanges(base: RunParams, run: RunParams, traitLabel: (id: string) => string): string[] {
  const out: string[] = [];
  const boundaryText = (p: RunParams) => p.boundaries.map((b) => `${formatMa(b.boundaryMa)}${b.windowMyr !== undefined ? ` (window ${formatMyr(b.windowMyr)})` : ""}`).join(", ");
  if (boundaryText(base) !== boundaryText(run)) out.push(`Boundaries: ${boundaryText(base)} → ${boundaryText(run)}`);
  const traitText = (t: RunParams["traits"][number]) =>
    [traitLabel(t.traitId), t.reference ? `reference ${t.reference}` : null, t.transform ? t.transform : null, t.standardise ? "standardised" : null].filter(Boolean).join(", ");
  const baseTraits = new Map(base.traits.map((t) => [t.traitId, traitText(t)]));
  const runTraits = new Map(run.traits.map((t) => [t.traitId, traitText(t)]));
  for (const [id, text] of baseTraits) {
    if (!runTraits.has(id)) out.push(`Trait dropped: ${text}`);
    else if (runTraits.get(id) !== text) out.push(`Trait options: ${text} → ${runTraits.get(id)}`);
  }
  for (const [id, text] of runTraits) if (!baseTraits.has(id)) out.push(`Trait added: ${text}`);
  if (base.correction !== run.correction) out.push(`Correction: ${CORRECTION_LABELS[base.correction]} → ${CORRECTION_LABELS[run.correction]}`);
  if (base.forceFirth !== run.forceFirth) out.push(`Firth's regression forced: ${base.forceFirth ? "yes" : "no"} → ${run.forceFirth ? "yes" : "no"}`);
  if (base.level !== run.level) out.push(`Confidence level: ${base.level} → ${run.level}`);
  if (base.confoundingThreshold !== run.confoundingThreshold) out.push(`Confounding threshold: ${base.confoundingThreshold} → ${run.confoundingThreshold}`);
  if (base.stratifyBy !== run.stratifyBy) out.push(`Stratified by: ${base.stratifyBy} → ${run.stratifyBy}`);
  const crisisText = (p: RunParams) => {
    const b = p.crisisBoundary === undefined ? undefined : p.boundaries[p.crisisBoundary];
    return b ? (b.label ?? formatMa(b.boundaryMa)) : "none";
  };
  if (crisisText(base) !== crisisText(run)) out.push(`Crisis boundary: ${crisisText(base)} → ${crisisText(run)}`);
  const samplingText = (p: RunParams) => (p.samplingCovariates?.length ? p.samplingCovariates.map((c) => SAMPLING_COVARIATE_LABELS[c]).join(" and ") : "none");
  if (samplingText(base) !== samplingText(run)) out.push(`Sampling covariates: ${samplingText(base)} → ${samplingText(run)}`);
  // Runs that left the robustness settings out used the defaults.
  const windowsText = (p: RunParams) => `${(p.robustness?.windowFactors ?? DEFAULT_WINDOW_FACTORS).join(", ")} times the window`;
  if (windowsText(base) !== windowsText(run)) out.push(`Robustness windows: ${windowsText(base)} → ${windowsText(run)}`);
  const truncationText = (p: RunParams) => (p.robustness?.truncationMyr === undefined ? "a quarter of the window" : formatMyr(p.robustness.truncationMyr));
  if (truncationText(base) !== truncationText(run)) out.push(`Robustness truncation: ${truncationText(base)} → ${truncationText(run)}`);
  return out;
}

/**
 * What changed from `base` to `run`: the parameters in words, whether the data hash moved, the
 * row counts, and for each boundary (paired by age), trait (by key) and contrast (by name) the
 * base and run values of the odds ratios, p-values and flags, each marked `changed` when any differs.
 * An item only one side has is kept, with `presence` saying which. Per boundary, the verdicts of the
 * sampling check and the robustness panel, and for the run as a whole crisis against background,
 * with the verdicts that changed in words; a check only one run holds is named in `note`, not
 * compared.
 *
 * @example
 * const diff = compareRuns(olderRun, reRun);
 * diff.paramsChanged; // ["Confidence level: 0.95 → 0.9"]
 * diff.boundaries[0].traits.filter((t) => t.changed).map((t) => t.label);
 */
export function compareRuns(base: Run, run: Run): RunDiff {
  const labels = new Map([...(base.results?.traits ?? []), ...(run.results?.traits ?? [])].map((t) => [t.traitId, t.label]));
  const { results: _b, ...baseSummary } = base;
  const { results: _r, ...runSummary } = run;
  void _b;
  void _r;
  const baseBoundaries = base.results?.boundaries ?? [];
  const runBoundaries = run.results?.boundaries ?? [];
  return {
    base: baseSummary,
    run: runSummary,
    hashChanged: base.dataHash !== run.dataHash,
    rowCount: { ...pair(base.rowCount, run.rowCount), change: base.rowCount !== null && run.rowCount !== null ? run.rowCount - base.rowCount : null },
    paramsChanged: paramChanges(base.params, run.params, (id) => labels.get(id) ?? id),
    boundaries: pairBy(baseBoundaries, runBoundaries, (b) => String(b.boundaryMa)).map((bp) => {
      const b = bp.base;
      const r = bp.run;
      const comparable = bp.base !== null && bp.run !== null;
      return {
        boundaryMa: (r ?? b)!.boundaryMa,
        windowMyr: pair(b?.windowMyr, r?.windowMyr),
        label: (r ?? b)!.label,
        presence: presence(bp),
        victims: pair(b?.victims, r?.victims),
        survivors: pair(b?.survivors, r?.survivors),
        completeCases: pair(b?.completeCases, r?.completeCases),
        traits: pairBy(b?.result.traits ?? [], r?.result.traits ?? [], (t) => t.key).map((tp) => {
          const contrasts = pairBy(tp.base?.contrasts ?? [], tp.run?.contrasts ?? [], (c) => c.contrast).map((cp) => {
            const numbers = {
              crudeOddsRatio: pair(cp.base?.crude.estimate, cp.run?.crude.estimate),
              cladeAdjustedOddsRatio: pair(cp.base?.cladeAdjusted?.estimate, cp.run?.cladeAdjusted?.estimate),
              modelAdjustedOddsRatio: pair(cp.base?.modelAdjusted?.estimate, cp.run?.modelAdjusted?.estimate),
            };
            const flagged = { base: cp.base?.flagged ?? null, run: cp.run?.flagged ?? null };
            return { contrast: cp.key, ...numbers, flagged, changed: Object.values(numbers).some(differs) || flagged.base !== flagged.run };
          });
          const numbers = {
            used: pair(tp.base?.used, tp.run?.used),
            pValue: pair(tp.base?.test.pValue, tp.run?.test.pValue),
            adjustedPValue: pair(tp.base?.test.adjustedPValue, tp.run?.test.adjustedPValue),
          };
          return {
            key: tp.key,
            label: (tp.run ?? tp.base)!.label,
            presence: presence(tp),
            ...numbers,
            contrasts,
            changed: Object.values(numbers).some(differs) || contrasts.some((c) => c.changed),
          };
        }),
        sampling: compareSampling(b, r, comparable),
        robustness: compareRobustness(base, run, b ? baseBoundaries.indexOf(b) : -1, r ? runBoundaries.indexOf(r) : -1, comparable),
      };
    }),
    crisis: compareCrisis(base, run),
  };
}
