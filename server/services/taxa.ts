// The trait table: a grid page (filtered, sorted and counted on the study's grid copy, see
// taxaGrid.ts; rows read fresh), edits guarded by the row version (an edit based on an older version gets 409 with what is there now and who set
// it), bulk edits with one shared reason, and a coding decision for every change, written in the
// same transaction as the change.
import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { checkTraitValue, rangeProblem, resolveRangeEnd, sameValue } from "../../shared/csv/values";
import { formatMa } from "../../shared/format/ages";
import type {
  RangeEnd,
  TaxaBulkEditInput,
  TaxaBulkResult,
  TaxaListQuery,
  TaxaPage,
  TaxonCreateInput,
  TaxonRow,
  TaxonSaved,
  TaxonUpdateInput,
  TraitValue,
} from "../../shared/schemas/taxa";
import { BULK_FIELDS, TAXA_MAX_BULK, taxonChangesSchema, type TaxaIds, type TaxaIdsQuery } from "../../shared/schemas/taxa";
import type { Trait } from "../../shared/schemas/traits";
import { detailedError, DomainError, invalidInput, notFound, validationFailed } from "../domain/errors";
import { fieldValue, isEmptyValue, setField, snapshotOf, type TaxonState } from "./taxonModel";
import { loadCodebookById } from "./codebookStore";
import { getTaxonState, insertTaxa, isUniqueViolation, loadTaxaById, lockTaxaById, openThreadsFor, taxonRowOf, toTaxonRow, writeTaxa } from "./taxaStore";
import { insertDecisions, lastSetters, newBatchId, recordActivity, type NewDecision } from "./decisionLog";
import { createTaxaGrid, type TaxaGrid } from "./taxaGrid";
import { studyIntervalLookup } from "./timeBins";
import type { IntervalLookup } from "../../shared/timebins/intervalLookup";
import { occurrenceCountsOf } from "./occurrenceCounts";

interface Person {
  id: string;
}

const nameTaken = (name: string) =>
  new DomainError("conflict", "name_taken", `A taxon named "${name}" already exists in this study; names are unique within a study.`, { name: "This name is already used in this study" });

