// The checks a run makes of its own findings, computed after its per-boundary analyses: crisis
// against background (shared/selectivity/crisisComparison) and the robustness panel
// (shared/selectivity/robustnessPanel). Pure inputs are built here from what the run read and,
// for other windows, from the outcomes service; the computations run in a worker thread for run jobs.
import { and, eq, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { taxa } from "../../db/schema/index";
import {
  crisisComparison,
  robustnessPanel,
  type CrisisComparisonInput,
  type CrisisComparisonResult,
  type RobustnessInput,
  type RobustnessPanel,
  type SelectivityResult,
  type SelectivityTaxon,
} from "../../shared/selectivity/index";
import { DEFAULT_WINDOW_FACTORS, type RunCrisis, type RunRobustness } from "../../shared/schemas/runChecks";
import type { RunParams } from "../../shared/schemas/runs";
import { timescaleStages } from "../../shared/timescale/index";
import type { RunDataSources, StudyData } from "./runData";

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

/** One boundary's robustness panel as the worker task takes it, or why it cannot be computed. */
export type RobustnessTaskItem = { index: number; label: string; input: RobustnessInput | null; reason: string | null };
export type RobustnessTaskOutput = Array<{ panel: RobustnessPanel | null; reason: string | null }>;

/** Computes the panels of one run, boundary by boundary, reporting progress (the "robustness" worker task). */
export function robustnessPanels(items: RobustnessTaskItem[], progress: (fraction: number, note?: string) => void = () => undefined): RobustnessTaskOutput {
  return items.map((item, i) => {
    progress(i / items.length, `Robustness panel across ${item.label} (${i + 1} of ${items.length})`);
    if (!item.input) return { panel: null, reason: item.reason };
    try {
      return { panel: robustnessPanel(item.input), reason: null };
    } catch (err) {
      return { panel: null, reason: `The robustness panel could not be computed: ${err instanceof Error ? err.message : String(err)}` };
    }
  });
}

/**
 * What the robustness panel of each boundary needs: the run's own rows, the same boundary under
 * each alternative window (classified by the outcomes service, overrides applied, as a run reads
 * them), every taxon's range, the stages, and the references the run's analysis chose.
 */
export async function robustnessItems(
  db: Database,
  sources: RunDataSources,
  studyId: string,
  read: StudyData,
  params: RunParams,
  computed: SelectivityResult[],
  onBoundary?: (index: number, label: string) => Promise<void> | void,
): Promise<RobustnessTaskItem[]> {
  const factors = params.robustness?.windowFactors ?? DEFAULT_WINDOW_FACTORS;
  const stored = await db
    .select({ id: taxa.id, values: taxa.traitValues, fad: taxa.fadMa, lad: taxa.ladMa })
    .from(taxa)
    .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
  const valuesOf = new Map(stored.map((r) => [r.id, r.values]));
  const ranges: Record<string, { fad: number; lad: number }> = {};
  for (const r of stored) if (r.fad !== null && r.lad !== null && r.fad >= r.lad) ranges[r.id] = { fad: r.fad, lad: r.lad };
  const stages = timescaleStages.map((s) => ({ label: s.label, base: s.base, top: s.top }));
  const items: RobustnessTaskItem[] = [];
  for (const [i, b] of read.boundaries.entries()) {
    await onBoundary?.(i, b.design.label);
    const windows: RobustnessInput["windows"] = [];
    for (const factor of factors) {
      const windowMyr = b.design.windowMyr * factor;
      const { taxa: classified } = await sources.outcomes.finalOutcomes(studyId, { boundary: b.design.boundaryMa, window: windowMyr });
      const list: SelectivityTaxon[] = classified
        .filter((t) => t.outcome !== "excluded")
        .map((t) => {
          const values = valuesOf.get(t.taxonId) ?? {};
          return {
            id: t.taxonId,
            name: t.name,
            clade: t.higherTaxon,
            outcome: t.outcome === "victim" ? (1 as const) : (0 as const),
            values: Object.fromEntries(read.specs.map((s) => [s.key, values[s.traitId] ?? null])),
          };
        });
      windows.push({ factor, windowMyr, taxa: list });
    }
    const references = Object.fromEntries(computed[i].traits.map((t) => [t.key, t.reference]));
    items.push({
      index: i,
      label: b.design.label,
      input: {
        taxa: b.taxa,
        windows,
        ranges,
        boundaryMa: b.design.boundaryMa,
        windowMyr: b.design.windowMyr,
        truncationMyr: params.robustness?.truncationMyr ?? b.design.windowMyr / 4,
        stages,
        traits: read.specs.map(({ traitId: _traitId, ...spec }) => spec),
        references,
        level: params.level,
      },
      reason: null,
    });
  }
  return items;
}

/** The stored robustness result of a run from its computed panels. */
export function robustnessResult(items: RobustnessTaskItem[], output: RobustnessTaskOutput, params: RunParams): RunRobustness {
  return {
    status: "computed",
    windowFactors: params.robustness?.windowFactors ?? DEFAULT_WINDOW_FACTORS,
    boundaries: items.map((item, k) => ({ index: item.index, label: item.label, panel: output[k].panel, reason: output[k].reason })),
  };
}
