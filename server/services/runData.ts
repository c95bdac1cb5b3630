// What a run analyses, read from the services that own the data: the codebook (checked against the
// run's parameters), the trait values and each boundary's victims and survivors (overrides applied),
// hashed exactly as read. Run jobs, the preview, computeRunNow and the replication bundle read
// through readStudyData, so they all see the same rows.
import { createHash } from "node:crypto";
import { and, eq, isNull } from "drizzle-orm";
import type { Database } from "../db";
import { taxa } from "../../db/schema/index";
import type { EncodedTrait } from "../../shared/selectivity/index";
import type { SelectivityTaxon, SelectivityTraitSpec } from "../../shared/selectivity/types";
import { formatMa } from "../../shared/format/ages";
import { stageBelow } from "../../shared/timescale/index";
import type { RunBoundaryDesign, RunParams } from "../../shared/schemas/runs";
import type { OutcomesResult } from "../../shared/schemas/outcomes";
import type { Trait } from "../../shared/schemas/traits";
import type { ClassifiedTaxon } from "./outcomeClassification";
import { DomainError, invalidInput } from "../domain/errors";
import { occurrenceCountsOf } from "./occurrenceCounts";
import type { SamplingCounts } from "../../shared/sampling/index";
import type { SamplingCovariate } from "../../shared/schemas/samplingCheck";

/** What a run needs from the services that own the data. */
export interface RunDataSources {
  outcomes: { finalOutcomes(studyId: string, query: { boundary: number; window?: number }): Promise<{ summary: OutcomesResult; taxa: ClassifiedTaxon[] }> };
  /** The study's codebook, retired traits included. */
  traits: { list(studyId: string): Promise<{ traits: Trait[] }> };
}

export type TraitSpec = SelectivityTraitSpec & { traitId: string };

export interface BoundaryData {
  design: Omit<RunBoundaryDesign, "completeCases">;
  /** Victims and survivors, sorted by taxon id. */
  taxa: SelectivityTaxon[];
  /** Outcome warnings that touch taxa, in words, for the cautions. */
  warnings: string[];
}

export interface StudyData {
  specs: TraitSpec[];
  boundaries: BoundaryData[];
  /** When the run adds sampling covariates: which, each taxon's finds and collections, and the fit's options. */
  sampling: { covariates: SamplingCovariate[]; counts: SamplingCounts; options: { forceFirth: boolean; level: number } } | null;
  dataHash: string;
  rowCount: number;
}

/** The traits to test as the analysis reads them, or a 400 naming each parameter that does not fit the codebook. */
export function traitSpecs(params: RunParams, codebook: Trait[]): TraitSpec[] {
  const byId = new Map(codebook.map((t) => [t.id, t]));
  const fields: Record<string, string> = {};
  const specs: TraitSpec[] = [];
  params.traits.forEach((chosen, i) => {
    const trait = byId.get(chosen.traitId);
    const at = `traits.${i}`;
    if (!trait) {
      fields[`${at}.traitId`] = "No trait of this study has this id (it may have been deleted)";
      return;
    }
    if (trait.retired) {
      fields[`${at}.traitId`] = `${trait.label} is retired from the codebook; restore it there to test it`;
      return;
    }
    const numeric = trait.kind === "numeric";
    if (chosen.reference !== undefined) {
      if (numeric) fields[`${at}.reference`] = `${trait.label} is numeric and has no reference state`;
      else if (!trait.states.some((s) => s.code === chosen.reference)) {
        fields[`${at}.reference`] = `"${chosen.reference}" is not a state of ${trait.label}; choose one of ${trait.states.map((s) => s.code).join(", ")}`;
      }
    }
    if (!numeric && chosen.transform !== undefined && chosen.transform !== "none") fields[`${at}.transform`] = `Only numeric traits can be transformed; ${trait.label} is ${trait.kind}`;
    if (!numeric && chosen.standardise) fields[`${at}.standardise`] = `Only numeric traits can be standardised; ${trait.label} is ${trait.kind}`;
    specs.push({
      traitId: trait.id,
      key: trait.key,
      label: trait.label,
      kind: trait.kind,
      states: trait.states.map((s) => ({ code: s.code, label: s.label })),
      ...(chosen.reference !== undefined && !numeric ? { reference: chosen.reference } : {}),
      transform: numeric ? (chosen.transform ?? trait.transform) : "none",
      standardise: numeric ? (chosen.standardise ?? false) : false,
      unit: trait.unit,
    });
  });
  if (Object.keys(fields).length) {
    throw invalidInput(`The run's traits do not fit this study's codebook: ${Object.values(fields).join("; ")}.`, fields);
  }
  return specs;
}

