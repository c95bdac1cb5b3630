// Rows the tables and charts of a run's results are drawn from.
import type { RunResults } from "@shared/schemas/runs";
import { formatMyr } from "../../lib/format";
import { ESTIMATE_KINDS, type EstimateKind, type ForestEstimate, type ForestRow } from "./ForestPlot";

export type BoundaryResult = RunResults["boundaries"][number];
export type SelectivityResultData = BoundaryResult["result"];
export type TraitResultData = SelectivityResultData["traits"][number];
export type ContrastData = TraitResultData["contrasts"][number];
export type ModelData = NonNullable<SelectivityResultData["model"]>;

/** A state's label as the run read the codebook (the code when the table does not hold it). */
export function stateLabel(trait: TraitResultData, code: string | null): string {
  if (code === null) return "";
  return trait.table.find((row) => row.state === code)?.label ?? code;
}

/** "Suspension feeder vs Deposit feeder", or the numeric step ("per SD of log10 size"). */
export function contrastWords(trait: TraitResultData, contrast: ContrastData): string {
  if (contrast.state === null) return contrast.contrast;
  return `${stateLabel(trait, contrast.state)} vs ${stateLabel(trait, contrast.reference)}`;
}

/** A stable id of a contrast across boundaries and runs. */
export const contrastId = (trait: TraitResultData, contrast: ContrastData) => `${trait.key}:${contrast.contrast}`;

function estimateOf(kind: EstimateKind, contrast: ContrastData): ForestEstimate | null {
  const source = kind === "crude" ? contrast.crude : kind === "clade" ? contrast.cladeAdjusted : contrast.modelAdjusted;
  return source ? { kind, estimate: source.estimate, ci: source.ci } : null;
}

/** One forest-plot group per contrast of every trait, crude and adjusted side by side. */
export function forestRows(result: SelectivityResultData): ForestRow[] {
  return result.traits.flatMap((trait) =>
    trait.contrasts.map((contrast) => ({
      id: contrastId(trait, contrast),
      label: trait.label,
      detail: contrastWords(trait, contrast),
      flagged: contrast.flagged,
      estimates: ESTIMATE_KINDS.map((kind) => estimateOf(kind, contrast)),
    })),
  );
}

export const flaggedContrasts = (result: SelectivityResultData) =>
  result.traits.flatMap((trait) => trait.contrasts.filter((c) => c.flagged).map((contrast) => ({ trait, contrast })));

export type HeatMeasure = EstimateKind;

export interface HeatCell {
  boundary: string;
  /** Natural log of the odds ratio; null where it could not be estimated or the trait was not tested. */
  logOdds: number | null;
  oddsRatio: number | null;
  ci: [number, number] | null;
}

export interface HeatRow {
  id: string;
  label: string;
  cells: HeatCell[];
}

/** A name per boundary column; two boundaries at one age (different windows) are told apart by the window. */
export function boundaryColumns(boundaries: readonly BoundaryResult[]): string[] {
  return boundaries.map((b) => (boundaries.filter((o) => o.label === b.label).length > 1 ? `${b.label}, window ${formatMyr(b.windowMyr)}` : b.label));
}

/** Traits' contrasts by boundary, for the heat map and its table. */
export function heatRows(boundaries: readonly BoundaryResult[], measure: HeatMeasure): HeatRow[] {
  const rows = new Map<string, HeatRow>();
  const columns = boundaryColumns(boundaries);
  boundaries.forEach((b, bi) => {
    for (const trait of b.result.traits)
      for (const contrast of trait.contrasts) {
        const id = contrastId(trait, contrast);
        let row = rows.get(id);
        if (!row) {
          row = { id, label: `${trait.label}: ${contrastWords(trait, contrast)}`, cells: columns.map((boundary) => ({ boundary, logOdds: null, oddsRatio: null, ci: null })) };
          rows.set(id, row);
        }
        const e = estimateOf(measure, contrast);
        const usable = e !== null && e.estimate > 0 && Number.isFinite(e.estimate);
        row.cells[bi] = { boundary: columns[bi], logOdds: usable ? Math.log(e.estimate) : null, oddsRatio: usable ? e.estimate : null, ci: usable ? e.ci : null };
      }
  });
  return [...rows.values()];
}
