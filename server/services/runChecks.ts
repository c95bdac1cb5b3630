// The checks a run makes of its own findings, computed after its per-boundary analyses: crisis
// against background (shared/selectivity/crisisComparison). Pure inputs are built here from what
// the run read; the computation itself runs in a worker thread for run jobs.
import { crisisComparison, type CrisisComparisonInput, type CrisisComparisonResult } from "../../shared/selectivity/index";
import type { RunCrisis } from "../../shared/schemas/runChecks";
import type { RunParams } from "../../shared/schemas/runs";
import type { StudyData } from "./runs";

/** The worker task's input: null when the run asks for no crisis test (the reason says why). */
export function crisisInput(read: StudyData, params: RunParams): { input: CrisisComparisonInput } | { reason: string } {
  if (params.crisisBoundary === undefined) {
    return { reason: read.boundaries.length < 2 ? "The run has one boundary, so there is no background to compare the crisis with." : "The run names no crisis among its boundaries." };
  }
  if (read.boundaries.length < 2) return { reason: "The run has one boundary, so there is no background to compare the crisis with." };
  return {
    input: {
      boundaries: read.boundaries.map((b) => ({ label: b.design.label, taxa: b.taxa })),
      crisis: params.crisisBoundary,
      traits: read.specs.map(({ traitId: _traitId, ...spec }) => spec),
      options: { correction: params.correction, level: params.level },
    },
  };
}

/**
 * Crisis against background for a run, through `compute` (a worker round trip in run jobs, the
 * function itself in computeRunNow). A failure of the computation is stored as the reason, not
 * as a failed run: the per-boundary results stand without it.
 */
export async function crisisCheck(
  read: StudyData,
  params: RunParams,
  compute: (input: CrisisComparisonInput) => CrisisComparisonResult | Promise<CrisisComparisonResult>,
): Promise<RunCrisis> {
  const prepared = crisisInput(read, params);
  if ("reason" in prepared) return { status: "not-computed", reason: prepared.reason };
  try {
    return { status: "computed", result: await compute(prepared.input) };
  } catch (err) {
    return { status: "not-computed", reason: `Crisis against background could not be computed: ${err instanceof Error ? err.message : String(err)}` };
  }
}

export { crisisComparison };
