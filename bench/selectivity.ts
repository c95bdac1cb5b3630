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

/**
 * The shape of a real published run (353 genera x 4 traits over 38 families, Late Ordovician
 * brachiopods as an analyst ran them): invented values of that shape, with family-level risk, a
 * 14-state trait and a numeric one, so that the clade-adjusted odds ratios, the conditional
 * logistic regressions, the confounding bootstraps and Fisher's 14 x 2 test all run.
 */
function publishedShapeTaxa(): { taxa: SelectivityTaxon[]; traits: SelectivityTraitSpec[] } {
  const random = createUniformSource(353);
  const families = 38;
  const risk = Array.from({ length: families }, () => 2 * (random() - 0.5));
  const lithologies = Array.from({ length: 14 }, (_, k) => ({ code: `l${k}`, label: `Lithology ${k + 1}` }));
  const traits: SelectivityTraitSpec[] = [
    { key: "lithology", label: "Lithology", kind: "categorical", states: lithologies, transform: "none", standardise: false },
    { key: "habit", label: "Life habit", kind: "binary", states: [{ code: "attached", label: "Attached" }, { code: "free", label: "Free-lying" }], transform: "none", standardise: false },
    { key: "size", label: "Shell size", kind: "numeric", states: [], transform: "log10", standardise: true, unit: "mm" },
    { key: "range", label: "Provinces", kind: "numeric", states: [], transform: "none", standardise: true },
  ];
  const taxa = Array.from({ length: 353 }, (_, i): SelectivityTaxon => {
    const family = Math.floor(random() * families);
    const size = 10 ** (0.5 + random() * 1.5);
    const range = 1 + Math.floor(random() * 8);
    const eta = risk[family] - 0.25 * (range - 4);
    return {
      id: String(i),
      name: `Invented genus ${i}`,
      clade: random() < 0.03 ? "" : `Invented family ${family}`,
      outcome: random() < 1 / (1 + Math.exp(-eta)) ? 1 : 0,
      values: { lithology: lithologies[Math.floor(random() * 14)].code, habit: random() < 0.5 ? "attached" : "free", size, range },
    };
  });
  return { taxa, traits };
}

function timed(run: () => unknown, runs: number): { wall: number; cpu: number } {
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const cpuStart = process.cpuUsage();
    const start = performance.now();
    run();
    wall.push(performance.now() - start);
    const used = process.cpuUsage(cpuStart);
    cpu.push((used.user + used.system) / 1000);
  }
  const median = (values: number[]) => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)];
  return { wall: median(wall), cpu: median(cpu) };
}

/** The published run's shape alone (target: under 3 s). */
export function benchPublishedShape(): SelectivityFigure {
  const { taxa, traits } = publishedShapeTaxa();
  const input = { taxa, traits, options: { correction: "bh" as const, forceFirth: false, level: 0.95, confoundingThreshold: 0.1 } };
  const first = analyzeSelectivity(input);
  const { wall, cpu } = timed(() => analyzeSelectivity(input), 3);
  const flagged = first.traits.flatMap((t) => t.contrasts).filter((c) => c.flagged).length;
  return {
    name: "selectivity analysis, 353 taxa x 4 traits over 38 families",
    value: wall,
    unit: "ms",
    note: `median of 3 (cpu ${cpu.toFixed(0)} ms); target under 3,000 ms; ${first.traits[0].test.method.split(",")[0]}; ${flagged} flagged contrasts`,
  };
}

export async function benchSelectivity(): Promise<SelectivityFigure[]> {
  const taxa = inventedTaxa();
  const input = { taxa, traits: SPECS, options: { correction: "bh" as const, forceFirth: false, level: 0.95, confoundingThreshold: 0.1 } };
  const published = benchPublishedShape();
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
    published,
    {
      name: "selectivity analysis, 100,000 taxa x 5 traits",
      value: median(wall),
      unit: "ms",
      note: `median of ${RUNS} (cpu ${median(cpu).toFixed(0)} ms); ${first.design.victims} victims, ${first.design.completeCases} complete cases, ${CLADES} clades, model ${first.model ? "fitted" : "not fitted"}`,
    },
  ];
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  (process.argv.includes("--published") ? Promise.resolve([benchPublishedShape()]) : benchSelectivity()).then((figures) => {
    for (const f of figures) console.log(`${f.name}  ${f.value.toFixed(0)} ${f.unit}  ${f.note ?? ""}`);
  });
}
