// Timing of the robustness panel (shared/selectivity/robustnessPanel) as a run computes it in its
// worker: (1) the invented demo study's four-boundary, five-trait run (bases of the Albian,
// Cenomanian, Turonian and Coniacian, default windows, windows x0.5, x1.5 and x2, every clade
// left out, single-stage taxa out, both truncations); (2) 100,000 invented taxa x 5 traits at one
// boundary with 40 clades (30 left out in turn). Survivors and victims of each window are
// classified here with classifyAcrossBoundary (the run job reads them from the outcomes service,
// overrides applied: that database read is not part of these figures).
// `npx tsx bench/robustness.ts` prints it alone.
import { pathToFileURL } from "node:url";
import { chooseReference, countStates, encodeTrait, robustnessPanel, type RobustnessInput, type SelectivityTaxon, type SelectivityTraitSpec } from "../shared/selectivity/index";
import { classifyAcrossBoundary } from "../shared/outcomes/index";
import { SUGGESTED_CODEBOOK } from "../shared/codebook";
import { createUniformSource } from "../shared/stats/random";
import { findUnit, stageBelow, timescaleStages } from "../shared/timescale/index";
import { generateDemoStudy } from "../scripts/seed/demo/generator";
import { DEMO_SWEEP_STAGES } from "../scripts/seed/demo/analyses";
import type { BenchFigure } from "./suites";

const FACTORS = [0.5, 1.5, 2];
const STAGES = timescaleStages.map((s) => ({ label: s.label, base: s.base, top: s.top }));

/** The suggested codebook's five traits with a run's defaults (the codebook's transform, per unit). */
const SPECS: SelectivityTraitSpec[] = SUGGESTED_CODEBOOK.map((t) => ({
  key: t.key,
  label: t.label,
  kind: t.kind,
  states: t.states.map((s) => ({ code: s.code, label: s.label })),
  transform: t.transform === "log10" ? "log10" : "none",
  standardise: false,
  unit: t.unit,
}));

interface Ranged {
  id: string;
  name: string;
  clade: string;
  fad: number;
  lad: number;
  values: SelectivityTaxon["values"];
}

/** Victims and survivors across a boundary for one window. */
function atRisk(taxa: Ranged[], boundary: number, window: number): SelectivityTaxon[] {
  const outcomes = classifyAcrossBoundary(taxa, boundary, window);
  const out: SelectivityTaxon[] = [];
  taxa.forEach((t, i) => {
    if (outcomes[i] !== "excluded") out.push({ id: t.id, name: t.name, clade: t.clade, outcome: outcomes[i] === "victim" ? 1 : 0, values: t.values });
  });
  return out;
}

/** The reference a run's analysis chooses (the most common state, chooseReference), by trait key. */
function references(own: SelectivityTaxon[]): Record<string, string | null> {
  const outcome = Uint8Array.from(own, (t) => t.outcome);
  return Object.fromEntries(
    SPECS.map((spec) => {
      const encoded = encodeTrait(spec, own);
      if (encoded.kind !== "states") return [spec.key, null];
      const chosen = chooseReference(spec, countStates(encoded.codes, outcome, spec.states.length));
      return [spec.key, chosen.index >= 0 ? spec.states[chosen.index].code : null];
    }),
  );
}

/** Everything one boundary's panel reads (built before the clock starts). */
function panelInput(taxa: Ranged[], boundary: number, window: number): RobustnessInput {
  const own = atRisk(taxa, boundary, window);
  return {
    taxa: own,
    windows: FACTORS.map((factor) => ({ factor, windowMyr: window * factor, taxa: atRisk(taxa, boundary, window * factor) })),
    ranges: Object.fromEntries(taxa.map((t) => [t.id, { fad: t.fad, lad: t.lad }])),
    boundaryMa: boundary,
    windowMyr: window,
    truncationMyr: window / 4,
    stages: STAGES,
    traits: SPECS,
    references: references(own),
    level: 0.95,
  };
}

function demoTaxa(): Ranged[] {
  const data = generateDemoStudy();
  return data.taxa
    .map((t, i) => ({ t, i }))
    .filter(({ t }) => t.fadMa !== null && t.ladMa !== null && t.fadMa >= t.ladMa)
    .map(({ t, i }) => ({ id: `demo-${i}`, name: t.name, clade: t.higherTaxon, fad: t.fadMa!, lad: t.ladMa!, values: t.values }));
}

function inventedTaxa(n: number, clades: number): Ranged[] {
  const random = createUniformSource(150_015);
  const cladeEffect = Array.from({ length: clades }, () => random() - 0.5);
  return Array.from({ length: n }, (_, i) => {
    const clade = Math.floor(random() * clades);
    const values: Record<string, string | number | null> = {};
    for (const spec of SPECS) {
      if (random() < 0.04) values[spec.key] = null;
      else if (spec.kind === "numeric") values[spec.key] = Number((1 + random() * 299).toFixed(1));
      else values[spec.key] = spec.states[Math.floor(random() * spec.states.length)].code;
    }
    const range = typeof values.geographic_range === "number" ? values.geographic_range : 150;
    const eta = -0.4 + (values.environment === "marine" ? 0.6 : 0) - 0.004 * (range - 150) + cladeEffect[clade];
    const dies = random() < 1 / (1 + Math.exp(-eta));
    const fad = 100 + 0.5 + random() * 20;
    const lad = dies ? 100 + random() * Math.min(12, fad - 100) : 100 - random() * 20;
    return { id: String(i), name: `Benchia ${i}`, clade: `Invented clade ${clade}`, fad, lad, values };
  });
}

function timed<T>(work: () => T): { value: T; ms: number; cpuMs: number } {
  const cpuStart = process.cpuUsage();
  const start = performance.now();
  const value = work();
  const used = process.cpuUsage(cpuStart);
  return { value, ms: performance.now() - start, cpuMs: (used.user + used.system) / 1000 };
}

export async function benchRobustness(): Promise<BenchFigure[]> {
  const demo = demoTaxa();
  const demoInputs = DEMO_SWEEP_STAGES.map((stage) => {
    const boundary = findUnit(stage)!.base;
    return panelInput(demo, boundary, stageBelow(boundary)!.duration);
  });
  const demoRun = timed(() => demoInputs.map((input) => robustnessPanel(input)));
  const demoVariants = demoRun.value.reduce((n, p) => n + p.variants.length, 0);
  const demoContrasts = demoRun.value.reduce((n, p) => n + p.contrasts.length, 0);

  const large = inventedTaxa(100_000, 40);
  const largeInput = panelInput(large, 100, 5);
  const largeRun = timed(() => robustnessPanel(largeInput));

  return [
    {
      name: "robustness panel, demo run (4 boundaries x 5 traits)",
      value: demoRun.ms,
      unit: "ms",
      note: `cpu ${demoRun.cpuMs.toFixed(0)} ms; ${demoVariants} variants and ${demoContrasts} contrasts over the 4 boundaries, crude and adjusted; target < 10 s`,
    },
    {
      name: "robustness panel, 100,000 taxa x 5 traits",
      value: largeRun.ms,
      unit: "ms",
      note: `cpu ${largeRun.cpuMs.toFixed(0)} ms; ${largeInput.taxa.length} taxa at risk, ${largeRun.value.variants.length} variants (30 of 40 clades left out), ${largeRun.value.contrasts.length} contrasts; target < 60 s`,
    },
  ];
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  benchRobustness().then((figures) => {
    for (const f of figures) console.log(`${f.name}  ${f.value.toFixed(0)} ${f.unit}  ${f.note ?? ""}`);
  });
}
