import { logisticRegression } from "../stats/logisticRegression";
import { oddsRatio } from "../stats/oddsRatio";
import { encodeTrait, type EncodedTrait } from "./encodeTrait";
import { formatMyr } from "../format/ages";
import { numericStep, scaleNumericTrait, type NumericScaling } from "./scaleNumericTrait";
import type { RobustnessPanel } from "../schemas/runChecks";
import type { Interval, SelectivityTaxon, SelectivityTraitSpec } from "./types";

export interface RobustnessInput {
  /** The run's own victims and survivors at this boundary: what its analysis read. */
  taxa: SelectivityTaxon[];
  /** The same boundary with survivors and victims re-derived under other windows. */
  windows: Array<{ factor: number; windowMyr: number; taxa: SelectivityTaxon[] }>;
  /** First and last appearance (Ma) by taxon id, for the single-stage and truncation variants. */
  ranges: Record<string, { fad: number; lad: number }>;
  boundaryMa: number;
  windowMyr: number;
  /** Distance (Myr) from the boundary within which last appearances are treated as uncertain. */
  truncationMyr: number;
  /** The stages of the time scale, for "whole range within one stage". */
  stages: Array<{ label: string; base: number; top: number }>;
  traits: SelectivityTraitSpec[];
  /** The reference state of each trait's odds ratios as the run chose it (null: numeric). */
  references: Record<string, string | null>;
  level: number;
  /** At most this many clades, the largest, are left out in turn (default 30). */
  maxCladesLeftOut?: number;
}

// The panel's types come from its zod schema (shared/schemas/runChecks.ts), the one description of
// what a run stores; the names below pick out its parts for the code that builds them.
export type { RobustnessPanel };
export type RobustnessVariant = RobustnessPanel["variants"][number];
export type VariantKind = RobustnessVariant["kind"];
export type RobustnessContrast = RobustnessPanel["contrasts"][number];
export type RobustnessVerdict = RobustnessContrast["verdict"]["crude"];
export type VerdictStatus = RobustnessVerdict["status"];
export type JackknifeSummary = NonNullable<RobustnessContrast["jackknife"]["crude"]>;

const RANGE_TOLERANCE = 1e-9;

/**
 * Does a selectivity result survive reasonable changes to the choices behind it? Each contrast's
 * odds ratio of extinction (crude, and adjusted for the other traits by one multiple logistic
 * regression; Firth's when the data separate) is re-estimated under variants of the run's data:
 * - other windows below the boundary (survivors and victims re-derived);
 * - each clade left out in turn (a leave-one-out jackknife; Quenouille 1956, Tukey 1958 for the
 *   idea), with the range of estimates and the clade that moves the estimate most;
 * - taxa whose whole range lies within one stage left out (common practice, no source: they are
 *   the most sensitive to preservation);
 * - range truncation: victims last seen within `truncationMyr` below the boundary treated as
 *   survivors (a last find may fall short of the true extinction, Signor & Lipps 1982, GSA Special
 *   Paper 190), and survivors last seen within `truncationMyr` above it treated as victims.
 * A contrast holds when its interval excludes 1 on the same side under the run's own choice and
 * every variant; it is fragile when direction or significance changes under some variant (which
 * are named); it was never there when no interval excludes 1. References and numeric scaling are
 * the run's own throughout, so the estimates are comparable.
 *
 * @example
 * robustnessPanel({ taxa, windows: [{ factor: 0.5, windowMyr: 3.3, taxa: halfWindowTaxa }], ranges, boundaryMa: 93.9,
 *   windowMyr: 6.6, truncationMyr: 1.65, stages, traits: [feeding], references: { feeding: "suspension" }, level: 0.95 })
 * // => { variants: [{ id: "run", ... }, { id: "window-0.5", label: "Window ×0.5 (3.30 Myr)", ... }, ...],
 * //      contrasts: [{ contrast: "Deposit feeder vs Suspension feeder", verdict: { crude: { status: "holds", ... }, ... } }] }
 */
