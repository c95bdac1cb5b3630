// Survivors, victims and taxa not at risk across a boundary: reads the study's ranges, classifies
// them with the pure functions of shared/outcomes, applies the active overrides and says which
// taxa need care (the warnings), with one page of each list.
import { and, asc, eq, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { taxa } from "../../db/schema/index";
import { classifyAcrossBoundary, outcomeWarnings, rangeProblem, type BoundaryOutcome, type WarningGroup } from "../../shared/outcomes/index";
import { wilsonInterval } from "../../shared/stats/index";
import { defaultWindowBelow, findUnit, RANK_ORDER, TIMESCALE_VERSION, timescaleStages, timescaleUnits } from "../../shared/timescale/index";
import { BOUNDARY_OUTCOMES, type OutcomeTaxon, type OutcomesResult } from "../../shared/schemas/outcomes";
import { invalidInput } from "../domain/errors";
import { sameBoundary, type OverrideStore } from "./outcomeOverrides";

/** Names listed beside each warning's count. */
const WARNING_SAMPLE_SIZE = 20;

const STAGE_INTERVALS = timescaleStages.map((s) => ({ name: s.name, base: s.base, top: s.top }));
const OLDEST_STAGE = timescaleStages[timescaleStages.length - 1];

const WARNING_NOTES = {
  singleInterval:
    "Survivors and victims whose whole known range lies within one stage. Their outcome may rest on a single sample, and such taxa are especially sensitive to how well that stage is preserved and how long it lasted (Foote 2000).",
  lastSeenBelowBoundary:
    "Victims last seen below the boundary, inside the window. Because the fossil record is incomplete, a last find falls before the true extinction (Signor & Lipps 1982): some of these taxa may have lived up to the boundary, which makes an abrupt loss look gradual; others may truly have died out earlier. A shorter window leaves them out.",
  missingRange:
    "First or last appearance missing: these taxa cannot be classified and count as not at risk until their range is entered or their outcome is set by hand.",
  invalidRange:
    "Range unusable (a negative age, or a first appearance younger than the last): these taxa count as not at risk until the range is corrected.",
} as const;

const WILSON_METHOD = "Wilson score interval (Wilson 1927) for victims / (victims + survivors)";

interface TaxonRange {
  id: string;
  name: string;
  higherTaxon: string;
  fadMa: number | null;
  ladMa: number | null;
}

/** A taxon's final outcome across a boundary (overrides applied), for analyses that read every taxon. */
export interface ClassifiedTaxon {
  taxonId: string;
  name: string;
  higherTaxon: string;
  outcome: BoundaryOutcome;
}

function warningOf(group: WarningGroup, rows: TaxonRange[], note: string) {
  return { count: group.count, sample: group.indices.slice(0, WARNING_SAMPLE_SIZE).map((i) => rows[i].name), note };
}

type OutcomesQuery = { boundary?: number; boundaryUnit?: string; window?: number; group?: BoundaryOutcome; page: number; pageSize: number };

export function createOutcomeClassifier(db: Database, overrides: Pick<OverrideStore, "activeAt">) {
  async function loadRanges(studyId: string): Promise<TaxonRange[]> {
    return db
      .select({ id: taxa.id, name: taxa.name, higherTaxon: taxa.higherTaxon, fadMa: taxa.fadMa, ladMa: taxa.ladMa })
      .from(taxa)
      .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)))
      .orderBy(asc(taxa.name));
  }

  /** Survivors, victims and taxa not at risk across a boundary, after overrides, with warnings and one page of each list. */
  async function outcomes(studyId: string, query: OutcomesQuery, everyTaxon?: (taxa: ClassifiedTaxon[]) => void): Promise<OutcomesResult> {
    let boundary: number;
    if (query.boundaryUnit !== undefined) {
      const unit = findUnit(query.boundaryUnit);
      if (!unit) throw invalidInput(`"${query.boundaryUnit}" is not a unit of the time scale.`, { boundaryUnit: "Not a unit of the time scale" });
      boundary = unit.base;
    } else if (query.boundary !== undefined) {
      boundary = query.boundary;
    } else {
      throw invalidInput("Choose a boundary: give boundary (an age in Ma) or boundaryUnit.", { boundary: "Required" });
    }

    let window = query.window;
    let windowDefaultFrom: OutcomesResult["windowDefaultFrom"] = null;
    if (window === undefined) {
      const fallback = defaultWindowBelow(boundary);
      if (!fallback) {
        throw invalidInput(
          `No stage of the time scale lies just below ${boundary} Ma (the oldest stage, the ${OLDEST_STAGE.label}, begins at ${OLDEST_STAGE.base} Ma), so there is no default window: give a window in Myr.`,
          { window: "Give a window in Myr: there is no stage below this boundary" },
        );
      }
      // Down to the base of the stage the boundary falls in: a custom age inside a stage does not reach past it.
      const { stage } = fallback;
      window = fallback.windowMyr;
      windowDefaultFrom = { name: stage.name, label: stage.label, base: stage.base, top: stage.top, duration: stage.duration, wholeStage: fallback.wholeStage };
    }

    const rows = await loadRanges(studyId);
    const overrideOf = await overrides.activeAt(studyId, boundary);

    // Ranges that cannot be used are not at risk (and are listed in the warnings); the rest are classified.
    const ranges = rows.map((r) => ({ fad: r.fadMa, lad: r.ladMa }));
    const problems = ranges.map((r) => rangeProblem(r));
    const usable = rows.flatMap((_, i) => (problems[i] ? [] : [i]));
    const computed: BoundaryOutcome[] = rows.map(() => "excluded");
    classifyAcrossBoundary(
      usable.map((i) => ranges[i] as { fad: number; lad: number }),
      boundary,
      window,
    ).forEach((outcome, k) => (computed[usable[k]] = outcome));
    const warnings = outcomeWarnings(ranges, boundary, window, STAGE_INTERVALS);

    const flagsOf = rows.map(() => [] as OutcomeTaxon["flags"]);
    for (const flag of ["singleInterval", "lastSeenBelowBoundary", "missingRange", "invalidRange"] as const) {
      for (const i of warnings[flag].indices) flagsOf[i].push(flag);
    }

    const emptyCounts = () => ({ survivor: 0, victim: 0, excluded: 0, total: rows.length });
    const counts = emptyCounts();
    const computedCounts = emptyCounts();
    const members: Record<BoundaryOutcome, number[]> = { survivor: [], victim: [], excluded: [] };
    const finalOutcome: BoundaryOutcome[] = computed.map((c, i) => {
      const final = (overrideOf.get(rows[i].id)?.outcome as BoundaryOutcome | undefined) ?? c;
      computedCounts[c]++;
      counts[final]++;
      members[final].push(i);
      return final;
    });
    everyTaxon?.(rows.map((r, i) => ({ taxonId: r.id, name: r.name, higherTaxon: r.higherTaxon, outcome: finalOutcome[i] })));

    const toItem = (i: number): OutcomeTaxon => {
      const o = overrideOf.get(rows[i].id);
      return {
        taxonId: rows[i].id,
        name: rows[i].name,
        higherTaxon: rows[i].higherTaxon,
        fad: rows[i].fadMa,
        lad: rows[i].ladMa,
        computedOutcome: computed[i],
        outcome: finalOutcome[i],
        override: o ? { id: o.id, outcome: o.outcome as BoundaryOutcome, boundaryMa: o.boundaryMa, reason: o.reason, source: o.source as "manual" | "import" } : null,
        rangeProblem: problems[i]?.message ?? null,
        flags: flagsOf[i],
      };
    };
    const lists: OutcomesResult["lists"] = {};
    for (const group of query.group ? [query.group] : BOUNDARY_OUTCOMES) {
      const start = (query.page - 1) * query.pageSize;
      lists[group] = {
        total: members[group].length,
        page: query.page,
        pageSize: query.pageSize,
        items: members[group].slice(start, start + query.pageSize).map(toItem),
      };
    }

    const atRisk = counts.victim + counts.survivor;
    const level = 0.95;
    return {
      boundary,
      boundaryUnits: timescaleUnits
        .filter((u) => sameBoundary(u.base, boundary))
        .sort((a, b) => RANK_ORDER.indexOf(a.rank) - RANK_ORDER.indexOf(b.rank))
        .map((u) => ({ name: u.name, label: u.label, rank: u.rank })),
      window,
      windowDefaultFrom,
      timescaleVersion: TIMESCALE_VERSION,
      counts,
      computedCounts,
      overridesApplied: rows.filter((r) => overrideOf.has(r.id)).length,
      proportionalExtinction: {
        victims: counts.victim,
        atRisk,
        value: atRisk > 0 ? counts.victim / atRisk : null,
        ci: atRisk > 0 ? wilsonInterval(counts.victim, atRisk, { level }) : null,
        level,
        method: WILSON_METHOD,
      },
      warnings: {
        singleInterval: warningOf(warnings.singleInterval, rows, WARNING_NOTES.singleInterval),
        lastSeenBelowBoundary: warningOf(warnings.lastSeenBelowBoundary, rows, WARNING_NOTES.lastSeenBelowBoundary),
        missingRange: warningOf(warnings.missingRange, rows, WARNING_NOTES.missingRange),
        invalidRange: warningOf(warnings.invalidRange, rows, WARNING_NOTES.invalidRange),
      },
      lists,
    };
  }

  return {
    outcomes,
    /** The summary of `outcomes` (one taxon per list) and every taxon's final outcome, sorted by name. */
    async finalOutcomes(studyId: string, query: { boundary: number; window?: number }): Promise<{ summary: OutcomesResult; taxa: ClassifiedTaxon[] }> {
      let taxa: ClassifiedTaxon[] = [];
      const summary = await outcomes(studyId, { ...query, page: 1, pageSize: 1 }, (all) => (taxa = all));
      return { summary, taxa };
    },
  };
}
