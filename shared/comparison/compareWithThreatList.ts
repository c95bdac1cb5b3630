import { IUCN_CATEGORIES, IUCN_ORDINAL, threatGroup, type IucnCategory } from "../iucn";
import { scoreWithModel } from "../selectivity/scoreWithModel";
import type { ModelResult, TraitResult } from "../selectivity/types";
import { logisticRegression, oddsRatio, rocAuc, rocCurve, spearman } from "../stats/index";
import type {
  ComparisonCounts,
  ComparisonOptions,
  ComparisonResult,
  ComparisonSpecies,
  OddsRatioToday,
  RocSummary,
  ScoredSpecies,
  SpearmanSummary,
  TraitComparison,
  UnscoredReason,
} from "./types";

/** Most points of a stored ROC curve; longer curves are thinned evenly (the area is computed on all). */
export const ROC_MAX_POINTS = 400;
const EXAMPLES = 3;

export interface CompareInput {
  species: ComparisonSpecies[];
  /** The past crisis's fitted model (one boundary of a run). */
  model: ModelResult;
  /** The same boundary's per-trait results, for the past odds ratios. */
  past: TraitResult[];
  options: ComparisonOptions;
  /** State labels by trait key and code, for naming contrasts the past results do not name. */
  stateLabels?: Record<string, Record<string, string>>;
}

/**
 * Holds a past crisis's selectivity against a modern threat list. Every species is scored with the
 * crisis's fitted model (scoreWithModel: the predicted probability of extinction with its
 * interval); species the model cannot score are counted by reason. Threatened species (CR, EN, VU)
 * are set against not-threatened ones (NT, LC); EX, EW, DD and NE are kept out and counted. Then:
 * - the area under the ROC curve of the score for telling threatened from not threatened, which
 *   equals the Mann-Whitney statistic U/(n1 n0) (Hanley & McNeil 1982), with DeLong's interval;
 * - Spearman's rank correlation of the score with the ordinal category LC = 0 ... CR = 4;
 * - per trait contrast of the model, the odds ratio of being threatened today (sample odds ratio with
 *   Woolf's interval for states, univariate logistic regression for numbers, on the model's scaling)
 *   next to the same contrast's crude and model-adjusted odds ratios of extinction in the crisis;
 * - the species listed LC or DD whose predicted probability is at least `worthALookMin`, highest first.
 *
 * @example
 * compareWithThreatList({ species: [...12 invented species...], model, past, options: { level: 0.95, worthALookMin: 0.5 } })
 * // => { roc: { auc: 0.8125, mannWhitneyU: 13, cases: 4, controls: 4, ... }, counts: { excluded: { DD: 1, NE: 1, ... } }, worthALook: [...], ... }
 */
export function compareWithThreatList(input: CompareInput): ComparisonResult {
  const { model, options } = input;
  if (!(options.level > 0 && options.level < 1)) throw new Error(`compareWithThreatList: level is ${options.level}; it must lie strictly between 0 and 1`);
  if (!(options.worthALookMin > 0 && options.worthALookMin < 1)) throw new Error(`compareWithThreatList: worthALookMin is ${options.worthALookMin}; it must lie strictly between 0 and 1`);

  const species: ScoredSpecies[] = input.species.map((s) => {
    const group = threatGroup(s.category);
    const unusable = model.encoding.traits.find((t) => (s.values[t.key] === null || s.values[t.key] === undefined) && s.problems[t.key]);
    if (unusable) return { name: s.name, higherTaxon: s.higherTaxon, category: s.category, group, probability: null, ci: null, reason: s.problems[unusable.key] };
    const score = scoreWithModel(model, s.values, options.level);
    return score.reason === null
      ? { name: s.name, higherTaxon: s.higherTaxon, category: s.category, group, probability: score.probability, ci: score.ci, reason: null }
      : { name: s.name, higherTaxon: s.higherTaxon, category: s.category, group, probability: null, ci: null, reason: score.reason };
  });

  const counts = countSpecies(species);
  const notes: string[] = [];
  const compared = species.filter((s) => s.probability !== null && (s.group === "threatened" || s.group === "notThreatened"));
  const scores = compared.map((s) => s.probability!);
  const labels = compared.map((s) => (s.group === "threatened" ? 1 : 0));

  let roc: RocSummary | null = null;
  let rocNote: string | null = null;
  if (counts.scored.threatened < 2 || counts.scored.notThreatened < 2) {
    rocNote = `The ROC curve needs at least 2 scored species in each group; there are ${counts.scored.threatened} threatened and ${counts.scored.notThreatened} not threatened.`;
  } else {
    const area = rocAuc(scores, labels, { level: options.level });
    const smallSample = area.cases < ROC_MIN_PER_CLASS || area.controls < ROC_MIN_PER_CLASS;
    const verdict = smallSample ? "no-verdict" : area.ci[0] > 0.5 ? "better-than-chance" : area.ci[1] < 0.5 ? "worse-than-chance" : "no-verdict";
    roc = { ...area, verdict, smallSample, points: thinCurve(rocCurve(scores, labels)) };
    if (smallSample) {
      notes.push(
        `Only ${area.cases} threatened and ${area.controls} not-threatened species are scored; with fewer than ${ROC_MIN_PER_CLASS} in a group the area under the curve is too uncertain for a verdict (common practice, no source), so none is given.`,
      );
    }
  }

  let rho: SpearmanSummary | null = null;
  let spearmanNote: string | null = null;
  const ranked = species.filter((s) => s.probability !== null && IUCN_ORDINAL[s.category] !== undefined);
  const ordinal = ranked.map((s) => IUCN_ORDINAL[s.category]!);
  if (ranked.length < 3) spearmanNote = `Spearman's correlation needs at least 3 scored species listed LC to CR; there are ${ranked.length}.`;
  else if (new Set(ordinal).size < 2) spearmanNote = "Every scored species has the same category, so there is nothing to rank.";
  else if (new Set(ranked.map((s) => s.probability)).size < 2) spearmanNote = "Every scored species has the same predicted probability, so there is nothing to rank.";
  else {
    const r = spearman(
      ranked.map((s) => s.probability!),
      ordinal,
    );
    rho = { rho: r.rho, statistic: Number.isFinite(r.statistic) ? r.statistic : null, df: r.df, pValue: r.pValue, method: r.method, n: r.n };
  }

  const worthALook = species
    .filter((s) => (s.category === "LC" || s.category === "DD") && s.probability !== null && s.probability >= options.worthALookMin)
    .sort((a, b) => b.probability! - a.probability! || b.ci![0] - a.ci![0] || a.name.localeCompare(b.name))
    .map((s, i) => ({ ...s, rank: i + 1 }));

  if (model.firth) notes.push("The past crisis's model was fitted by Firth's bias-reduced regression; its scores carry that fit's shrinkage.");
  if (counts.excludedTotal > 0) {
    const parts = (["EX", "EW", "DD", "NE"] as const).filter((c) => counts.excluded[c] > 0).map((c) => `${counts.excluded[c]} ${c}`);
    notes.push(`${parts.join(", ")} kept out of the threatened-against-not comparison (they are scored and listed, but neither threatened nor safe).`);
  }

  return {
    counts,
    unscoredReasons: unscoredReasons(species),
    roc,
    rocNote,
    spearman: rho,
    spearmanNote,
    traits: traitComparisons(input, species),
    worthALook,
    species,
    notes,
  };
}

