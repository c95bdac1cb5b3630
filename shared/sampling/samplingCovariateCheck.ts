import { chooseReference, countStates, encodeTrait, fitSelectivityModel, formatNumber, numericPredictorLabel, scaleNumericTrait, type ModelTraitInput } from "../selectivity/index";
import type { Interval, SelectivityTaxon, SelectivityTraitSpec } from "../selectivity/types";
import { SAMPLING_COVARIATE_LABELS, type SamplingCheck, type SamplingCovariate, type SamplingVerdict } from "../schemas/samplingCheck";

/** How often each taxon was found: finds (occurrences) and distinct collections, by taxon id. */
export type SamplingCounts = Record<string, { occurrences: number; collections: number }>;

export interface SamplingCheckInput {
  taxa: SelectivityTaxon[];
  traits: SelectivityTraitSpec[];
  counts: SamplingCounts;
  covariates: SamplingCovariate[];
  options: { forceFirth: boolean; level: number };
}

/** Fewer taxa with finds than this give no comparison (common practice, no source: a handful of taxa cannot carry several terms). */
export const SAMPLING_MIN_TAXA = 10;

export const SAMPLING_CAUTION =
  "A rarely found taxon is more likely to look extinct, so sampling can make a trait look selective. But how often a taxon is found also follows from " +
  "its abundance and geographic range, which traits can shape: an odds ratio that weakens once sampling is allowed for may still be partly real. Read " +
  "the two side by side; the counts come from this study's uploaded occurrences only.";

const COVARIATE_KEYS: Record<SamplingCovariate, string> = { occurrences: "__sampling_occurrences", collections: "__sampling_collections" };

const covariateSpec = (covariate: SamplingCovariate): SelectivityTraitSpec => ({
  key: COVARIATE_KEYS[covariate],
  label: covariate === "occurrences" ? "Number of occurrences (log10)" : "Number of collections",
  kind: "numeric",
  states: [],
  transform: "none",
  standardise: false,
  unit: covariate === "occurrences" ? "log10 finds" : "collections",
});

/**
 * Does a trait's odds ratio hold once sampling is allowed for? Two multiple logistic regressions of
 * extinction (the run's own fit, fitSelectivityModel) over the same taxa, the victims and survivors
 * with at least one occurrence: the chosen traits alone, and the chosen traits with the sampling
 * covariates (log10 of the number of finds, so an odds ratio per tenfold more finds; the number of
 * distinct collections, per collection). A rarely sampled taxon is more likely to be missed after
 * its true extinction or before its last true appearance (the Signor-Lipps effect, Signor & Lipps
 * 1982, GSA Special Paper 190), so sampling can produce an apparent trait effect. Taxa without any
 * occurrence are left out of both fits and counted: their sampling is unknown, not zero (their
 * range may come from elsewhere). A contrast holds when its interval excludes 1 on the same side
 * in both fits; it does not hold when it excluded 1 without sampling and no longer does (common
 * practice, no source). References and scalings are those of the run's own tables (all taxa).
 *
 * @example
 * samplingCovariateCheck({ taxa, traits: [lifeHabit], counts, covariates: ["occurrences"], options: { forceFirth: false, level: 0.95 } })
 * // => { taxa: 180, withoutOccurrences: 12, contrasts: [{ contrast: "Infaunal vs Epifaunal", withoutSampling: { estimate: 2.9, ... },
 * //      withSampling: { estimate: 1.1, ... }, verdict: "does_not_hold", words: "..." }], ... }
 */
