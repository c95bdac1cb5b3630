// Timing of a whole selectivity analysis (per-trait tables and tests, clade-adjusted odds ratios,
// the multiple regression and the confounding check) on 100,000 invented taxa with five traits,
// as a run computes it in a worker thread. `npx tsx bench/selectivity.ts` prints it alone.
import { pathToFileURL } from "node:url";
import { analyzeSelectivity, type SelectivityTaxon, type SelectivityTraitSpec } from "../shared/selectivity/index";
import { SUGGESTED_CODEBOOK } from "../shared/codebook";
import { createUniformSource } from "../shared/stats/random";

export interface SelectivityFigure {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const TAXA = 100_000;
const CLADES = 40;
const RUNS = 3;

/** The suggested codebook's five traits, as a run hands them to the analysis. */
const SPECS: SelectivityTraitSpec[] = SUGGESTED_CODEBOOK.map((t) => ({
  key: t.key,
  label: t.label,
  kind: t.kind,
  states: t.states.map((s) => ({ code: s.code, label: s.label })),
  transform: t.transform === "log10" ? "log10" : "none",
  standardise: t.kind === "numeric",
  unit: t.unit,
}));

/** Invented taxa whose extinction odds rise with a marine habit and a small range, plus clade noise. */
function inventedTaxa(): SelectivityTaxon[] {
  const random = createUniformSource(100_005);
  const cladeEffect = Array.from({ length: CLADES }, () => random() - 0.5);
  return Array.from({ length: TAXA }, (_, i) => {
    const clade = Math.floor(random() * CLADES);
    const values: Record<string, string | number | null> = {};
    for (const spec of SPECS) {
      if (random() < 0.04) values[spec.key] = null;
      else if (spec.kind === "numeric") values[spec.key] = Number((1 + random() * 299).toFixed(1));
      else values[spec.key] = spec.states[Math.floor(random() * spec.states.length)].code;
    }
    const range = typeof values.geographic_range === "number" ? values.geographic_range : 150;
    const eta = -0.4 + (values.environment === "marine" ? 0.6 : 0) - 0.004 * (range - 150) + cladeEffect[clade];
    return { id: String(i), name: `Benchia ${i}`, clade: `Invented clade ${clade}`, outcome: random() < 1 / (1 + Math.exp(-eta)) ? 1 : 0, values };
  });
}

export async function benchSelectivity(): Promise<SelectivityFigure[]> {
  const taxa = inventedTaxa();
  const input = { taxa, traits: SPECS, options: { correction: "bh" as const, forceFirth: false, level: 0.95, confoundingThreshold: 0.1 } };
  const first = analyzeSelectivity(input); // warm-up, and the shape of the answer
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < RUNS; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    analyzeSelectivity(input);
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
  return [
    {
      name: "selectivity analysis, 100,000 taxa x 5 traits",
      value: median(wall),
      unit: "ms",
      note: `median of ${RUNS} (cpu ${median(cpu).toFixed(0)} ms); ${first.design.victims} victims, ${first.design.completeCases} complete cases, ${CLADES} clades, model ${first.model ? "fitted" : "not fitted"}`,
    },
  ];
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  benchSelectivity().then((figures) => {
    for (const f of figures) console.log(`${f.name}  ${f.value.toFixed(0)} ${f.unit}  ${f.note ?? ""}`);
  });
}
