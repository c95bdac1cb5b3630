import { adjustPValues } from "../stats/adjustPValues";
import { chooseReference } from "./chooseReference";
import { crisisVersusBackground, type CrisisVersusBackgroundRow } from "./crisisVersusBackground";
import { encodeTrait } from "./encodeTrait";
import { formatNumber } from "./formatNumber";
import { numericStep, scaleNumericTrait } from "./scaleNumericTrait";
import { countStates } from "./stateTable";
import type { CrisisComparisonContrast, CrisisComparisonResult, CrisisComparisonTrait } from "../schemas/runChecks";
import type { MultipleTestingMethod, SelectivityTaxon, SelectivityTraitSpec } from "./types";

export interface CrisisComparisonInput {
  /** Every boundary of the run with its victims and survivors. */
  boundaries: Array<{ label: string; taxa: SelectivityTaxon[] }>;
  /** Index of the crisis in `boundaries`; the others are background. */
  crisis: number;
  traits: SelectivityTraitSpec[];
  options: { correction: MultipleTestingMethod; level: number };
}

// The result's types come from its zod schema (shared/schemas/runChecks.ts), the one description of
// what a run stores.
export type { CrisisComparisonContrast, CrisisComparisonResult, CrisisComparisonTrait };

/**
 * Crisis against background for every trait of a run: the interaction model of
 * crisisVersusBackground (boundary-specific intercepts, the trait's background effect and its extra
 * effect at the crisis, likelihood-ratio test; Jablonski 1986, Science 231:129) fitted per trait
 * over the taxa of all the run's boundaries, with the tests' p-values adjusted across traits by the
 * run's multiple-testing method (Benjamini & Hochberg 1995, Holm 1979 or Bonferroni). A trait
 * differs when its adjusted p-value is below 1 - level; then each state whose ratio interval
 * excludes 1 gets a sentence ("the crisis punished X more than background did"). States missing at
 * the crisis or in background are left out of the trait's model with a note, since their effect on
 * that side cannot be estimated; a trait that keeps fewer than two states is not tested.
 *
 * @example
 * crisisComparison({ boundaries: [{ label: "Albian", taxa }, { label: "Turonian", taxa: crisisTaxa }], crisis: 1,
 *   traits: [feeding], options: { correction: "bh", level: 0.95 } })
 * // => { crisis: { index: 1, label: "Turonian" }, traits: [{ key: "feeding", test: { statistic: 21.4, df: 2, pValue: 2e-5, adjustedPValue: 2e-5 },
 * //      differs: true, contrasts: [{ contrast: "Deposit feeder vs Suspension feeder", ratio: { estimate: 3.1, ci: [1.8, 5.4] },
 * //      sentence: "The crisis punished Feeding: Deposit feeder (against Suspension feeder) more than background did." }, ...] }] }
 */
export function crisisComparison(input: CrisisComparisonInput): CrisisComparisonResult {
  const fn = "crisisComparison";
  const { boundaries, crisis, traits, options } = input;
  if (!Array.isArray(boundaries) || boundaries.length < 2) throw new Error(`${fn}: crisis against background needs at least two boundaries`);
  if (!Number.isInteger(crisis) || crisis < 0 || crisis >= boundaries.length) {
    throw new Error(`${fn}: crisis is ${String(crisis)}; it must be the index of one of the ${boundaries.length} boundaries`);
  }
  // Labels must be unique to tell the boundaries apart in the model; number repeated ones.
  const labels = uniqueLabels(boundaries.map((b) => b.label));
  const crisisLabel = labels[crisis];
  const level = options.level;
  const alpha = 1 - level;

  const results: CrisisComparisonTrait[] = traits.map((spec) => compareTrait(spec, boundaries, labels, crisisLabel, level));
  const tested = results.filter((r) => r.test !== null);
  const adjusted = adjustPValues(
    tested.map((r) => r.test!.pValue),
    options.correction,
  );
  tested.forEach((r, k) => {
    r.test!.adjustedPValue = adjusted[k];
    r.differs = adjusted[k] < alpha;
  });
  for (const r of results) {
    if (!r.test) continue;
    const p = `adjusted p = ${formatP(r.test.adjustedPValue!)}`;
    if (!r.differs) {
      r.summary = `No evidence that the crisis treated ${r.label} differently from background (${p}).`;
      continue;
    }
    for (const c of r.contrasts) {
      const [low, high] = c.ratio.ci;
      if (low > 1 || high < 1) c.sentence = contrastSentence(r, c, spec(traits, r.key));
    }
    const sentences = r.contrasts.map((c) => c.sentence).filter((s): s is string => s !== null);
    r.summary = sentences.length
      ? `${sentences.join(" ")} (${p})`
      : `The crisis treated the states of ${r.label} differently from background taken together (${p}), though no single state's ratio interval excludes 1.`;
  }

  return {
    crisis: { index: crisis, label: crisisLabel },
    background: labels.filter((_, i) => i !== crisis),
    correction: options.correction,
    level,
    traits: results,
    method:
      `Per trait, one logistic model over the taxa of all ${boundaries.length} boundaries with an intercept per boundary, the trait's effect in background and its extra effect at the crisis ` +
      `(an interaction; the question of Jablonski 1986, Science 231:129, whether mass extinctions change the rules of survival). ` +
      `Likelihood-ratio test of the extra effect (penalized, with Firth's regression, where the data separate), p-values adjusted across traits (${options.correction === "bh" ? "Benjamini-Hochberg" : options.correction === "holm" ? "Holm" : "Bonferroni"}); ` +
      `a trait differs when its adjusted p-value is below ${formatNumber(alpha)}. Odds ratios above 1 mean higher extinction odds.`,
  };
}