export function samplingCovariateCheck(input: SamplingCheckInput): SamplingCheck {
  const { taxa, traits, counts, covariates, options } = input;
  const level = options.level;
  const covariateList = covariates.map((c) => SAMPLING_COVARIATE_LABELS[c].toLowerCase()).join(" and ");
  const method =
    `Two multiple logistic regressions over the same taxa (victims and survivors with at least one occurrence): the chosen traits alone, and the chosen traits with ${covariateList} ` +
    "(occurrences as log10 of the number of finds, so per tenfold more finds; collections per distinct collection). A trait's odds ratio holds once sampling is allowed for " +
    `when its ${Math.round(level * 100)}% interval excludes 1 on the same side in both fits (common practice, no source). Taxa without any occurrence are left out of both fits: their sampling is unknown, not zero.`;
  const sample = taxa.filter((t) => (counts[t.id]?.occurrences ?? 0) > 0);
  const base: SamplingCheck = { covariates: [...covariates], taxa: sample.length, withoutOccurrences: taxa.length - sample.length, covariateTerms: [], contrasts: [], note: null, method, caution: SAMPLING_CAUTION };
  if (covariates.length === 0) return { ...base, note: "No sampling covariate was chosen." };
  const victims = sample.reduce((n, t) => n + t.outcome, 0);
  if (sample.length === 0) return { ...base, note: "No victim or survivor has an occurrence in this study's uploads, so sampling cannot be allowed for: upload the finds first." };
  if (sample.length < SAMPLING_MIN_TAXA) return { ...base, note: `Only ${sample.length} victims and survivors have occurrences; at least ${SAMPLING_MIN_TAXA} are needed to compare the fits.` };
  if (victims === 0 || victims === sample.length) return { ...base, note: `All ${sample.length} taxa with occurrences ${victims === 0 ? "survived" : "died out"}; a regression needs both victims and survivors.` };

  // References and scalings as the run's own tables chose them, over all its taxa.
  const allOutcome = Uint8Array.from(taxa, (t) => t.outcome);
  const traitInputs: ModelTraitInput[] = traits.map((spec) => {
    const all = encodeTrait(spec, taxa);
    const encoded = encodeTrait(spec, sample);
    if (all.kind === "states") {
      const chosen = chooseReference(spec, countStates(all.codes, allOutcome, spec.states.length));
      return { spec, encoded, reference: chosen.index, scaling: null, untestable: null };
    }
    return { spec, encoded, reference: -1, scaling: scaleNumericTrait(spec, all.transformed), untestable: null };
  });
  const withValues = sample.map((t) => {
    const c = counts[t.id]!;
    return { ...t, values: { ...t.values, [COVARIATE_KEYS.occurrences]: Math.log10(c.occurrences), [COVARIATE_KEYS.collections]: c.collections } };
  });
  const covariateInputs: ModelTraitInput[] = covariates.map((covariate) => {
    const spec = covariateSpec(covariate);
    return { spec, encoded: encodeTrait(spec, withValues), reference: -1, scaling: { center: 0, scale: 1, count: withValues.length, constant: false }, untestable: null };
  });
  const outcome = Uint8Array.from(sample, (t) => t.outcome);
  const fitOptions = { forceFirth: options.forceFirth, level };
  const without = fitSelectivityModel(traitInputs, outcome, fitOptions);
  const withSampling = fitSelectivityModel([...traitInputs, ...covariateInputs], outcome, fitOptions);
  if (!without.model || !withSampling.model) {
    return { ...base, note: `The comparison could not be made: ${(without.modelNote ?? withSampling.modelNote ?? "a multiple regression could not be fitted.").replace(/\.$/, "")}.` };
  }

  const covariateTerms = covariates.map((covariate) => {
    const key = COVARIATE_KEYS[covariate];
    const found = withSampling.adjusted.get(key)?.get("") ?? null;
    const term = withSampling.model!.terms.find((t) => t.name === key);
    // A covariate with one value among these taxa (no collection ids in the uploads, say) stays out of the fit: said beside its name.
    const left = found ? null : withSampling.missingReasons.get(key);
    return { covariate, label: left ? `${SAMPLING_COVARIATE_LABELS[covariate]} (${left.replace(/\.$/, "")})` : SAMPLING_COVARIATE_LABELS[covariate], oddsRatio: found ? { estimate: found.estimate, ci: [found.ci[0], found.ci[1]] as [number, number] } : null, pValue: term?.pValue ?? null };
  });

  const contrasts: SamplingCheck["contrasts"] = [];
  for (const spec of traits) {
    const before = without.adjusted.get(spec.key);
    const after = withSampling.adjusted.get(spec.key);
    const states: Array<string> = spec.kind === "numeric" ? [""] : [...(before?.keys() ?? [])];
    if (states.length === 0) {
      contrasts.push({
        traitKey: spec.key,
        traitLabel: spec.label,
        state: null,
        contrast: spec.label,
        withoutSampling: null,
        withSampling: null,
        verdict: "not_estimable",
        words: `${spec.label}: not estimable here. ${without.missingReasons.get(spec.key) ?? "It is not in the multiple regression over the taxa with occurrences."}`,
      });
      continue;
    }
    const referenceCode = without.model.encoding.traits.find((t) => t.key === spec.key && t.kind === "states");
    const stateLabel = (code: string) => spec.states.find((s) => s.code === code)?.label ?? code;
    for (const state of states) {
      const contrast =
        spec.kind === "numeric" ? numericPredictorLabel(spec) : `${spec.label}: ${stateLabel(state)} vs ${stateLabel(referenceCode && referenceCode.kind === "states" ? referenceCode.reference : "")}`;
      const a = before?.get(state) ?? null;
      const b = after?.get(state) ?? null;
      const verdict = judge(a, b);
      contrasts.push({
        traitKey: spec.key,
        traitLabel: spec.label,
        state: spec.kind === "numeric" ? null : state,
        contrast,
        withoutSampling: a && { estimate: a.estimate, ci: [a.ci[0], a.ci[1]] },
        withSampling: b && { estimate: b.estimate, ci: [b.ci[0], b.ci[1]] },
        verdict,
        words: describe(contrast, a, b, verdict),
      });
    }
  }
  return { ...base, covariateTerms, contrasts };
}

/** Which side of 1 the interval lies on: 1 above, -1 below, 0 when it includes 1. */
const side = (i: Interval) => (i.ci[0] > 1 ? 1 : i.ci[1] < 1 ? -1 : 0);

function judge(without: Interval | null, withSampling: Interval | null): SamplingVerdict {
  if (!without || !withSampling || ![without.estimate, ...without.ci, withSampling.estimate, ...withSampling.ci].every(Number.isFinite)) return "not_estimable";
  const before = side(without);
  if (before === 0) return "no_signal";
  return side(withSampling) === before ? "holds" : "does_not_hold";
}

const show = (i: Interval) => `${formatNumber(i.estimate)} (${formatNumber(i.ci[0])} to ${formatNumber(i.ci[1])})`;

function describe(contrast: string, without: Interval | null, withSampling: Interval | null, verdict: SamplingVerdict): string {
  if (verdict === "not_estimable" || !without || !withSampling) return `${contrast}: the odds ratio could not be estimated in both fits, so the comparison is not possible.`;
  const pair = `odds ratio ${show(without)} without sampling, ${show(withSampling)} once sampling is allowed for`;
  if (verdict === "holds") return `${contrast}: ${pair}. It holds once sampling is allowed for: the interval still excludes 1.`;
  if (verdict === "no_signal") return `${contrast}: ${pair}. Its interval includes 1 even without sampling, so there is no apparent effect for sampling to explain.`;
  return side(withSampling) === 0
    ? `${contrast}: ${pair}. It does not hold once sampling is allowed for: the interval now includes 1, so how often the taxa were found may explain the apparent effect.`
    : `${contrast}: ${pair}. It does not hold once sampling is allowed for: the odds ratio turns to the other side of 1.`;
}
