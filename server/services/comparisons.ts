// Modern comparisons: a succeeded run's fitted model (one boundary of it) scores every species of a
// modern list read through the list's saved crosswalk, and the scores are held against the listed
// threat categories. Saved like a run: parameters, a hash of exactly what was read, the results, who
// and when. The computation is pure (shared/comparison) and quick, so it runs in the request.
import { createHash } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import type { Database } from "../db";
import { APP_VERSION } from "../config";
import { activity, comparisons, modernLists, runs, users } from "../../db/schema/index";
import { compareWithThreatList, MODERN_COMPARISON_CAUTION, readSpeciesTraits, type ComparisonSpecies, type Crosswalk } from "../../shared/comparison/index";
import type { Comparison, ComparisonList, ComparisonParams, ComparisonResults, ComparisonSummary } from "../../shared/schemas/comparisons";
import type { RunResults } from "../../shared/schemas/runs";
import { conflict, invalidInput, notFound } from "../domain/errors";
import { crosswalkTraits, listForComparison, savedCrosswalk } from "./modernLists";
import { loadCodebook } from "./codebookStore";


type ComparisonRow = typeof comparisons.$inferSelect;

/** SHA-256 of a canonical serialisation of exactly what the comparison read. */
function hashData(parts: { runId: string; runDataHash: string | null; boundaryIndex: number; model: unknown; crosswalk: Crosswalk; species: ComparisonSpecies[] }): string {
  const canonical = {
    run: [parts.runId, parts.runDataHash, parts.boundaryIndex],
    model: parts.model,
    crosswalk: parts.crosswalk.pairs.map((p) => [p.traitId, p.column, Object.entries(p.states).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)), p.multiplier]),
    species: parts.species.map((s) => [s.name, s.higherTaxon, s.category, Object.entries(s.values).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))]),
  };
  return createHash("sha256").update(JSON.stringify(canonical)).digest("hex");
}