/** Fewer scored species than this in either group: no verdict sentence from the area (common practice, no source). */
export const ROC_MIN_PER_CLASS = 10;

function countSpecies(species: ScoredSpecies[]): ComparisonCounts {
  const byCategory = Object.fromEntries(IUCN_CATEGORIES.map((c) => [c, 0])) as Record<IucnCategory, number>;
  const scored = { threatened: 0, notThreatened: 0, excluded: 0 };
  const unscored = { threatened: 0, notThreatened: 0, excluded: 0 };
  for (const s of species) {
    byCategory[s.category]++;
    const side = s.group === "threatened" || s.group === "notThreatened" ? s.group : "excluded";
    (s.probability === null ? unscored : scored)[side]++;
  }
  const excluded = { EX: byCategory.EX, EW: byCategory.EW, DD: byCategory.DD, NE: byCategory.NE };
  return {
    species: species.length,
    byCategory,
    threatened: byCategory.CR + byCategory.EN + byCategory.VU,
    notThreatened: byCategory.NT + byCategory.LC,
    excluded,
    excludedTotal: excluded.EX + excluded.EW + excluded.DD + excluded.NE,
    scored,
    unscored,
  };
}

function unscoredReasons(species: ScoredSpecies[]): UnscoredReason[] {
  const byReason = new Map<string, UnscoredReason>();
  for (const s of species) {
    if (s.reason === null) continue;
    let entry = byReason.get(s.reason);
    if (!entry) {
      entry = { reason: s.reason, count: 0, examples: [] };
      byReason.set(s.reason, entry);
    }
    entry.count++;
    if (entry.examples.length < EXAMPLES) entry.examples.push(s.name);
  }
  return [...byReason.values()].sort((a, b) => b.count - a.count || a.reason.localeCompare(b.reason));
}

/** Keeps the first and last point and an even selection between them. */
function thinCurve(points: ReturnType<typeof rocCurve>): RocSummary["points"] {
  const keep =
    points.length <= ROC_MAX_POINTS
      ? points
      : Array.from({ length: ROC_MAX_POINTS }, (_, k) => points[Math.round((k * (points.length - 1)) / (ROC_MAX_POINTS - 1))]);
  // JSON has no Infinity: the starting point (nothing called threatened) has no threshold.
  return keep.map((p) => ({ falsePositiveRate: p.falsePositiveRate, truePositiveRate: p.truePositiveRate, threshold: Number.isFinite(p.threshold) ? p.threshold : null }));
}