export function createTaxonService(db: Database, grid: TaxaGrid = createTaxaGrid(db)) {
  /** Checks and resolves the changes of an edit against the codebook; unchanged fields are dropped. */
  function resolveChanges(
    state: TaxonState,
    changes: { name?: string; higherTaxon?: string; notes?: string; fad?: unknown; lad?: unknown; values?: Record<string, TraitValue | null> },
    codebook: Map<string, Trait>,
    intervals: IntervalLookup,
  ): Array<{ field: string; traitId: string | null; from: unknown; to: unknown }> {
    const out: Array<{ field: string; traitId: string | null; from: unknown; to: unknown }> = [];
    const fields: Record<string, string> = {};
    const add = (field: string, traitId: string | null, to: unknown) => {
      const from = fieldValue(state, field);
      if (!sameValue(from, to)) out.push({ field, traitId, from, to });
    };
    if (changes.name !== undefined) add("name", null, changes.name);
    if (changes.higherTaxon !== undefined) add("higherTaxon", null, changes.higherTaxon);
    if (changes.notes !== undefined) add("notes", null, changes.notes);
    for (const end of ["fad", "lad"] as const) {
      if (changes[end] === undefined) continue;
      const r = resolveRangeEnd(changes[end] as never, end, intervals);
      if (!r.ok) fields[`changes.${end}`] = r.message;
      else add(end, null, r.value);
    }
    for (const [traitId, value] of Object.entries(changes.values ?? {})) {
      const trait = codebook.get(traitId);
      if (!trait) {
        fields[`changes.values.${traitId}`] = "No trait of this study has this id";
        continue;
      }
      if (value === null) {
        if (trait.retired) fields[`changes.values.${traitId}`] = `${trait.label} is retired: restore it in the codebook before editing its values`;
        else add(traitId, traitId, null);
        continue;
      }
      const r = checkTraitValue(trait, value);
      if (!r.ok) fields[`changes.values.${traitId}`] = r.message;
      else add(traitId, traitId, r.value);
    }
    if (Object.keys(fields).length) throw validationFailed(`Invalid changes: ${Object.values(fields).join("; ")}`, fields);
    return out;
  }

  /** 409 with, for each field of the edit, what it holds now and who set it when and why. */
  async function versionConflict(tx: DbOrTx, studyId: string, state: TaxonState, wanted: Array<{ field: string; traitId: string | null; yourValue: unknown }>) {
    const setters = await lastSetters(
      tx,
      wanted.map((w) => ({ taxonId: state.id, field: w.field })),
    );
    const row = await taxonRowOf(tx, studyId, state);
    return detailedError("conflict", "version_conflict", `${state.name} was changed by someone else since you loaded it (now version ${state.version}). Compare the values and choose which to keep.`, {
      currentVersion: state.version,
      taxon: row,
      conflicts: wanted.map((w) => {
        const setter = setters.get(`${state.id}|${w.field}`);
        return {
          field: w.field,
          traitId: w.traitId,
          yourValue: w.yourValue,
          currentValue: fieldValue(state, w.field),
          setBy: setter?.user ?? null,
          setAt: setter?.at ?? null,
          reason: setter?.reason ?? null,
        };
      }),
    });
  }

  const service = {
    async list(studyId: string, query: TaxaListQuery): Promise<TaxaPage> {
      const codebook = loadCodebookById(db, studyId);
      // The filter, sort and count come from the study's grid copy; the page's rows are read fresh.
      const { ids, total } = await grid.page(studyId, query, codebook);
      const [rows, threads, counts] = await Promise.all([loadTaxaById(db, studyId, ids), openThreadsFor(db, studyId, ids), occurrenceCountsOf(db, studyId, ids)]);
      const found = new Map(rows.map((s) => [s.id, s]));
      const states = ids.map((id) => found.get(id)).filter((s): s is TaxonState => s !== undefined);
      return {
        rows: states.map((s) => ({ ...toTaxonRow(s, threads.get(s.id)), ...counts.get(s.id) })),
        total,
        page: query.page,
        pageSize: query.pageSize,
      };
    },

    /** Every taxon the filters match, for selecting them all at once (as many as one bulk edit takes). */
    async matchingIds(studyId: string, query: TaxaIdsQuery): Promise<TaxaIds> {
      const codebook = loadCodebookById(db, studyId);
      const { ids, total } = await grid.page(studyId, { ...query, page: 1, pageSize: TAXA_MAX_BULK }, codebook);
      if (total > TAXA_MAX_BULK) {
        throw invalidInput(`${total.toLocaleString("en-US")} taxa match; one bulk edit takes at most ${TAXA_MAX_BULK.toLocaleString("en-US")}. Narrow the filter.`, {
          filter: "Too many taxa match",
        });
      }
      return { ids, total };
    },

    async get(studyId: string, taxonId: string): Promise<TaxonRow> {
      const state = await getTaxonState(db, studyId, taxonId);
      if (!state) throw notFound("Taxon not found in this study.");
      return taxonRowOf(db, studyId, state);
    },

    async create(studyId: string, user: Person, input: TaxonCreateInput & { higherTaxon: string; notes: string; reason: string }): Promise<TaxonSaved> {
      try {
        return await db.transaction(async (tx) => {
          const codebook = await loadCodebookById(tx, studyId);
          const state: TaxonState = {
            id: randomUUID(),
            name: input.name,
            higherTaxon: input.higherTaxon,
            fadMa: null,
            fadInterval: null,
            ladMa: null,
            ladInterval: null,
            notes: input.notes,
            traitValues: {},
            version: 1,
            updatedAt: new Date(),
            deletedAt: null,
          };
          const changes = resolveChanges(state, { fad: input.fad ?? null, lad: input.lad ?? null, values: input.values ?? {} }, codebook, await studyIntervalLookup(tx, studyId));
          for (const c of changes) setField(state, c.field, c.to);
          const problem = rangeProblem(fieldValue(state, "fad") as RangeEnd, fieldValue(state, "lad") as RangeEnd);
          if (problem) throw invalidInput(problem, { fad: problem });
          if ((await tx.execute(sql`SELECT 1 FROM taxa WHERE study_id = ${studyId} AND name = ${state.name} AND deleted_at IS NULL`)).rows.length) throw nameTaken(state.name);
          await insertTaxa(tx, studyId, [state], user.id);
          await insertDecisions(tx, studyId, user.id, [{ taxonId: state.id, field: "taxon", action: "create", oldValue: null, newValue: snapshotOf(state), reason: input.reason ?? "" }]);
          const saved = await getTaxonState(tx, studyId, state.id);
          return { taxon: toTaxonRow(saved!), decisions: 1 };
        });
      } catch (err) {
        if (isUniqueViolation(err)) throw nameTaken(input.name);
        throw err;
      }
    },

    async update(studyId: string, taxonId: string, user: Person, input: TaxonUpdateInput & { reason: string }): Promise<TaxonSaved> {
      try {
        return await db.transaction(async (tx) => {
          const state = await getTaxonState(tx, studyId, taxonId, { lock: true });
          if (!state) throw notFound("Taxon not found in this study (it may have been removed).");
          const { changes } = input;
          if (state.version !== input.version) {
            const wanted: Array<{ field: string; traitId: string | null; yourValue: unknown }> = [];
            for (const f of ["name", "higherTaxon", "notes", "fad", "lad"] as const) {
              if (changes[f] !== undefined) wanted.push({ field: f, traitId: null, yourValue: changes[f] });
            }
            for (const [traitId, v] of Object.entries(changes.values ?? {})) wanted.push({ field: traitId, traitId, yourValue: v });
            throw await versionConflict(tx, studyId, state, wanted);
          }
          const codebook = await loadCodebookById(tx, studyId);
          const resolved = resolveChanges(state, changes, codebook, await studyIntervalLookup(tx, studyId));
          if (resolved.length === 0) return { taxon: await taxonRowOf(tx, studyId, state), decisions: 0 };
          const replaced = resolved.filter((c) => !isEmptyValue(c.from));
          if (replaced.length && !input.reason) {
            const what = replaced.map((c) => (c.traitId ? codebook.get(c.traitId)!.label : c.field)).join(", ");
            throw invalidInput(`A reason is required when an existing value is replaced or cleared (${what}).`, { reason: `Say why ${what} changes` });
          }
          if (changes.name !== undefined && changes.name !== state.name) {
            if ((await tx.execute(sql`SELECT 1 FROM taxa WHERE study_id = ${studyId} AND name = ${changes.name} AND deleted_at IS NULL AND id <> ${taxonId}`)).rows.length) {
              throw nameTaken(changes.name);
            }
          }
          for (const c of resolved) setField(state, c.field, c.to);
          const problem = rangeProblem(fieldValue(state, "fad") as RangeEnd, fieldValue(state, "lad") as RangeEnd);
          if (problem) throw invalidInput(problem, { [changes.fad !== undefined ? "changes.fad" : "changes.lad"]: problem });
          await writeTaxa(tx, [state], user.id);
          const batchId = resolved.length > 1 ? newBatchId() : null;
          await insertDecisions(
            tx,
            studyId,
            user.id,
            resolved.map((c) => ({ taxonId, traitId: c.traitId, field: c.field, action: "update", oldValue: c.from, newValue: c.to, reason: input.reason, batchId })),
          );
          const saved = await getTaxonState(tx, studyId, taxonId);
          return { taxon: await taxonRowOf(tx, studyId, saved!), decisions: resolved.length };
        });
      } catch (err) {
        if (isUniqueViolation(err) && input.changes.name) throw nameTaken(input.changes.name);
        throw err;
      }
    },

    /** Removes a taxon from the table; its history stays and a revert of the decision restores it. */
    async remove(studyId: string, taxonId: string, user: Person, input: { version: number; reason: string }): Promise<void> {
      await db.transaction(async (tx) => {
        const state = await getTaxonState(tx, studyId, taxonId, { lock: true });
        if (!state) throw notFound("Taxon not found in this study (it may have been removed already).");
        if (state.version !== input.version) throw await versionConflict(tx, studyId, state, []);
        const before = snapshotOf(state);
        state.deletedAt = new Date();
        await writeTaxa(tx, [state], user.id);
        await insertDecisions(tx, studyId, user.id, [{ taxonId, field: "taxon", action: "delete", oldValue: before, newValue: null, reason: input.reason }]);
      });
    },

    /** One value for a selection, one shared reason, one decision per changed taxon sharing a batch id. */
    async bulkEdit(studyId: string, user: Person, input: TaxaBulkEditInput): Promise<TaxaBulkResult> {
      return db.transaction(async (tx) => {
        const codebook = await loadCodebookById(tx, studyId);
        const field = input.field;
        let value: unknown;
        let traitId: string | null = null;
        let what: string;
        if ((BULK_FIELDS as readonly string[]).includes(field)) {
          what = field === "fad" ? "first appearance" : field === "lad" ? "last appearance" : field === "higherTaxon" ? "higher taxon" : "notes";
          if (field === "fad" || field === "lad") {
            if (input.value !== null && (typeof input.value !== "object" || input.value === null)) throw invalidInput(`${what} takes { ma } or { interval }`, { value: "Give { ma } or { interval }" });
            const r = resolveRangeEnd(input.value as never, field, await studyIntervalLookup(tx, studyId));
            if (!r.ok) throw invalidInput(r.message, { value: r.message });
            value = r.value;
          } else {
            if (input.value !== null && typeof input.value !== "string") throw invalidInput(`${what} takes a text`, { value: "Give a text" });
            // The same checks as a single edit of the field (length, one line for the higher taxon).
            const checked = taxonChangesSchema.safeParse({ [field]: (input.value as string | null) ?? "" });
            if (!checked.success) throw invalidInput(checked.error.issues[0].message, { value: checked.error.issues[0].message });
            value = checked.data[field as "higherTaxon" | "notes"];
          }
        } else {
          const trait = codebook.get(field);
          if (!trait) throw invalidInput(`field must be a trait id of this study or one of ${BULK_FIELDS.join(", ")}`, { field: "Unknown field" });
          what = trait.label;
          traitId = trait.id;
          if (input.value === null) {
            if (trait.retired) throw invalidInput(`${trait.label} is retired: restore it in the codebook before editing its values`, { field: "Retired trait" });
            value = null;
          } else {
            const r = checkTraitValue(trait, input.value);
            if (!r.ok) throw invalidInput(r.message, { value: r.message });
            value = r.value;
          }
        }
        const states = (await lockTaxaById(tx, studyId, input.taxonIds)).filter((s) => s.deletedAt === null);
        if (states.length !== input.taxonIds.length) {
          throw new DomainError("conflict", "selection_changed", `${input.taxonIds.length - states.length} of the selected taxa no longer exist in this study; reload and select again.`);
        }
        const changed: TaxonState[] = [];
        const decisions: NewDecision[] = [];
        const rangeProblems: string[] = [];
        const batchId = newBatchId();
        for (const s of states) {
          const from = fieldValue(s, field);
          if (sameValue(from, value)) continue;
          setField(s, field, value);
          const problem = rangeProblem(fieldValue(s, "fad") as RangeEnd, fieldValue(s, "lad") as RangeEnd);
          if (problem) {
            rangeProblems.push(`${s.name}: ${problem}`);
            continue;
          }
          changed.push(s);
          decisions.push({ taxonId: s.id, traitId, field, action: "update", oldValue: from, newValue: value, reason: input.reason, batchId });
        }
        if (rangeProblems.length) {
          throw invalidInput(`The new ${what} would invert the range of ${rangeProblems.length} taxa: ${rangeProblems.slice(0, 5).join("; ")}${rangeProblems.length > 5 ? "; ..." : ""}`, {
            value: "Inverts some ranges",
          });
        }
        if (changed.length === 0) return { batchId: null, changed: 0, unchanged: states.length };
        await writeTaxa(tx, changed, user.id);
        await insertDecisions(tx, studyId, user.id, decisions);
        const shown = value === null ? "empty" : typeof value === "object" ? formatMa((value as { ma: number }).ma) : `"${value}"`;
        await recordActivity(tx, {
          studyId,
          userId: user.id,
          kind: "bulk.edited",
          summary: `Set ${what} to ${shown} on ${changed.length} taxa: ${input.reason}`,
          refType: "batch",
          refId: batchId,
        });
        return { batchId, changed: changed.length, unchanged: states.length - changed.length };
      });
    },
  };
  return service;
}
export type TaxonService = ReturnType<typeof createTaxonService>;
