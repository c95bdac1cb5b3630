// The benchmark suites `npm run bench` runs, in order. Each returns figures to print.
export interface BenchFigure {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

export const BENCHMARKS: Record<string, () => Promise<BenchFigure[]>> = {
  stats: async () => (await import("./stats")).benchStats(),
  selectivity: async () => (await import("./selectivity")).benchSelectivity(),
  robustness: async () => (await import("./robustness")).benchRobustness(),
  markdown: async () => (await import("./markdown")).benchMarkdown(),
  traitTables: async () => (await import("./traitTables")).benchTraitTables(),
  occurrences: async () => (await import("./occurrences")).benchOccurrences(),
  load: async () => (await import("./load")).benchLoad(),
  firstVisit: async () => (await import("./firstVisit")).benchFirstVisit(),
};
