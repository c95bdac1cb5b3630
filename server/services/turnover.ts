// Turnover through time: origination beside extinction per stage, standing diversity (overall or split by a
// trait's states or higher taxon), how far the crisis stage stands out from the others, and the boundary
// scorecard. Reads ranges, trait values and final outcomes; the computations are the pure functions of
// shared/outcomes.
import { and, eq, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { taxa } from "../../db/schema/index";
import {
  boundaryScorecard,
  crisisTurnover,
  DEPARTURE_Z,
  diversityThroughTime,
  rangeProblem,
  ratesThroughTime,
  type GroupLoss,
} from "../../shared/outcomes/index";
import { TIMESCALE_VERSION, timescaleStages } from "../../shared/timescale/index";
import { DEFAULT_BREADTH_SHARE, type TurnoverParams, type TurnoverResult } from "../../shared/schemas/turnover";
import { MASS_EXTINCTION_TEACHING_THRESHOLD } from "../../shared/schemas/outcomes";
import type { Trait } from "../../shared/schemas/traits";
import { loadCodebook } from "./codebookStore";
import type { OutcomeService } from "./outcomes";
import { invalidInput } from "../domain/errors";

const STAGES_OLDEST_FIRST = [...timescaleStages].reverse();
/** Ages closer than this (Myr) are the same age. */
const SAME_AGE = 1e-9;

const METHOD =
  "Per-capita extinction (q) and origination (p) per stage from boundary crossers (Foote 2000, Paleobiology 26(4) suppl.), ranges range-through, overrides not applied. " +
  "The crisis stage (the stage the boundary closes) is compared with the other stages by a robust z, (rate - median) / (1.4826 * MAD) of the others " +
  "(Rousseeuw & Croux 1993; Iglewicz & Hoaglin 1993), and said to depart from its background at |z| >= 3.5.";
const CONTRAST_METHOD =
  "Robust z of the crisis stage's per-stage rate against the other stages of the span: (rate - median) / (1.4826 * MAD), with MAD the median absolute deviation of the others (Rousseeuw & Croux 1993). Needs at least 5 other stages with a rate; departs at |z| >= 3.5 (Iglewicz & Hoaglin 1993).";
const DIVERSITY_CAUTIONS = [
  "Range-through counts fill each taxon's range from first to last appearance, so stages in the middle of the span look richer than the finds alone would show.",
  "The oldest and youngest stages of the span are truncated: taxa that lived before or after the study's span are not in the data, so their counts and rates are low or undefined.",
  "Counts follow the ranges as coded; outcome overrides do not change them.",
];

const REALM_PATTERN = /environment|realm|habitat|marine/i;
const REGION_PATTERN = /region|province|basin|locality|geograph|area|range/i;

interface TaxonRow {
  id: string;
  higherTaxon: string;
  fadMa: number | null;
  ladMa: number | null;
  traitValues: Record<string, string | number>;
}

/** Victims and taxa at risk of each group (one key per taxon; null keys are left out). */
function lossesBy(rows: TaxonRow[], outcomeOf: Map<string, string>, keyOf: (r: TaxonRow) => string | null, labelOf: (key: string) => string): GroupLoss[] {
  const byKey = new Map<string, GroupLoss>();
  for (const r of rows) {
    const outcome = outcomeOf.get(r.id);
    if (outcome !== "victim" && outcome !== "survivor") continue;
    const key = keyOf(r);
    if (key === null) continue;
    const group = byKey.get(key) ?? { name: labelOf(key), victims: 0, atRisk: 0 };
    group.atRisk++;
    if (outcome === "victim") group.victims++;
    byKey.set(key, group);
  }
  return [...byKey.values()];
}

const hasStates = (t: Trait) => t.kind !== "numeric" && !t.retired;

function stateKey(trait: Trait) {
  const codes = new Set(trait.states.map((s) => s.code));
  return (r: TaxonRow) => {
    const value = r.traitValues[trait.id];
    return typeof value === "string" && codes.has(value) ? value : null;
  };
}

function stateLabel(trait: Trait) {
  const labels = new Map(trait.states.map((s) => [s.code, s.label]));
  return (code: string) => labels.get(code) ?? code;
}

export function createTurnoverService(db: Database, outcomes: OutcomeService) {
  return {
    async turnover(studyId: string, query: TurnoverParams): Promise<TurnoverResult> {
      // The outcome service resolves the boundary and its default window (and refuses a bad one) as the outcome tiles do.
      let classified: Awaited<ReturnType<OutcomeService["finalOutcomes"]>>["taxa"] = [];
      const summary = await outcomes.outcomes(
        studyId,
        { boundary: query.boundary, boundaryUnit: query.boundaryUnit, window: query.window, page: 1, pageSize: 1 },
        (all) => (classified = all),
      );
      const { boundary, window } = summary;
      const outcomeOf = new Map(classified.map((t) => [t.taxonId, t.outcome as string]));

      const codebook = await loadCodebook(db, studyId);
      const stateTraits = codebook.filter(hasStates);
      let split: TurnoverResult["diversity"]["splitBy"] = { kind: "none", key: null, label: "All taxa" };
      let splitTrait: Trait | null = null;
      if (query.splitBy === "higherTaxon") split = { kind: "higherTaxon", key: "higherTaxon", label: "Higher taxon" };
      else if (query.splitBy !== undefined) {
        splitTrait = stateTraits.find((t) => t.key === query.splitBy) ?? null;
        if (!splitTrait) {
          throw invalidInput(`splitBy "${query.splitBy}" is neither "higherTaxon" nor the key of a trait with states in this study's codebook.`, {
            splitBy: 'Give "higherTaxon" or the key of a trait with states',
          });
        }
        split = { kind: "trait", key: splitTrait.key, label: splitTrait.label };
      }

      const rows: TaxonRow[] = await db
        .select({ id: taxa.id, higherTaxon: taxa.higherTaxon, fadMa: taxa.fadMa, ladMa: taxa.ladMa, traitValues: taxa.traitValues })
        .from(taxa)
        .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
      const usable: TaxonRow[] = [];
      const leftOut = { missingRange: 0, invalidRange: 0 };
      for (const r of rows) {
        const problem = rangeProblem({ fad: r.fadMa, lad: r.ladMa });
        if (!problem) usable.push(r);
        else if (problem.kind === "missing") leftOut.missingRange++;
        else leftOut.invalidRange++;
      }

      // Stages from the oldest to the youngest the usable ranges reach (as the rates route).
      let oldest = -Infinity;
      let youngest = Infinity;
      for (const r of usable) {
        if (r.fadMa! > oldest) oldest = r.fadMa!;
        if (r.ladMa! < youngest) youngest = r.ladMa!;
      }
      const candidates = usable.length ? STAGES_OLDEST_FIRST.filter((s) => s.base >= youngest && s.top <= oldest) : [];
      const intervals = candidates.map((s) => ({ name: s.name, base: s.base, top: s.top }));
      const splitKey = split.kind === "higherTaxon" ? (r: TaxonRow) => r.higherTaxon || null : splitTrait ? stateKey(splitTrait) : null;
      const ranges = usable.map((r) => ({ fad: r.fadMa!, lad: r.ladMa!, ...(splitKey ? { group: splitKey(r) } : {}) }));
      const rates = ratesThroughTime(ranges, intervals);
      const diversity = diversityThroughTime(ranges, intervals);
      const first = rates.findIndex((r) => r.taxonCount > 0);
      const last = rates.findLastIndex((r) => r.taxonCount > 0);
      const span = first < 0 ? [] : rates.map((_, k) => k).slice(first, last + 1);

      const crisisIndex = span.findIndex((k) => candidates[k].top - SAME_AGE <= boundary && boundary < candidates[k].base - SAME_AGE);
      const stages: TurnoverResult["stages"] = span.map((k, position) => {
        const r = rates[k];
        const d = diversity.overall[k];
        return {
          name: r.name,
          label: candidates[k].label,
          base: r.base,
          top: r.top,
          duration: candidates[k].duration,
          nbt: r.nbt,
          nbL: r.nbL,
          nFt: r.nFt,
          nFL: r.nFL,
          q: r.q,
          p: r.p,
          qPerMyr: r.qPerMyr,
          pPerMyr: r.pPerMyr,
          rangeThrough: d.rangeThrough,
          crossingBase: d.crossingBase,
          crossingTop: d.crossingTop,
          firstSeen: d.firstSeen,
          lastSeen: d.lastSeen,
          singleStage: d.singleStage,
          crisis: position === crisisIndex,
          edge: position === 0 || position === span.length - 1,
        };
      });

      const turnover = crisisIndex >= 0 ? crisisTurnover(stages, crisisIndex) : null;
      const contrast = turnover ? { ...turnover, departureZ: DEPARTURE_Z, method: CONTRAST_METHOD } : null;
      const crisis = crisisIndex >= 0 ? stages[crisisIndex] : null;

      const groupLabel = splitTrait ? stateLabel(splitTrait) : (key: string) => key;
      const groups = diversity.groups
        .map((g) => ({
          key: g.group,
          label: g.group === null ? (split.kind === "higherTaxon" ? "No higher taxon" : "Not coded") : groupLabel(g.group),
          taxa: g.taxa,
          stages: span.map((k) => ({ name: g.stages[k].name, rangeThrough: g.stages[k].rangeThrough, crossingBase: g.stages[k].crossingBase, crossingTop: g.stages[k].crossingTop })),
        }))
        .filter((g) => g.taxa > 0)
        // Trait states in codebook order, higher taxa by name; "not coded" last.
        .sort((a, b) => {
          if (a.key === null || b.key === null) return a.key === null ? 1 : -1;
          if (splitTrait) return splitTrait.states.findIndex((s) => s.code === a.key) - splitTrait.states.findIndex((s) => s.code === b.key);
          return a.key < b.key ? -1 : a.key > b.key ? 1 : 0;
        });

      // Scorecard
      const realmTrait = stateTraits.find((t) => REALM_PATTERN.test(t.key) || REALM_PATTERN.test(t.label)) ?? null;
      const regionTrait = stateTraits.find((t) => t !== realmTrait && REGION_PATTERN.test(t.key + " " + t.label)) ?? null;
      const rangeSizeTrait = codebook.find((t) => t.kind === "numeric" && !t.retired && REGION_PATTERN.test(t.key + " " + t.label)) ?? null;
      const traitLosses = (t: Trait) => lossesBy(usable, outcomeOf, stateKey(t), stateLabel(t));
      let geography: Parameters<typeof boundaryScorecard>[0]["geography"];
      if (regionTrait) geography = { key: regionTrait.key, label: regionTrait.label, groups: traitLosses(regionTrait) };
      else if (rangeSizeTrait)
        geography = {
          notAssessable: `the study codes ${rangeSizeTrait.label} as a number (how widespread a taxon was), not which regions it lived in, so losses cannot be placed across regions. Range size itself is read in the selectivity tests.`,
        };
      else geography = { notAssessable: "the codebook has no trait naming the regions the taxa lived in." };

      const extinction = turnover?.extinction ?? null;
      const standingOutReason =
        crisisIndex < 0
          ? "the study's taxa do not reach the stage the boundary closes"
          : extinction?.reason
            ? `the crisis stage's extinction rate cannot be compared with its background: ${extinction.reason}`
            : null;
      const scorecard = boundaryScorecard({
        victims: summary.proportionalExtinction.victims,
        atRisk: summary.proportionalExtinction.atRisk,
        windowMyr: window,
        higherTaxa: lossesBy(usable, outcomeOf, (r) => r.higherTaxon || null, (key) => key),
        traits: stateTraits.filter((t) => t !== realmTrait && t !== regionTrait).map((t) => ({ key: t.key, label: t.label, groups: traitLosses(t) })),
        realm: realmTrait ? { key: realmTrait.key, label: realmTrait.label, groups: traitLosses(realmTrait) } : null,
        geography,
        standingOut: { z: extinction?.z ?? null, n: extinction?.n ?? 0, reason: standingOutReason },
        threshold: MASS_EXTINCTION_TEACHING_THRESHOLD,
        breadthShare: query.breadthShare ?? DEFAULT_BREADTH_SHARE,
        level: summary.proportionalExtinction.level,
      });

      return {
        timescaleVersion: TIMESCALE_VERSION,
        method: METHOD,
        boundary,
        window,
        taxaUsed: usable.length,
        leftOut,
        crisisStage: crisis ? { name: crisis.name, label: crisis.label, base: crisis.base, top: crisis.top } : null,
        stages,
        contrast,
        diversity: {
          splitBy: split,
          groups: split.kind === "none" ? [] : groups,
          splitOptions: [{ value: "higherTaxon", label: "Higher taxon" }, ...stateTraits.map((t) => ({ value: t.key, label: t.label }))],
          cautions: DIVERSITY_CAUTIONS,
        },
        scorecard,
      };
    },
  };
}
export type TurnoverService = ReturnType<typeof createTurnoverService>;
