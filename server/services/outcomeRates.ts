// Rates through time: boundary-crosser counts and per-capita rates (Foote 2000) per stage, over the
// stages the study's ranges reach. Ranges only: overrides do not change rates.
import { and, eq, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { taxa } from "../../db/schema/index";
import { rangeProblem, ratesThroughTime } from "../../shared/outcomes/index";
import { TIMESCALE_VERSION, timescaleStages } from "../../shared/timescale/index";
import { MASS_EXTINCTION_TEACHING_THRESHOLD, type RatesResult } from "../../shared/schemas/outcomes";

const STAGES_OLDEST_FIRST = [...timescaleStages].reverse();

const RATES_METHOD =
  "Boundary-crosser counts and per-capita rates (Foote 2000, Paleobiology 26(4) suppl.): q = -ln(nbt / (nbt + nbL)) per stage, divided by the stage's duration for a rate per Myr. Ranges are range-through; overrides do not change rates.";
const THRESHOLD_NOTE =
  "A loss of more than about 30% of taxa is a common teaching threshold for calling an event a mass extinction (common practice, no source). Such thresholds are conventions, not natural breaks: read the bars against the whole record.";

/** Per-stage boundary-crosser counts and rates over the stages the study's ranges reach, oldest first. */
export async function studyRates(db: Database, studyId: string): Promise<RatesResult> {
  const rows = await db
    .select({ fad: taxa.fadMa, lad: taxa.ladMa })
    .from(taxa)
    .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
  const usable: Array<{ fad: number; lad: number }> = [];
  const leftOut = { missingRange: 0, invalidRange: 0 };
  for (const r of rows) {
    const problem = rangeProblem(r);
    if (!problem) usable.push(r as { fad: number; lad: number });
    else if (problem.kind === "missing") leftOut.missingRange++;
    else leftOut.invalidRange++;
  }
  const threshold = { proportion: MASS_EXTINCTION_TEACHING_THRESHOLD, note: THRESHOLD_NOTE };
  const result = { timescaleVersion: TIMESCALE_VERSION, method: RATES_METHOD, taxaUsed: usable.length, leftOut, threshold };
  if (!usable.length) return { ...result, stages: [] };

  let oldest = -Infinity;
  let youngest = Infinity;
  for (const r of usable) {
    if (r.fad > oldest) oldest = r.fad;
    if (r.lad < youngest) youngest = r.lad;
  }
  const candidates = STAGES_OLDEST_FIRST.filter((s) => s.base >= youngest && s.top <= oldest);
  const rates = ratesThroughTime(usable, candidates.map((s) => ({ name: s.name, base: s.base, top: s.top })));
  // Keep the run from the first to the last stage holding a taxon; empty stages between them stay.
  const first = rates.findIndex((r) => r.taxonCount > 0);
  const last = rates.findLastIndex((r) => r.taxonCount > 0);
  const spanned = first < 0 ? [] : rates.slice(first, last + 1);
  return {
    ...result,
    stages: spanned.map((r, k) => ({
      name: r.name,
      label: candidates[first + k].label,
      base: r.base,
      top: r.top,
      duration: candidates[first + k].duration,
      nbt: r.nbt,
      nbL: r.nbL,
      nFt: r.nFt,
      nFL: r.nFL,
      taxonCount: r.taxonCount,
      q: r.q,
      qPerMyr: r.qPerMyr,
      p: r.p,
      pPerMyr: r.pPerMyr,
      proportionalExtinction: r.proportionalExtinction,
      proportionalOrigination: r.proportionalOrigination,
    })),
  };
}