function spec(traits: SelectivityTraitSpec[], key: string): SelectivityTraitSpec {
  return traits.find((t) => t.key === key)!;
}

function compareTrait(spec: SelectivityTraitSpec, boundaries: CrisisComparisonInput["boundaries"], labels: string[], crisisLabel: string, level: number): CrisisComparisonTrait {
  const base: CrisisComparisonTrait = {
    key: spec.key,
    label: spec.label,
    kind: spec.kind,
    reference: null,
    used: 0,
    test: null,
    contrasts: [],
    differs: false,
    summary: "",
    method: null,
    notes: [],
  };
  const encoded = boundaries.map((b) => ({ taxa: b.taxa, e: encodeTrait(spec, b.taxa) }));
  const rows: CrisisVersusBackgroundRow[] = [];
  let trait: { kind: "states"; reference: string } | { kind: "numeric" };
  const stateLabel = new Map(spec.states.map((s) => [s.code, s.label]));

  if (spec.kind === "numeric") {
    const all = new Float64Array(encoded.reduce((n, b) => n + b.taxa.length, 0));
    let k = 0;
    for (const b of encoded) for (let i = 0; i < b.taxa.length; i++) all[k++] = b.e.kind === "numeric" ? b.e.transformed[i] : NaN;
    const scaling = scaleNumericTrait(spec, all);
    encoded.forEach((b, j) => {
      if (b.e.kind !== "numeric") return;
      for (let i = 0; i < b.taxa.length; i++) {
        const v = b.e.transformed[i];
        rows.push({ boundary: labels[j], outcome: b.taxa[i].outcome, value: Number.isNaN(v) ? null : (v - scaling.center) / scaling.scale });
      }
    });
    if (spec.standardise && scaling.count > 1 && !scaling.constant) {
      base.notes.push(`Odds ratios are per standard deviation (${formatNumber(scaling.scale)}) of the ${spec.transform === "log10" ? "log10 values" : "values"} over all boundaries.`);
    }
    trait = { kind: "numeric" };
  } else {
    // Reference: the run's choice, else the most common state over all boundaries.
    const counts = { victims: new Int32Array(spec.states.length), survivors: new Int32Array(spec.states.length) };
    const atCrisis = new Set<number>();
    const atBackground = new Set<number>();
    encoded.forEach((b, j) => {
      if (b.e.kind !== "states") return;
      const c = countStates(b.e.codes, Uint8Array.from(b.taxa, (t) => t.outcome), spec.states.length);
      for (let s = 0; s < spec.states.length; s++) {
        counts.victims[s] += c.victims[s];
        counts.survivors[s] += c.survivors[s];
        if (c.victims[s] + c.survivors[s] > 0) (labels[j] === crisisLabel ? atCrisis : atBackground).add(s);
      }
    });
    const chosen = chooseReference(spec, counts);
    if (chosen.note) base.notes.push(chosen.note);
    if (chosen.index < 0) {
      base.summary = `Not tested: no taxon at risk has a value of ${spec.label}.`;
      return base;
    }
    let reference = chosen.index;
    const bothSides = (s: number) => atCrisis.has(s) && atBackground.has(s);
    if (!bothSides(reference)) {
      const alternative = spec.states.findIndex((_, s) => bothSides(s));
      if (alternative < 0) {
        base.summary = `Not tested: no state of ${spec.label} holds taxa both at the crisis and in background.`;
        return base;
      }
      base.notes.push(`${spec.states[reference].label} is not held both at the crisis and in background, so ${spec.states[alternative].label} is the reference here.`);
      reference = alternative;
    }
    const left = spec.states.map((_, s) => s).filter((s) => s !== reference && counts.victims[s] + counts.survivors[s] > 0 && !bothSides(s));
    for (const s of left) {
      base.notes.push(`${spec.states[s].label} is left out: it has no taxa ${atCrisis.has(s) ? "in background" : "at the crisis"}, so its effect there cannot be estimated.`);
    }
    const keep = new Set(spec.states.map((_, s) => s).filter(bothSides));
    if (keep.size < 2) {
      base.reference = spec.states[reference].code;
      base.summary = `Not tested: only one state of ${spec.label} holds taxa both at the crisis and in background.`;
      return base;
    }
    encoded.forEach((b, j) => {
      if (b.e.kind !== "states") return;
      for (let i = 0; i < b.taxa.length; i++) {
        const code = b.e.codes[i];
        rows.push({ boundary: labels[j], outcome: b.taxa[i].outcome, value: code >= 0 && keep.has(code) ? spec.states[code].code : null });
      }
    });
    base.reference = spec.states[reference].code;
    trait = { kind: "states", reference: spec.states[reference].code };
  }

  try {
    const fit = crisisVersusBackground({ rows, crisis: crisisLabel, trait, level });
    base.used = fit.n;
    base.test = { statistic: fit.test.statistic, df: fit.test.df, pValue: fit.test.pValue, adjustedPValue: null };
    base.method = fit.method;
    const referenceLabel = base.reference !== null ? (stateLabel.get(base.reference) ?? base.reference) : null;
    base.contrasts = fit.contrasts.map((c) => ({
      contrast: c.state === null ? numericStep(spec) : `${stateLabel.get(c.state) ?? c.state} vs ${referenceLabel}`,
      state: c.state,
      backgroundOddsRatio: c.backgroundOddsRatio,
      backgroundCi: c.backgroundCi,
      crisisOddsRatio: c.crisisOddsRatio,
      crisisCi: c.crisisCi,
      ratio: c.ratio,
      sentence: null,
    }));
  } catch (err) {
    base.used = rows.filter((r) => r.value !== null).length;
    base.summary = `Not tested: ${err instanceof Error ? err.message.replace(/^crisisVersusBackground: /, "") : String(err)}.`;
  }
  return base;
}