/** Species in the comparison groups, with the trait value they hold (null when none is usable). */
function traitComparisons(input: CompareInput, scored: ScoredSpecies[]): TraitComparison[] {
  const { model, options } = input;
  const inGroups = input.species
    .map((s, i) => ({ s, group: scored[i].group }))
    .filter((x) => x.group === "threatened" || x.group === "notThreatened");
  return model.encoding.traits.map((trait) => {
    const past = input.past.find((t) => t.key === trait.key);
    if (trait.kind === "states") {
      const labelOf = (code: string) => input.stateLabels?.[trait.key]?.[code] ?? past?.table.find((r) => r.state === code)?.label ?? code;
      const contrasts = trait.states
        .filter((state) => state !== trait.reference)
        .map((state) => {
          const pastContrast = past?.contrasts.find((c) => c.state === state && c.reference === trait.reference) ?? null;
          const table: [[number, number], [number, number]] = [
            [0, 0],
            [0, 0],
          ];
          for (const { s, group } of inGroups) {
            const value = s.values[trait.key];
            const column = group === "threatened" ? 0 : 1;
            if (value === state) table[0][column]++;
            else if (value === trait.reference) table[1][column]++;
          }
          let today: OddsRatioToday | null = null;
          let todayNote: string | null = null;
          const withState = table[0][0] + table[0][1];
          const withReference = table[1][0] + table[1][1];
          if (withState === 0 || withReference === 0) {
            todayNote = `No listed species in the comparison holds ${withState === 0 ? labelOf(state) : labelOf(trait.reference)}.`;
          } else if (table[0][0] + table[1][0] === 0 || table[0][1] + table[1][1] === 0) {
            todayNote = `Every listed species with ${labelOf(state)} or ${labelOf(trait.reference)} is ${table[0][0] + table[1][0] === 0 ? "not threatened" : "threatened"}: there is nothing to compare.`;
          } else {
            const or = oddsRatio(table, { level: options.level });
            today = {
              estimate: or.estimate,
              ci: [or.ci[0], or.ci[1]],
              method: or.corrected
                ? "sample odds ratio with 0.5 added to every cell because one is zero (Haldane-Anscombe), Woolf interval"
                : "sample odds ratio, Woolf interval",
              table,
              n: withState + withReference,
            };
          }
          return {
            contrast: pastContrast?.contrast ?? `${labelOf(state)} vs ${labelOf(trait.reference)}`,
            state,
            reference: trait.reference,
            today,
            todayNote,
            pastCrude: pastContrast ? { estimate: pastContrast.crude.estimate, ci: pastContrast.crude.ci, method: pastContrast.crude.method } : null,
            pastModelAdjusted: pastContrast?.modelAdjusted ?? null,
          };
        });
      return { key: trait.key, label: trait.label, kind: "states" as const, contrasts };
    }

    const pastContrast = past?.contrasts.find((c) => c.state === null) ?? null;
    const step = pastContrast?.contrast ?? (trait.center === 0 && trait.scale === 1 ? (trait.transform === "log10" ? "per 1 log10 unit" : "per 1 unit") : "per SD");
    const x: number[][] = [];
    const y: number[] = [];
    for (const { s, group } of inGroups) {
      const value = s.values[trait.key];
      if (typeof value !== "number" || !Number.isFinite(value) || (trait.transform === "log10" && value <= 0)) continue;
      const transformed = trait.transform === "log10" ? Math.log10(value) : value;
      x.push([(transformed - trait.center) / trait.scale]);
      y.push(group === "threatened" ? 1 : 0);
    }
    let today: OddsRatioToday | null = null;
    let todayNote: string | null = null;
    const threatened = y.reduce((a, b) => a + b, 0);
    if (y.length < 3 || threatened === 0 || threatened === y.length) {
      todayNote = `A slope needs threatened and not-threatened species with a usable ${trait.label}; there are ${threatened} and ${y.length - threatened}.`;
    } else if (new Set(x.map((r) => r[0])).size < 2) {
      todayNote = `Every listed species in the comparison has the same ${trait.label}: no slope can be estimated.`;
    } else {
      try {
        const fit = logisticRegression(x, y, { names: [trait.key], level: options.level });
        const slope = fit.coefficients[1];
        if ([slope.oddsRatio, slope.oddsRatioCi[0], slope.oddsRatioCi[1]].every(Number.isFinite)) {
          today = {
            estimate: slope.oddsRatio,
            ci: [slope.oddsRatioCi[0], slope.oddsRatioCi[1]],
            method: fit.firth
              ? "univariate logistic regression, Firth's bias-reduced fit because the values separate the groups"
              : "univariate logistic regression, Wald interval",
            table: null,
            n: y.length,
          };
        } else todayNote = `The slope of ${trait.label} is not a finite number: the values separate threatened from not-threatened species.`;
      } catch (error) {
        todayNote = `No odds ratio of ${trait.label}: ${error instanceof Error ? error.message : String(error)}.`;
      }
    }
    return {
      key: trait.key,
      label: trait.label,
      kind: "numeric" as const,
      contrasts: [
        {
          contrast: step,
          state: null,
          reference: null,
          today,
          todayNote,
          pastCrude: pastContrast ? { estimate: pastContrast.crude.estimate, ci: pastContrast.crude.ci, method: pastContrast.crude.method } : null,
          pastModelAdjusted: pastContrast?.modelAdjusted ?? null,
        },
      ],
    };
  });
}
