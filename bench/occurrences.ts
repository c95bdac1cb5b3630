// Timings of deriving ranges and three-timer rates from invented occurrences (seeded, so every run reads the
// same finds). `npx tsx bench/occurrences.ts` prints them; bench/run.ts runs benchOccurrences().
import { pathToFileURL } from "node:url";
import { mulberry32, type Random } from "../scripts/seed/demo/names";
import { deriveRanges, threeTimerRates, type Occurrence } from "../shared/occurrences/index";
import { timescaleStages } from "../shared/timescale/index";
import type { BenchFigure } from "./suites";

/**
 * `count` invented finds of `taxa` invented taxa in the Paleozoic and Mesozoic stages: each taxon lives over a
 * run of stages and its finds are dated to one stage (most) or to two neighbouring stages (some).
 */
export function inventedOccurrences(count: number, taxa: number, seed: number): Occurrence[] {
  const random: Random = mulberry32(seed);
  const stages = timescaleStages.filter((s) => s.base <= 485.4 && s.top >= 66).sort((a, b) => b.base - a.base);
  const lives = Array.from({ length: taxa }, () => {
    const first = Math.floor(random() * stages.length);
    const length = 1 + Math.floor(random() * 6);
    return { first, last: Math.min(stages.length - 1, first + length) };
  });
  const occurrences: Occurrence[] = new Array(count);
  for (let i = 0; i < count; i++) {
    const t = Math.floor(random() * taxa);
    const life = lives[t]!;
    const s = life.first + Math.floor(random() * (life.last - life.first + 1));
    const wide = random() < 0.2 && s + 1 < stages.length;
    occurrences[i] = {
      taxon: `Taxon${t}`,
      higherTaxon: `Clade${t % 40}`,
      maxMa: stages[s]!.base,
      minMa: wide ? stages[s + 1]!.top : stages[s]!.top,
      collection: `C${Math.floor(random() * 20_000)}`,
    };
  }
  return occurrences;
}

function median(values: number[]): number {
  return [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;
}

/** Median wall and process CPU time (ms) of `runs` calls after a warm-up; CPU time suffers less from a busy machine. */
function time(runs: number, work: () => void): { ms: number; cpuMs: number } {
  work();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    work();
    wall.push(performance.now() - start);
    const usedCpu = process.cpuUsage(cpuStart);
    cpu.push((usedCpu.user + usedCpu.system) / 1000);
  }
  return { ms: median(wall), cpuMs: median(cpu) };
}

export async function benchOccurrences(): Promise<BenchFigure[]> {
  const count = 500_000;
  const occurrences = inventedOccurrences(count, 20_000, 19);
  const bins = timescaleStages
    .filter((s) => s.base <= 485.4 && s.top >= 66)
    .sort((a, b) => b.base - a.base)
    .map((s) => ({ name: s.name, baseMa: s.base, topMa: s.top }));
  let taxa = 0;
  const derive = time(5, () => {
    taxa = deriveRanges(occurrences, { maxSpanMyr: 30 }).ranges.length;
  });
  const rates = time(5, () => threeTimerRates(occurrences, bins));
  return [
    {
      name: "deriveRanges, 500,000 occurrences",
      value: Math.round(derive.ms),
      unit: "ms",
      note: `median of 5 (cpu ${Math.round(derive.cpuMs)} ms); ${taxa} taxa, target < 1000 ms`,
    },
    {
      name: "threeTimerRates, 500,000 occurrences",
      value: Math.round(rates.ms),
      unit: "ms",
      note: `median of 5 (cpu ${Math.round(rates.cpuMs)} ms); ${bins.length} stages, target < 1000 ms`,
    },
  ];
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  void benchOccurrences().then((figures) => {
    for (const figure of figures) console.log(`${figure.name}: ${figure.value} ${figure.unit} (${figure.note})`);
  });
}