/** Boundaries without a window need a stage below them for the default window. */
export function checkWindows(params: RunParams): void {
  const fields: Record<string, string> = {};
  params.boundaries.forEach((b, i) => {
    if (b.windowMyr === undefined && !stageBelow(b.boundaryMa)) {
      fields[`boundaries.${i}.windowMyr`] = `No stage of the time scale lies below ${b.boundaryMa} Ma, so there is no default window: give a window in Myr`;
    }
  });
  if (Object.keys(fields).length) throw invalidInput(`Give a window for ${Object.keys(fields).length === 1 ? "this boundary" : "these boundaries"}: ${Object.values(fields).join("; ")}.`, fields);
}

function boundaryLabel(given: string | undefined, result: OutcomesResult): string {
  if (given) return given;
  const unit = result.boundaryUnits[0];
  return unit ? `Base of the ${unit.label} (${formatMa(result.boundary)})` : formatMa(result.boundary);
}

/** "1 taxon", "2,310 taxa". */
export const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en-US")} ${n === 1 ? one : many}`;

/** Outcome warnings that bear on a selectivity test, in words, for a run's cautions. */
function warningCautions(label: string, result: OutcomesResult): string[] {
  const out: string[] = [];
  const { singleInterval, lastSeenBelowBoundary, missingRange, invalidRange } = result.warnings;
  if (lastSeenBelowBoundary.count) out.push(`${label}, ${plural(lastSeenBelowBoundary.count, "taxon", "taxa")}: ${lastSeenBelowBoundary.note}`);
  if (singleInterval.count) out.push(`${label}, ${plural(singleInterval.count, "taxon", "taxa")}: ${singleInterval.note}`);
  const unusable = missingRange.count + invalidRange.count;
  if (unusable) out.push(`${label}: ${plural(unusable, "taxon", "taxa")} without a usable range count as not at risk and are not tested.`);
  return out;
}

/**
 * SHA-256 of a canonical serialisation of exactly the data read: codebook entries and, per boundary, every taxon's id, name, clade, outcome and values,
 * sorted by id; with sampling covariates, every taxon's finds and collections too (absent otherwise, so earlier runs keep their hash).
 */
function hashData(specs: TraitSpec[], boundaries: BoundaryData[], sampling: StudyData["sampling"]): string {
  const canonical = {
    ...(sampling ? { sampling: Object.keys(sampling.counts).sort().map((id) => [id, sampling.counts[id]!.occurrences, sampling.counts[id]!.collections]) } : {}),
    traits: specs.map((s) => [s.traitId, s.key, s.kind, s.states.map((c) => c.code)]),
    boundaries: boundaries.map((b) => ({
      boundaryMa: b.design.boundaryMa,
      windowMyr: b.design.windowMyr,
      taxa: b.taxa.map((t) => [t.id, t.name, t.clade, t.outcome, specs.map((s) => t.values[s.key] ?? null)]),
    })),
  };
  return createHash("sha256").update(JSON.stringify(canonical)).digest("hex");
}

/** Each taxon's outcome as the statistics take it (1 victim, 0 survivor). */
export const outcomeArray = (list: SelectivityTaxon[]) => Uint8Array.from(list, (t) => t.outcome);

