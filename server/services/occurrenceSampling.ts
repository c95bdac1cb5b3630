// Three-timer sampling per stage of the chart, from the study's finds (threeTimerRates), and the
// stages on both sides of a boundary with a warning where sampling is low.
import type { Database } from "../db";
import { threeTimerRates } from "../../shared/occurrences/index";
import type { ThreeTimer, ThreeTimerRowDto } from "../../shared/schemas/occurrences";
import { timescaleStages } from "../../shared/timescale/index";
import { loadStudyOccurrences } from "./occurrenceFinds";

const STAGES_OLDEST_FIRST = [...timescaleStages].sort((a, b) => b.base - a.base);

/** Below this sampling completeness the Boundary screen warns (common practice, no source). */
export const LOW_SAMPLING_COMPLETENESS = 0.5;

export const THREE_TIMER_METHOD =
  "Three-timer counts and rates (Alroy 2008, PNAS 105 suppl. 1): a taxon counts in a stage where it has a find dated wholly inside it; sampling completeness = three-timers / (three-timers + part-timers).";

/** Three-timer counts and rates per stage of the chart, and the stages on both sides of a boundary. */
export async function threeTimerSampling(db: Database, studyId: string, boundaryMa: number | undefined): Promise<ThreeTimer> {
  const occurrences = await loadStudyOccurrences(db, studyId);
  const stages = STAGES_OLDEST_FIRST;
  let maxAge = -Infinity;
  let minAge = Infinity;
  for (const o of occurrences) {
    if (o.maxMa > maxAge) maxAge = o.maxMa;
    if (o.minMa < minAge) minAge = o.minMa;
  }
  // The stages from the oldest find to the youngest, with one more stage on each side for the neighbours.
  const oldestIndex = stages.findIndex((s) => s.top < maxAge);
  const youngestIndex = stages.findLastIndex((s) => s.base > minAge);
  const bins =
    occurrences.length && oldestIndex >= 0 && youngestIndex >= oldestIndex ? stages.slice(Math.max(0, oldestIndex - 1), Math.min(stages.length, youngestIndex + 2)) : [];
  const rows = threeTimerRates(
    occurrences,
    bins.map((s) => ({ name: s.name, baseMa: s.base, topMa: s.top })),
  );
  const dto: ThreeTimerRowDto[] = rows.map((r, i) => ({ ...r, label: bins[i]!.label }));
  const straddling = occurrences.filter((o) => !bins.some((s) => s.top <= o.minMa + 1e-9 && o.maxMa <= s.base + 1e-9)).length;
  let boundary: ThreeTimer["boundary"] = null;
  if (boundaryMa !== undefined) {
    const below = dto.find((r) => r.topMa <= boundaryMa && boundaryMa < r.baseMa) ?? null;
    const above = dto.find((r) => r.topMa < boundaryMa && boundaryMa <= r.baseMa && r !== below) ?? dto.find((r) => r.baseMa === boundaryMa) ?? null;
    const warnings: string[] = [];
    for (const [side, row] of [
      ["below", below],
      ["above", above],
    ] as const) {
      if (!row) {
        warnings.push(`No occurrences reach the stage ${side} the boundary, so its sampling is unknown.`);
        continue;
      }
      if (row.samplingCompleteness === null) {
        warnings.push(`Sampling completeness of the ${row.label} cannot be computed: no taxon is found both before and after it.`);
      } else if (row.samplingCompleteness < LOW_SAMPLING_COMPLETENESS) {
        warnings.push(
          `Sampling completeness of the ${row.label} is low (${row.samplingCompleteness.toFixed(2)}, below ${LOW_SAMPLING_COMPLETENESS}): ` +
            "a poorly sampled stage inflates the apparent extinction in the stage before it, because taxa not found in it look extinct earlier.",
        );
      }
    }
    boundary = { boundaryMa, below, above, warnings };
  }
  return { method: THREE_TIMER_METHOD, stages: dto, occurrenceCount: occurrences.length, straddling, boundary };
}
