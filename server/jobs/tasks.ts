// Computations that run off the request thread. Each is a pure function of plain data (the
// statistics never touch the database); `progress` reports a fraction in [0, 1] and a note.
import { analyzeSelectivity, crisisComparison, type CrisisComparisonInput } from "../../shared/selectivity/index";
import type { SelectivityTaskInput, SelectivityTaskOutput } from "../services/runAnalysis";
import { robustnessPanels, type RobustnessTaskItem } from "../services/runChecks";

export type ProgressReporter = (fraction: number, note?: string) => void;
export type WorkerTask = (input: any, progress: ProgressReporter) => unknown | Promise<unknown>;

export const WORKER_TASKS: Record<string, WorkerTask> = {
  /** Checks the worker round trip (used by the job tests): sums numbers, reporting progress. */
  sum: (input: { values: number[] }, progress) => {
    let total = 0;
    input.values.forEach((v, i) => {
      total += v;
      progress((i + 1) / input.values.length, `added ${i + 1} of ${input.values.length}`);
    });
    return total;
  },

  /** A run's selectivity analyses, one per boundary, reporting progress as each starts and ends. */
  selectivity: (input: SelectivityTaskInput, progress): SelectivityTaskOutput => {
    const n = input.analyses.length;
    return input.analyses.map(({ label, input: analysis }, i) => {
      progress(i / n, `Testing selectivity across ${label} (${i + 1} of ${n})`);
      const result = analyzeSelectivity(analysis);
      progress((i + 1) / n, `Tested selectivity across ${label} (${i + 1} of ${n})`);
      return result;
    });
  },

  /** Crisis against background over a run's boundaries (server/services/runChecks.ts). */
  crisisComparison: (input: CrisisComparisonInput) => crisisComparison(input),

  /** A run's robustness panels, one per boundary (server/services/runChecks.ts). */
  robustness: (input: { items: RobustnessTaskItem[] }, progress) => robustnessPanels(input.items, progress),
};