/** Taxa with a usable value of every chosen trait: the multiple regression's sample. */
export function completeCases(encoded: EncodedTrait[], n: number): number {
  let complete = 0;
  for (let i = 0; i < n; i++) {
    if (encoded.every((e) => (e.kind === "states" ? e.codes[i] >= 0 : !Number.isNaN(e.transformed[i])))) complete++;
  }
  return complete;
}

/** Reads the codebook, the trait values and each boundary's victims and survivors. */
export async function readStudyData(
  db: Database,
  sources: RunDataSources,
  studyId: string,
  params: RunParams,
  onBoundary?: (index: number, label: string) => Promise<void>,
): Promise<StudyData> {
  checkWindows(params);
  const specs = traitSpecs(params, (await sources.traits.list(studyId)).traits);
  const valueRows = await db
    .select({ id: taxa.id, values: taxa.traitValues })
    .from(taxa)
    .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
  const valuesOf = new Map(valueRows.map((r) => [r.id, r.values]));

  const boundaries: BoundaryData[] = [];
  for (const [i, b] of params.boundaries.entries()) {
    let result: OutcomesResult;
    let classified: ClassifiedTaxon[];
    try {
      ({ summary: result, taxa: classified } = await sources.outcomes.finalOutcomes(studyId, { boundary: b.boundaryMa, window: b.windowMyr }));
    } catch (err) {
      // Name the boundary of the run that the outcomes service refused.
      if (err instanceof DomainError && err.kind === "invalid") {
        const fields = Object.fromEntries(Object.entries(err.fields ?? {}).map(([k, v]) => [`boundaries.${i}.${k === "window" ? "windowMyr" : "boundaryMa"}`, v]));
        throw invalidInput(`Boundary ${i + 1}: ${err.message}`, fields);
      }
      throw err;
    }
    const label = boundaryLabel(b.label, result);
    await onBoundary?.(i, label);
    const list: SelectivityTaxon[] = classified
      .filter((t) => t.outcome !== "excluded")
      .map((t) => {
        const stored = valuesOf.get(t.taxonId) ?? {};
        return {
          id: t.taxonId,
          name: t.name,
          clade: t.higherTaxon,
          outcome: t.outcome === "victim" ? (1 as const) : (0 as const),
          values: Object.fromEntries(specs.map((s) => [s.key, stored[s.traitId] ?? null])),
        };
      })
      .sort((x, y) => (x.id < y.id ? -1 : x.id > y.id ? 1 : 0));
    boundaries.push({
      design: {
        boundaryMa: result.boundary,
        windowMyr: result.window,
        windowDefaultFrom: result.windowDefaultFrom ? { name: result.windowDefaultFrom.name, label: result.windowDefaultFrom.label } : null,
        label,
        victims: result.counts.victim,
        survivors: result.counts.survivor,
        notAtRisk: result.counts.excluded,
        overridesApplied: result.overridesApplied,
      },
      taxa: list,
      warnings: warningCautions(label, result),
    });
  }
  const sampling = await samplingData(db, studyId, params, boundaries);
  return { specs, boundaries, sampling, dataHash: hashData(specs, boundaries, sampling), rowCount: boundaries.reduce((n, b) => n + b.taxa.length, 0) };
}

/** Each tested taxon's finds and distinct collections, when the run adds sampling covariates (taxa named in no occurrence have 0). */
async function samplingData(db: Database, studyId: string, params: RunParams, boundaries: BoundaryData[]): Promise<StudyData["sampling"]> {
  const covariates = params.samplingCovariates ?? [];
  if (covariates.length === 0) return null;
  const ids = [...new Set(boundaries.flatMap((b) => b.taxa.map((t) => t.id)))];
  const counts: SamplingCounts = {};
  for (const [id, c] of await occurrenceCountsOf(db, studyId, ids)) counts[id] = { occurrences: c.occurrences, collections: c.collections };
  return { covariates, counts, options: { forceFirth: params.forceFirth, level: params.level } };
}
