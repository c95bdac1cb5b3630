// Computations that run off the request thread. Each is a pure function of plain data (the
// statistics never touch the database); `progress` reports a fraction in [0, 1] and a note.
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
};