function contrastSentence(trait: CrisisComparisonTrait, contrast: CrisisComparisonContrast, spec: SelectivityTraitSpec): string {
  const punished = contrast.ratio.estimate > 1;
  const verb = punished ? "punished" : "favoured";
  const times = punished ? contrast.ratio.estimate : 1 / contrast.ratio.estimate;
  const what =
    contrast.state === null
      ? `higher ${trait.label} (${numericStep(spec)})`
      : `${trait.label}: ${spec.states.find((s) => s.code === contrast.state)?.label ?? contrast.state} (against ${spec.states.find((s) => s.code === trait.reference)?.label ?? trait.reference})`;
  return `The crisis ${verb} ${what} more than background did: its odds ratio of extinction was ${formatNumber(contrast.crisisOddsRatio)} at the crisis against ${formatNumber(contrast.backgroundOddsRatio)} in background, ${formatNumber(times)} times ${punished ? "higher" : "lower"}.`;
}

function uniqueLabels(labels: string[]): string[] {
  const seen = new Map<string, number>();
  return labels.map((label) => {
    const n = (seen.get(label) ?? 0) + 1;
    seen.set(label, n);
    return n === 1 ? label : `${label} (${n})`;
  });
}

function formatP(p: number): string {
  if (p < 1e-15) return "< 1e-15";
  if (p < 0.001) return p.toExponential(1);
  return p.toFixed(3);
}