export function robustnessPanel(input: RobustnessInput): RobustnessPanel {
  const { traits, level } = input;
  if (!(level > 0 && level < 1)) throw new Error(`robustnessPanel: level is ${String(level)}; it must lie between 0 and 1`);
  if (!(input.truncationMyr >= 0)) throw new Error(`robustnessPanel: truncationMyr is ${String(input.truncationMyr)}; it must be 0 or more`);
  const notes: string[] = [];

  // The run's own encoding: references and numeric scaling stay fixed across the variants.
  const plan = traits.map((spec) => {
    if (spec.kind === "numeric") {
      const encoded = encodeTrait(spec, input.taxa);
      const scaling = scaleNumericTrait(spec, encoded.kind === "numeric" ? encoded.transformed : new Float64Array(0));
      return { spec, reference: -1, scaling };
    }
    const code = input.references[spec.key];
    return { spec, reference: code === null || code === undefined ? -1 : spec.states.findIndex((s) => s.code === code), scaling: null as NumericScaling | null };
  });
  const contrastList = plan.flatMap((p) => {
    if (p.spec.kind === "numeric") return p.scaling && !p.scaling.constant ? [{ plan: p, state: -1, label: numericStep(p.spec) }] : [];
    if (p.reference < 0) return [];
    const ref = p.spec.states[p.reference];
    return p.spec.states.map((s, j) => ({ plan: p, state: j, label: `${s.label} vs ${ref.label}` })).filter((c) => c.state !== p.reference);
  });

  // The variants: the run's own rows, other windows, clades out, single-stage out, truncations.
  const variants: Array<RobustnessVariant & { taxa: SelectivityTaxon[] }> = [];
  const add = (id: string, kind: VariantKind, label: string, taxa: SelectivityTaxon[]) => {
    const victims = taxa.reduce((n, t) => n + t.outcome, 0);
    variants.push({ id, kind, label, victims, survivors: taxa.length - victims, taxa });
  };
  // Windows and the truncation distance as the rest of the app writes them: the run's 8.2 Myr window reads 8.2 here too.
  add("run", "run", `The run’s own choice (window ${formatMyr(input.windowMyr)})`, input.taxa);
  for (const w of input.windows) add(`window-${w.factor}`, "window", `Window ×${w.factor} (${formatMyr(w.windowMyr)})`, w.taxa);

  const cladeSizes = new Map<string, number>();
  for (const t of input.taxa) cladeSizes.set(cladeOf(t), (cladeSizes.get(cladeOf(t)) ?? 0) + 1);
  const limit = input.maxCladesLeftOut ?? 30;
  const clades = [...cladeSizes.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1)).map(([c]) => c);
  if (clades.length > limit) notes.push(`The ${limit} largest of ${clades.length} clades were left out in turn; the ${clades.length - limit} smaller ones stay in every jackknife sample.`);
  if (clades.length < 2) notes.push("All taxa at risk belong to one clade, so no clade can be left out.");
  else for (const clade of clades.slice(0, limit)) add(`clade:${clade}`, "clade", `Without ${clade}`, input.taxa.filter((t) => cladeOf(t) !== clade));

  const rangeOf = (t: SelectivityTaxon) => input.ranges[t.id];
  const singleStage = (t: SelectivityTaxon) => {
    const r = rangeOf(t);
    return r !== undefined && input.stages.some((s) => s.base >= r.fad - RANGE_TOLERANCE && s.top <= r.lad + RANGE_TOLERANCE);
  };
  const singles = input.taxa.filter(singleStage).length;
  add("single-stage", "single-stage", `Single-stage taxa out (${singles})`, input.taxa.filter((t) => !singleStage(t)));

  const d = input.truncationMyr;
  const b = input.boundaryMa;
  const lateVictim = (t: SelectivityTaxon) => t.outcome === 1 && rangeOf(t) !== undefined && rangeOf(t).lad <= b + d + RANGE_TOLERANCE;
  const lateSurvivor = (t: SelectivityTaxon) => t.outcome === 0 && rangeOf(t) !== undefined && rangeOf(t).lad >= b - d - RANGE_TOLERANCE;
  const recodedVictims = input.taxa.filter(lateVictim).length;
  const recodedSurvivors = input.taxa.filter(lateSurvivor).length;
  add(
    "truncation-victims",
    "truncation-victims",
    `Victims last seen within ${formatMyr(d)} below as survivors (${recodedVictims})`,
    input.taxa.map((t) => (lateVictim(t) ? { ...t, outcome: 0 as const } : t)),
  );
  add(
    "truncation-survivors",
    "truncation-survivors",
    `Survivors last seen within ${formatMyr(d)} above as victims (${recodedSurvivors})`,
    input.taxa.map((t) => (lateSurvivor(t) ? { ...t, outcome: 1 as const } : t)),
  );

  // Estimates of every contrast under every variant.
  const perVariant = variants.map((v) => estimate(v.taxa, plan, contrastList, level));
  const contrasts: RobustnessContrast[] = contrastList.map((c, k) => {
    const estimates = variants.map((v, i) => ({ variant: v.id, crude: perVariant[i][k].crude, adjusted: perVariant[i][k].adjusted }));
    const labelled = (measure: "crude" | "adjusted") => estimates.map((e, i) => ({ label: variants[i].label, kind: variants[i].kind, est: e[measure] }));
    return {
      traitKey: c.plan.spec.key,
      traitLabel: c.plan.spec.label,
      contrast: c.label,
      state: c.state >= 0 ? c.plan.spec.states[c.state].code : null,
      estimates,
      jackknife: { crude: jackknife(labelled("crude")), adjusted: jackknife(labelled("adjusted")) },
      verdict: { crude: verdict(labelled("crude")), adjusted: verdict(labelled("adjusted")) },
    };
  });

  return {
    boundaryMa: input.boundaryMa,
    windowMyr: input.windowMyr,
    truncationMyr: d,
    variants: variants.map(({ taxa: _taxa, ...v }) => v),
    contrasts,
    notes,
    method:
      "Each contrast's odds ratio re-estimated under other windows, without each clade in turn (leave-one-out jackknife), without taxa known from a single stage, " +
      "and with last appearances near the boundary recoded (Signor & Lipps 1982): crude (Woolf's interval; a univariate logistic regression for numbers) and adjusted for the other traits " +
      "(multiple logistic regression on complete cases, Firth's when the data separate), with the run's references and scaling. Holds: the interval excludes 1 on the same side " +
      "under every variant; fragile: direction or significance changes under some; never there: no interval excludes 1.",
  };
}