export function createComparisonService(db: Database) {
  const selectSummary = {
    row: {
      id: comparisons.id,
      studyId: comparisons.studyId,
      listId: comparisons.listId,
      runId: comparisons.runId,
      name: comparisons.name,
      params: comparisons.params,
      dataHash: comparisons.dataHash,
      appVersion: comparisons.appVersion,
      createdBy: comparisons.createdBy,
      createdAt: comparisons.createdAt,
    },
    listName: modernLists.name,
    runName: runs.name,
    creatorName: users.name,
    auc: sql<number | null>`(${comparisons.results} -> 'roc' ->> 'auc')::float8`,
    worthALookCount: sql<number>`coalesce(jsonb_array_length(${comparisons.results} -> 'worthALook'), 0)::int`,
  };

  type SummaryRow = { row: Omit<ComparisonRow, "results">; listName: string; runName: string; creatorName: string | null; auc: number | null; worthALookCount: number };

  const toSummary = (r: SummaryRow): ComparisonSummary => ({
    id: r.row.id,
    studyId: r.row.studyId,
    name: r.row.name,
    listId: r.row.listId,
    listName: r.listName,
    runId: r.row.runId,
    runName: r.runName,
    params: r.row.params as ComparisonParams,
    dataHash: r.row.dataHash,
    dataHashShort: r.row.dataHash.slice(0, 12),
    appVersion: r.row.appVersion,
    auc: r.auc === null ? null : Number(r.auc),
    worthALookCount: Number(r.worthALookCount),
    createdBy: r.row.createdBy ? { id: r.row.createdBy, name: r.creatorName ?? "" } : null,
    createdAt: r.row.createdAt.toISOString(),
  });

  const summaryQuery = () =>
    db
      .select(selectSummary)
      .from(comparisons)
      .innerJoin(modernLists, eq(modernLists.id, comparisons.listId))
      .innerJoin(runs, eq(runs.id, comparisons.runId))
      .leftJoin(users, eq(users.id, comparisons.createdBy));

  async function get(studyId: string, comparisonId: string): Promise<Comparison> {
    const [found] = await summaryQuery().where(and(eq(comparisons.id, comparisonId), eq(comparisons.studyId, studyId)));
    if (!found) throw notFound("This study has no such comparison (it may have been deleted).");
    const [{ results }] = await db.select({ results: comparisons.results }).from(comparisons).where(eq(comparisons.id, comparisonId));
    return { ...toSummary(found), results: results as unknown as ComparisonResults };
  }

  return {
    /** Scores the list with the run's model and saves the comparison; 400/409 name what is missing (a crosswalk pair, a finished run, a model). */
    async create(studyId: string, user: { id: string }, params: ComparisonParams): Promise<Comparison> {
      const { row: list, species: listed, decimalComma } = await listForComparison(db, studyId, params.listId);
      const crosswalk = savedCrosswalk(list);
      if (!crosswalk) throw conflict(`Save a crosswalk for the list "${list.name}" first: it says which of its columns hold which trait.`, { listId: "This list has no saved crosswalk" });

      const [run] = await db.select().from(runs).where(and(eq(runs.id, params.runId), eq(runs.studyId, studyId)));
      if (!run) throw notFound("This study has no such run (it may have been deleted).");
      if (run.status !== "succeeded" || !run.results) throw conflict(`Only a finished run can score a list; the run "${run.name}" is ${run.status}.`, { runId: `This run is ${run.status}` });
      const results = run.results as unknown as RunResults;
      const boundary = results.boundaries[params.boundaryIndex];
      if (!boundary) {
        throw invalidInput(`The run "${run.name}" has ${results.boundaries.length} boundar${results.boundaries.length === 1 ? "y" : "ies"}; boundaryIndex ${params.boundaryIndex} is not one of them.`, {
          boundaryIndex: `Choose a boundary from 0 to ${results.boundaries.length - 1}`,
        });
      }
      const model = boundary.result.model;
      if (!model) throw invalidInput(`${boundary.label} has no fitted model to score with: ${boundary.result.modelNote ?? "no model was fitted"}`, { boundaryIndex: "This boundary has no fitted model" });

      // The run names each trait by key; the crosswalk pairs trait ids. Read values under the run's keys.
      const codebook = await loadCodebook(db, studyId);
      const keyOf = new Map(results.traits.map((t) => [t.traitId, t.key]));
      const traits = crosswalkTraits(codebook).map((t) => ({ ...t, key: keyOf.get(t.id) ?? t.key }));
      const pairedKeys = new Set(crosswalk.pairs.map((p) => keyOf.get(p.traitId)).filter(Boolean));
      const unpaired = model.encoding.traits.filter((t) => !pairedKeys.has(t.key));
      if (unpaired.length) {
        const names = unpaired.map((t) => t.label).join(", ");
        throw invalidInput(`The run's model needs ${names}; pair ${unpaired.length === 1 ? "a list column with it" : "list columns with them"} in the crosswalk of "${list.name}" first.`, {
          crosswalk: `No list column is paired with ${names}`,
        });
      }

      const species: ComparisonSpecies[] = listed.map((s) => ({ name: s.name, higherTaxon: s.higherTaxon, category: s.category, ...readSpeciesTraits(s.rawTraits, crosswalk, traits, { decimalComma }) }));
      const stateLabels = Object.fromEntries(traits.map((t) => [t.key, Object.fromEntries(t.states.map((s) => [s.code, s.label]))]));
      const compared = compareWithThreatList({ species, model, past: boundary.result.traits, options: { level: params.level, worthALookMin: params.worthALookMin }, stateLabels });
      const labelOf = new Map(traits.map((t) => [t.id, t]));
      const stored: ComparisonResults = {
        ...compared,
        run: { id: run.id, name: run.name, dataHash: run.dataHash, boundaryLabel: boundary.label, boundaryMa: boundary.boundaryMa, modelMethod: model.method, modelN: model.n },
        list: { id: list.id, name: list.name, speciesCount: list.speciesCount },
        crosswalk,
        crosswalkLabels: crosswalk.pairs.map((p) => ({ traitId: p.traitId, traitKey: labelOf.get(p.traitId)?.key ?? "", traitLabel: labelOf.get(p.traitId)?.label ?? "(deleted trait)", column: p.column })),
        cautions: [MODERN_COMPARISON_CAUTION, ...results.cautions],
      };
      const dataHash = hashData({ runId: run.id, runDataHash: run.dataHash, boundaryIndex: params.boundaryIndex, model: { coefficients: model.coefficients.map((c) => [c.name, c.estimate]), encoding: model.encoding }, crosswalk, species });
      const id = await db.transaction(async (tx) => {
        const [row] = await tx
          .insert(comparisons)
          .values({
            studyId,
            listId: list.id,
            runId: run.id,
            name: params.name,
            params: params as unknown as Record<string, unknown>,
            dataHash,
            results: stored as unknown as Record<string, unknown>,
            appVersion: APP_VERSION,
            createdBy: user.id,
          })
          .returning({ id: comparisons.id });
        await tx.insert(activity).values({
          studyId,
          userId: user.id,
          kind: "comparison.saved",
          summary: `Compared the run "${run.name}" with the modern list "${list.name}"${compared.roc ? `: AUC ${compared.roc.auc.toFixed(2)}` : ""}`,
          refType: "comparison",
          refId: row.id,
        });
        return row.id;
      });
      return get(studyId, id);
    },

    async list(studyId: string): Promise<ComparisonList> {
      const rows = await summaryQuery().where(eq(comparisons.studyId, studyId)).orderBy(desc(comparisons.createdAt), desc(comparisons.id));
      return { comparisons: rows.map(toSummary) };
    },

    get,

    async remove(studyId: string, comparisonId: string, user: { id: string }): Promise<void> {
      const found = await get(studyId, comparisonId);
      await db.transaction(async (tx) => {
        await tx.delete(comparisons).where(eq(comparisons.id, comparisonId));
        await tx.insert(activity).values({ studyId, userId: user.id, kind: "comparison.deleted", summary: `Deleted the comparison "${found.name}"`, refType: "comparison", refId: comparisonId });
      });
    },
  };
}
export type ComparisonService = ReturnType<typeof createComparisonService>;
