// Timings of the statistics engine on invented data (seeded, so every run fits the same numbers).
// `npx tsx bench/stats.ts` prints a table; bench/run.ts imports benchStats().

import { pathToFileURL } from "node:url";
import { normalQuantile } from "../shared/stats/distributions";
import { fisherExact, logisticRegression } from "../shared/stats/index";
import { createUniformSource } from "../shared/stats/random";

export interface BenchResult {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

/** Invented taxa: `predictors` standard-normal traits and an outcome drawn from a logistic model. */
function inventedTaxa(taxa: number, predictors: number, seed: number): { X: number[][]; y: number[] } {
  const random = createUniformSource(seed);
  const normal = (): number => normalQuantile(1e-9 + (1 - 2e-9) * random());
  const slopes = Array.from({ length: predictors }, (_, j) => ((j % 3) - 1) * 0.4);
  const X = Array.from({ length: taxa }, () => Array.from({ length: predictors }, normal));
  const y = X.map((row) => {
    const eta = -0.3 + row.reduce((sum, value, j) => sum + value * slopes[j], 0);
    return random() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  });
  return { X, y };
}

/**
 * Median wall time (ms) of `runs` calls after one warm-up call, the median process CPU time (which
 * other work on a busy machine inflates much less), and the warm-up's result.
 */
function medianTime<T>(runs: number, work: () => T): { ms: number; cpuMs: number; result: T } {
  const result = work();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    work();
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  const median = (values: number[]): number => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
  return { ms: median(wall), cpuMs: median(cpu), result };
}

export async function benchStats(): Promise<BenchResult[]> {
  const results: BenchResult[] = [];

  for (const taxa of [1_000, 10_000, 100_000]) {
    const { X, y } = inventedTaxa(taxa, 10, taxa);
    const runs = taxa >= 100_000 ? 3 : 5;
    const { ms, cpuMs, result } = medianTime(runs, () => logisticRegression(X, y));
    results.push({
      name: `logistic regression, ${taxa.toLocaleString("en")} taxa x 10 predictors (with SEs)`,
      value: round(ms),
      unit: "ms",
      note: `median of ${runs} (cpu ${round(cpuMs)} ms); ${result.iterations} IRLS iterations`,
    });
  }

  {
    const { X, y } = inventedTaxa(1_000, 10, 7);
    const { ms, cpuMs, result } = medianTime(3, () => logisticRegression(X, y, { firth: true }));
    results.push({
      name: "Firth logistic regression, 1,000 taxa x 10 predictors",
      value: round(ms),
      unit: "ms",
      note: `median of 3 (cpu ${round(cpuMs)} ms); ${result.ciMethod} intervals, ${result.pValueMethod} p-values`,
    });
  }

  {
    const table = [
      [252_000, 248_000],
      [248_000, 252_000],
    ];
    const { ms, cpuMs, result } = medianTime(5, () => fisherExact(table));
    results.push({
      name: "Fisher exact test, 2x2 with 1,000,000 taxa",
      value: round(ms),
      unit: "ms",
      note: `median of 5 (cpu ${round(cpuMs)} ms); p = ${result.pValue.toExponential(3)}, conditional MLE and exact 95% interval included`,
    });
  }

  {
    const sixStates = [
      [400, 420],
      [380, 450],
      [410, 400],
      [390, 430],
      [420, 400],
      [405, 395],
    ];
    const { ms, cpuMs, result } = medianTime(3, () => fisherExact(sixStates));
    const detail =
      result.method === "monte-carlo-rxc"
        ? `${result.monteCarlo!.replicates.toLocaleString("en")} replicates, seed ${result.monteCarlo!.seed}, SE ${result.monteCarlo!.standardError.toFixed(4)}`
        : "full enumeration";
    results.push({
      name: "Fisher-Freeman-Halton test, 6x2 table of 5,000 taxa",
      value: round(ms),
      unit: "ms",
      note: `median of 3 (cpu ${round(cpuMs)} ms); method ${result.method} (${detail}); p = ${result.pValue.toFixed(4)}`,
    });
  }

  {
    // Invented counts: 14 unevenly filled states of 353 taxa (the shape of a real lithology trait).
    const fourteenStates = [
      [70, 130], [30, 30], [18, 12], [12, 8], [2, 8], [6, 2], [1, 6],
      [4, 1], [3, 1], [0, 3], [2, 0], [1, 1], [1, 0], [0, 1],
    ];
    const { ms, cpuMs, result } = medianTime(3, () => fisherExact(fourteenStates));
    results.push({
      name: "Fisher-Freeman-Halton test, 14x2 table of 353 taxa",
      value: round(ms),
      unit: "ms",
      note: `median of 3 (cpu ${round(cpuMs)} ms); method ${result.method}; p = ${result.pValue.toPrecision(4)} (R's fisher.test: 0.0006907)`,
    });
  }

  return results;
}

function round(ms: number): number {
  return Math.round(ms * 10) / 10;
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const rows = await benchStats();
  const nameWidth = Math.max(...rows.map((r) => r.name.length));
  for (const row of rows) {
    console.log(`${row.name.padEnd(nameWidth)}  ${String(row.value).padStart(9)} ${row.unit}  ${row.note ?? ""}`);
  }
}