const cladeOf = (t: SelectivityTaxon) => (typeof t.clade === "string" && t.clade.trim() !== "" ? t.clade.trim() : "(no clade given)");

type Plan = { spec: SelectivityTraitSpec; reference: number; scaling: NumericScaling | null };
type ContrastPlan = { plan: Plan; state: number; label: string };

/** Crude and adjusted odds ratios of every contrast on one set of taxa. */
function estimate(taxa: SelectivityTaxon[], plan: Plan[], contrasts: ContrastPlan[], level: number): Array<{ crude: Interval | null; adjusted: Interval | null }> {
  const n = taxa.length;
  const outcome = Uint8Array.from(taxa, (t) => t.outcome);
  const encoded = new Map<string, EncodedTrait>(plan.map((p) => [p.spec.key, encodeTrait(p.spec, taxa)]));
  const adjusted = adjustedFit(plan, encoded, outcome, n, level);
  return contrasts.map((c) => {
    const e = encoded.get(c.plan.spec.key)!;
    let crude: Interval | null = null;
    if (e.kind === "states") {
      // [[state victims, state survivors], [reference victims, reference survivors]]
      const cells = [0, 0, 0, 0];
      for (let i = 0; i < n; i++) {
        if (e.codes[i] === c.state) cells[outcome[i] ? 0 : 1]++;
        else if (e.codes[i] === c.plan.reference) cells[outcome[i] ? 2 : 3]++;
      }
      const [a, bb, cc, dd] = cells;
      if (a + bb > 0 && cc + dd > 0 && a + cc > 0 && bb + dd > 0) {
        const or = oddsRatio([[a, bb], [cc, dd]], { level });
        crude = { estimate: or.estimate, ci: or.ci };
      }
    } else {
      const { center, scale } = c.plan.scaling!;
      const x: number[][] = [];
      const y: number[] = [];
      for (let i = 0; i < n; i++) {
        if (Number.isNaN(e.transformed[i])) continue;
        x.push([(e.transformed[i] - center) / scale]);
        y.push(outcome[i]);
      }
      crude = slope(x, y, level);
    }
    return { crude, adjusted: adjusted?.get(`${c.plan.spec.key}\u0000${c.state}`) ?? null };
  });
}

function slope(x: number[][], y: number[], level: number): Interval | null {
  try {
    const fit = logisticRegression(x, y, { level, firthIntervals: "wald" });
    const coefficient = fit.coefficients[1];
    return Number.isFinite(coefficient.se) ? { estimate: coefficient.oddsRatio, ci: coefficient.oddsRatioCi } : null;
  } catch {
    return null;
  }
}

