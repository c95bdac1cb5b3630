// A run's analyses from what it read: the per-boundary selectivity inputs (run in the "selectivity"
// worker task by run jobs), the results a run stores, and computeRunNow, which does all of it on
// this thread for the demo seed.
import type { Database } from "../db";
import { APP_VERSION } from "../config";
import { activity, runs } from "../../db/schema/index";
import { analyzeSelectivity } from "../../shared/selectivity/index";
import { samplingCovariateCheck, SAMPLING_CAUTION } from "../../shared/sampling/index";
import type { SelectivityInput, SelectivityResult } from "../../shared/selectivity/types";
import { DEFAULT_MIN_INFORMATIVE_CLADES, type RunParams, type RunResults } from "../../shared/schemas/runs";
import { crisisCheck, crisisComparison, robustnessItems, robustnessPanels, robustnessResult } from "./runChecks";
import { readStudyData, type BoundaryData, type RunDataSources, type StudyData } from "./runData";

/** Shown wherever results are read or exported (docs/architecture.md, "Where a rule lives"). */
export const SELECTIVITY_CAUTION =
  "Selectivity results are statistical associations across a boundary, not proof of a kill mechanism; a shared cause can produce them.";

/** The "selectivity" worker task's input and output (server/jobs/tasks.ts). */
export interface SelectivityTaskInput {
  analyses: Array<{ label: string; input: SelectivityInput }>;
}
export type SelectivityTaskOutput = SelectivityResult[];

/** The traits as the analyses take them (without the codebook id). */
const analysisTraits = (data: StudyData) => data.specs.map(({ traitId: _traitId, ...spec }) => spec);

/** One boundary's analysis as the "selectivity" worker task takes it. */
export function analysisInput(data: StudyData, b: BoundaryData, params: RunParams): SelectivityInput {
  return {
    taxa: b.taxa,
    traits: analysisTraits(data),
    options: {
      correction: params.correction,
      forceFirth: params.forceFirth,
      level: params.level,
      confoundingThreshold: params.confoundingThreshold,
      minInformativeClades: params.minInformativeClades ?? DEFAULT_MIN_INFORMATIVE_CLADES,
    },
  };
}

/** What a run stores once its analyses are computed (one result per boundary, in order). */
export function runResults(read: StudyData, computed: SelectivityTaskOutput): RunResults {
  return {
    boundaries: read.boundaries.map((b, i) => ({
      ...b.design,
      completeCases: computed[i].design.completeCases,
      result: computed[i],
      ...(read.sampling ? { sampling: samplingCovariateCheck({ taxa: b.taxa, traits: analysisTraits(read), counts: read.sampling.counts, covariates: read.sampling.covariates, options: read.sampling.options }) } : {}),
    })),
    traits: read.specs.map((s) => ({ traitId: s.traitId, key: s.key, label: s.label })),
    cautions: [SELECTIVITY_CAUTION, ...(read.sampling ? [SAMPLING_CAUTION] : []), ...read.boundaries.flatMap((b) => b.warnings)],
  };
}

/** The columns of a run whose analyses succeeded: done, with the data hash, the rows read and the results. */
export function succeededColumns(read: StudyData, results: RunResults) {
  return {
    status: "succeeded" as const,
    progress: 1,
    progressNote: "Done",
    dataHash: read.dataHash,
    rowCount: read.rowCount,
    results: results as unknown as Record<string, unknown>,
  };
}

/**
 * Computes a run in this process, without the job queue, and stores it as succeeded with its
 * "started" and "finished" activity. It reads, hashes, analyses and stores exactly as a run job does;
 * it is for the demo seed, which runs before any app process works jobs. `at` dates the run
 * (default: now); the analysis runs on this thread, so keep it to small studies.
 */
export async function computeRunNow(
  db: Database,
  sources: RunDataSources,
  studyId: string,
  user: { id: string },
  params: RunParams,
  options: { at?: Date } = {},
): Promise<{ id: string; dataHash: string; results: RunResults }> {
  const read = await readStudyData(db, sources, studyId, params);
  const computed: SelectivityTaskOutput = read.boundaries.map((b) => analyzeSelectivity(analysisInput(read, b, params)));
  const results = runResults(read, computed);
  results.crisisVersusBackground = await crisisCheck(read, params, crisisComparison);
  const robustness = await robustnessItems(db, sources, studyId, read, params, computed);
  results.robustness = robustnessResult(robustness, robustnessPanels(robustness), params);
  const at = options.at ?? new Date();
  return db.transaction(async (tx) => {
    const [row] = await tx
      .insert(runs)
      .values({
        studyId,
        name: params.name,
        params: params as unknown as Record<string, unknown>,
        ...succeededColumns(read, results),
        appVersion: APP_VERSION,
        createdBy: user.id,
        createdAt: at,
        startedAt: at,
        finishedAt: at,
        heartbeatAt: at,
      })
      .returning({ id: runs.id });
    await tx.insert(activity).values([
      { studyId, userId: user.id, kind: "run.started", summary: `Started the run "${params.name}"`, refType: "run", refId: row.id, createdAt: at },
      { studyId, userId: user.id, kind: "run.succeeded", summary: `The run "${params.name}" finished`, refType: "run", refId: row.id, createdAt: at },
    ]);
    return { id: row.id, dataHash: read.dataHash, results };
  });
}