/** One multiple logistic regression of all traits on complete cases; odds ratios by "key\0state". */
function adjustedFit(plan: Plan[], encoded: Map<string, EncodedTrait>, outcome: Uint8Array, n: number, level: number): Map<string, Interval> | null {
  if (plan.length < 2) return null;
  const complete: number[] = [];
  for (let i = 0; i < n; i++) {
    const ok = plan.every((p) => {
      const e = encoded.get(p.spec.key)!;
      return e.kind === "states" ? e.codes[i] >= 0 && p.reference >= 0 : !Number.isNaN(e.transformed[i]) && p.scaling !== null;
    });
    if (ok) complete.push(i);
  }
  // Columns: a dummy per non-reference state that occurs among the complete cases, or the scaled number.
  const columns: Array<{ key: string; value: (i: number) => number }> = [];
  for (const p of plan) {
    const e = encoded.get(p.spec.key)!;
    if (e.kind === "states") {
      const present = new Set(complete.map((i) => e.codes[i]));
      if (!present.has(p.reference)) return null;
      for (const s of [...present].sort((a, b) => a - b)) if (s !== p.reference) columns.push({ key: `${p.spec.key}\u0000${s}`, value: (i) => (e.codes[i] === s ? 1 : 0) });
    } else {
      const { center, scale } = p.scaling!;
      columns.push({ key: `${p.spec.key}\u0000-1`, value: (i) => (e.transformed[i] - center) / scale });
    }
  }
  if (columns.length === 0 || complete.length <= columns.length + 1) return null;
  try {
    const fit = logisticRegression(
      complete.map((i) => columns.map((c) => c.value(i))),
      complete.map((i) => outcome[i]),
      { level, firthIntervals: "wald", names: columns.map((_, j) => `x${j + 1}`) },
    );
    const out = new Map<string, Interval>();
    columns.forEach((c, j) => {
      const coefficient = fit.coefficients[j + 1];
      if (Number.isFinite(coefficient.se)) out.set(c.key, { estimate: coefficient.oddsRatio, ci: coefficient.oddsRatioCi });
    });
    return out;
  } catch {
    return null;
  }
}

type Labelled = { label: string; kind: VariantKind; est: Interval | null };

const significant = (e: Interval) => e.ci[0] > 1 || e.ci[1] < 1;
const direction = (e: Interval) => Math.sign(Math.log(e.estimate));

function verdict(all: Labelled[]): RobustnessVerdict {
  const [own, ...others] = all;
  const estimable = others.filter((o) => o.est !== null);
  if (!own.est) return { status: "not-estimated", changedUnder: [], sentence: "Not estimated under the run’s own choice." };
  if (significant(own.est)) {
    const changed = estimable.filter((o) => !significant(o.est!) || direction(o.est!) !== direction(own.est!)).map((o) => o.label);
    const side = own.est.estimate > 1 ? "above" : "below";
    return changed.length
      ? { status: "fragile", changedUnder: changed, sentence: `Fragile: the odds ratio is ${side} 1 under the run’s own choice, but its interval reaches 1 or crosses over under ${listWords(changed)}.` }
      : { status: "holds", changedUnder: [], sentence: `Holds: the odds ratio stays ${side} 1, its interval excluding 1, under all ${estimable.length + 1} variants.` };
  }
  const appears = estimable.filter((o) => significant(o.est!)).map((o) => o.label);
  return appears.length
    ? { status: "fragile", changedUnder: appears, sentence: `Fragile: not significant under the run’s own choice, but its interval excludes 1 under ${listWords(appears)}.` }
    : { status: "never-there", changedUnder: [], sentence: `Never there: the interval includes 1 under all ${estimable.length + 1} variants.` };
}

function jackknife(all: Labelled[]): JackknifeSummary | null {
  const own = all[0].est;
  const out = all.filter((o) => o.kind === "clade" && o.est !== null);
  if (!own || out.length === 0) return null;
  let most: { clade: string; estimate: number; shift: number } | null = null;
  for (const o of out) {
    const shift = Math.abs(Math.log(o.est!.estimate) - Math.log(own.estimate));
    if (!most || shift > most.shift) most = { clade: o.label.replace(/^Without /, ""), estimate: o.est!.estimate, shift };
  }
  const values = out.map((o) => o.est!.estimate);
  return { min: Math.min(...values), max: Math.max(...values), mostInfluential: most ? { clade: most.clade, estimate: most.estimate } : null, cladesLeftOut: out.length };
}

function listWords(labels: string[]): string {
  const shown = labels.slice(0, 4);
  const more = labels.length - shown.length;
  return shown.join("; ") + (more > 0 ? `; and ${more} more` : "");
}
