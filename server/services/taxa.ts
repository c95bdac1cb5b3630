// The trait table: a grid page with sorting and filtering done in the database, edits guarded by
// the row version (an edit based on an older version gets 409 with what is there now and who set
// it), bulk edits with one shared reason, and a coding decision for every change, written in the
// same transaction as the change.
import { randomUUID } from "node:crypto";
import { sql, type SQL } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { checkTraitValue, rangeProblem, resolveRangeEnd, sameValue } from "../../shared/csv/values";
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
import { BULK_FIELDS, TAXON_AGE_COLUMNS, TAXON_TEXT_COLUMNS } from "../../shared/schemas/taxa";
import type { Trait } from "../../shared/schemas/traits";
import { badRequest, HttpError, notFound } from "../http/errors";
import { DetailedHttpError } from "../http/detailed";
import {
  fieldValue,
  getTaxonState,
  insertDecisions,
  insertTaxa,
  isEmptyValue,
  isUniqueViolation,
  lastSetters,
  loadCodebook,
  lockTaxaById,
  newBatchId,
  openThreadsFor,
  recordActivity,
  setField,
  snapshotOf,
  stateFromRow,
  taxonRowOf,
  toTaxonRow,
  writeTaxa,
  type NewDecision,
  type TaxonState,
} from "./taxonState";

interface Person {
  id: string;
}

const nameTaken = (name: string) =>
  new HttpError(409, "name_taken", `A taxon named "${name}" already exists in this study; names are unique within a study.`, { name: "This name is already used in this study" });

const COLUMN_SQL: Record<string, SQL> = {
  name: sql`t.name`,
  higherTaxon: sql`t.higher_taxon`,
  notes: sql`t.notes`,
  fadInterval: sql`t.fad_interval`,
  ladInterval: sql`t.lad_interval`,
  fadMa: sql`t.fad_ma`,
  ladMa: sql`t.lad_ma`,
  updatedAt: sql`t.updated_at`,
};

/** `%` and `_` typed in a filter are literal characters, not wildcards. */
const likePattern = (text: string) => `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

function traitOf(codebook: Map<string, Trait>, id: string, what: string): Trait {
  const trait = codebook.get(id);
  if (!trait) throw badRequest(`${what}: no trait of this study has the id ${id}`, { [what]: "Unknown trait" });
  return trait;
}

/**
 * The sort key of a trait's value: the state's place in the codebook, or the number. Every write
 * path checks values against the codebook, so a numeric trait holds only numbers and the cast is
 * safe; it is much cheaper per row than comparing JSON values.
 */
function traitSortSql(trait: Trait): SQL {
  if (trait.kind === "numeric") return sql`(t.trait_values ->> ${trait.id})::float8`;
  const codes = trait.states.map((s) => s.code);
  return sql`array_position(ARRAY(SELECT jsonb_array_elements_text(${JSON.stringify(codes)}::jsonb)), t.trait_values ->> ${trait.id})`;
}

function filterSql(query: TaxaListQuery, codebook: Map<string, Trait>): SQL[] {
  const where: SQL[] = [];
  for (const f of query.filter) {
    const what = `filter ${f.column}:${f.op}`;
    if (f.column in COLUMN_SQL) {
      const col = COLUMN_SQL[f.column];
      const isText = (TAXON_TEXT_COLUMNS as readonly string[]).includes(f.column);
      const isAge = (TAXON_AGE_COLUMNS as readonly string[]).includes(f.column);
      if (f.op === "contains" && isText) where.push(sql`${col} ILIKE ${likePattern(f.value)}`);
      else if (f.op === "eq" && isText) where.push(sql`${col} = ${f.value}`);
      else if (f.op === "eq" && isAge) where.push(sql`${col} = ${Number(f.value)}`);
      else if (f.op === "min" && isAge) where.push(sql`${col} >= ${Number(f.value)}`);
      else if (f.op === "max" && isAge) where.push(sql`${col} <= ${Number(f.value)}`);
      else throw badRequest(`${what}: ${f.op} does not apply to ${f.column}`, { filter: `${f.op} does not apply to ${f.column}` });
      continue;
    }
    const trait = traitOf(codebook, f.column, "filter");
    if (trait.kind === "numeric") {
      const n = Number(f.value);
      if (!Number.isFinite(n)) throw badRequest(`${what}: ${trait.label} is numeric; give a number`, { filter: `${trait.label} takes a number` });
      // Containment can use the GIN index; a bound is a JSON path test, cheaper per row than comparing JSON values.
      if (f.op === "eq") where.push(sql`t.trait_values @> jsonb_build_object(${trait.id}::text, ${n}::float8)`);
      else if (f.op === "min" || f.op === "max") {
        const path = `$."${trait.id}" ? (@ ${f.op === "min" ? ">=" : "<="} ${JSON.stringify(n)})`;
        where.push(sql`t.trait_values @? ${path}::jsonpath`);
      } else throw badRequest(`${what}: ${trait.label} is numeric; use eq, min or max`, { filter: "Use eq, min or max on a numeric trait" });
    } else {
      if (f.op !== "eq") throw badRequest(`${what}: ${trait.label} has states; use eq with a state code`, { filter: "Use eq with a state code" });
      where.push(sql`t.trait_values @> jsonb_build_object(${trait.id}::text, ${f.value}::text)`);
    }
  }
  for (const column of query.missing) {
    if (column === "fad" || column === "fadMa") where.push(sql`t.fad_ma IS NULL`);
    else if (column === "lad" || column === "ladMa") where.push(sql`t.lad_ma IS NULL`);
    else if (column === "higherTaxon" || column === "notes") where.push(sql`${COLUMN_SQL[column]} = ''`);
    else if (column === "fadInterval" || column === "ladInterval") where.push(sql`${COLUMN_SQL[column]} IS NULL`);
    else if (column === "name" || column === "updatedAt") throw badRequest(`missing=${column}: every taxon has a ${column}`, { missing: `Every taxon has a ${column}` });
    else where.push(sql`NOT (t.trait_values ? ${traitOf(codebook, column, "missing").id})`);
  }
  if (query.hasOpenThread !== undefined) {
    const exists = sql`EXISTS (SELECT 1 FROM threads th WHERE th.study_id = t.study_id AND th.target_id = t.id AND th.target_type IN ('taxon', 'value') AND th.status = 'open')`;
    where.push(query.hasOpenThread ? exists : sql`NOT ${exists}`);
  }
  return where;
}

export function createTaxonService(db: Database) {
  /** Checks and resolves the changes of an edit against the codebook; unchanged fields are dropped. */
  function resolveChanges(
    state: TaxonState,
    changes: { name?: string; higherTaxon?: string; notes?: string; fad?: unknown; lad?: unknown; values?: Record<string, TraitValue | null> },
    codebook: Map<string, Trait>,
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
      const r = resolveRangeEnd(changes[end] as never, end);
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
    if (Object.keys(fields).length) throw badRequest(`Invalid changes: ${Object.values(fields).join("; ")}`, fields);
    return out;
  }

  /** 409 with, for each field of the edit, what it holds now and who set it when and why. */
  async function versionConflict(tx: DbOrTx, studyId: string, state: TaxonState, wanted: Array<{ field: string; traitId: string | null; yourValue: unknown }>) {
    const setters = await lastSetters(
      tx,
      wanted.map((w) => ({ taxonId: state.id, field: w.field })),
    );
    const row = await taxonRowOf(tx, studyId, state);
    return new DetailedHttpError(409, "version_conflict", `${state.name} was changed by someone else since you loaded it (now version ${state.version}). Compare the values and choose which to keep.`, {
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
      const codebook = new Map((await loadCodebook(db, studyId)).map((t) => [t.id, t]));
      const where = sql.join([sql`t.study_id = ${studyId}`, sql`t.deleted_at IS NULL`, ...filterSql(query, codebook)], sql` AND `);
      const sortKey = query.sort in COLUMN_SQL ? COLUMN_SQL[query.sort] : traitSortSql(traitOf(codebook, query.sort, "sort"));
      // Empty texts sort with the missing values, after everything else in both directions.
      const sortExpr = query.sort === "higherTaxon" || query.sort === "notes" ? sql`NULLIF(${sortKey}, '')` : sortKey;
      const dir = query.dir === "desc" ? sql`DESC` : sql`ASC`;
      const offset = (query.page - 1) * query.pageSize;
      const columns = sql`t.id, t.name, t.higher_taxon, t.fad_ma, t.fad_interval, t.lad_ma, t.lad_interval, t.notes, t.trait_values, t.version, t.updated_at, t.deleted_at`;
      const filtered = query.filter.length > 0 || query.missing.length > 0 || query.hasOpenThread !== undefined;
      let rows: Array<Record<string, unknown>>;
      let total: number;
      if (filtered) {
        // One pass over the matching rows keeps their ids and sort keys; the count and the page both
        // come from that narrow list, then only the page's rows are read whole. About half the work
        // of running the filter twice (once for the page, once for the count).
        const res = await db.execute(sql`
          WITH f AS MATERIALIZED (SELECT t.id, t.name, ${sortExpr} AS k FROM taxa t WHERE ${where}),
               p AS (SELECT f.id, f.k, f.name FROM f ORDER BY f.k ${dir} NULLS LAST, f.name, f.id LIMIT ${query.pageSize} OFFSET ${offset})
          SELECT (SELECT count(*) FROM f)::int AS total, ${columns}
          FROM (SELECT 1) AS one LEFT JOIN p ON true LEFT JOIN taxa t ON t.id = p.id
          ORDER BY p.k ${dir} NULLS LAST, p.name, p.id`);
        total = (res.rows[0] as { total: number }).total;
        rows = (res.rows as Array<Record<string, unknown>>).filter((r) => r.id !== null);
      } else {
        // Without a filter the name order comes from an index and the count from an index-only
        // scan; both run side by side on two connections.
        const order = query.sort === "name" ? sql`t.name ${dir}, t.id` : sql`${sortExpr} ${dir} NULLS LAST, t.name, t.id`;
        const [page, count] = await Promise.all([
          db.execute(sql`SELECT ${columns} FROM taxa t WHERE ${where} ORDER BY ${order} LIMIT ${query.pageSize} OFFSET ${offset}`),
          db.execute(sql`SELECT count(*)::int AS n FROM taxa t WHERE ${where}`),
        ]);
        rows = page.rows as Array<Record<string, unknown>>;
        total = (count.rows[0] as { n: number }).n;
      }
      const states = rows.map(stateFromRow);
      const threads = await openThreadsFor(
        db,
        studyId,
        states.map((s) => s.id),
      );
      return {
        rows: states.map((s) => toTaxonRow(s, threads.get(s.id))),
        total,
        page: query.page,
        pageSize: query.pageSize,
      };
    },

    async get(studyId: string, taxonId: string): Promise<TaxonRow> {
      const state = await getTaxonState(db, studyId, taxonId);
      if (!state) throw notFound("Taxon not found in this study.");
      return taxonRowOf(db, studyId, state);
    },

    async create(studyId: string, user: Person, input: TaxonCreateInput & { higherTaxon: string; notes: string; reason: string }): Promise<TaxonSaved> {
      try {
        return await db.transaction(async (tx) => {
          const codebook = new Map((await loadCodebook(tx, studyId)).map((t) => [t.id, t]));
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
          const changes = resolveChanges(state, { fad: input.fad ?? null, lad: input.lad ?? null, values: input.values ?? {} }, codebook);
          for (const c of changes) setField(state, c.field, c.to);
          const problem = rangeProblem(fieldValue(state, "fad") as RangeEnd, fieldValue(state, "lad") as RangeEnd);
          if (problem) throw badRequest(problem, { fad: problem });
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
          const codebook = new Map((await loadCodebook(tx, studyId)).map((t) => [t.id, t]));
          const resolved = resolveChanges(state, changes, codebook);
          if (resolved.length === 0) return { taxon: await taxonRowOf(tx, studyId, state), decisions: 0 };
          const replaced = resolved.filter((c) => !isEmptyValue(c.from));
          if (replaced.length && !input.reason) {
            const what = replaced.map((c) => (c.traitId ? codebook.get(c.traitId)!.label : c.field)).join(", ");
            throw badRequest(`A reason is required when an existing value is replaced or cleared (${what}).`, { reason: `Say why ${what} changes` });
          }
          if (changes.name !== undefined && changes.name !== state.name) {
            if ((await tx.execute(sql`SELECT 1 FROM taxa WHERE study_id = ${studyId} AND name = ${changes.name} AND deleted_at IS NULL AND id <> ${taxonId}`)).rows.length) {
              throw nameTaken(changes.name);
            }
          }
          for (const c of resolved) setField(state, c.field, c.to);
          const problem = rangeProblem(fieldValue(state, "fad") as RangeEnd, fieldValue(state, "lad") as RangeEnd);
          if (problem) throw badRequest(problem, { [changes.fad !== undefined ? "changes.fad" : "changes.lad"]: problem });
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
        const codebook = new Map((await loadCodebook(tx, studyId)).map((t) => [t.id, t]));
        const field = input.field;
        let value: unknown;
        let traitId: string | null = null;
        let what: string;
        if ((BULK_FIELDS as readonly string[]).includes(field)) {
          what = field === "fad" ? "first appearance" : field === "lad" ? "last appearance" : field === "higherTaxon" ? "higher taxon" : "notes";
          if (field === "fad" || field === "lad") {
            if (input.value !== null && (typeof input.value !== "object" || input.value === null)) throw badRequest(`${what} takes { ma } or { interval }`, { value: "Give { ma } or { interval }" });
            const r = resolveRangeEnd(input.value as never, field);
            if (!r.ok) throw badRequest(r.message, { value: r.message });
            value = r.value;
          } else {
            if (input.value !== null && typeof input.value !== "string") throw badRequest(`${what} takes a text`, { value: "Give a text" });
            value = ((input.value as string | null) ?? "").trim();
          }
        } else {
          const trait = codebook.get(field);
          if (!trait) throw badRequest(`field must be a trait id of this study or one of ${BULK_FIELDS.join(", ")}`, { field: "Unknown field" });
          what = trait.label;
          traitId = trait.id;
          if (input.value === null) {
            if (trait.retired) throw badRequest(`${trait.label} is retired: restore it in the codebook before editing its values`, { field: "Retired trait" });
            value = null;
          } else {
            const r = checkTraitValue(trait, input.value);
            if (!r.ok) throw badRequest(r.message, { value: r.message });
            value = r.value;
          }
        }
        const states = (await lockTaxaById(tx, studyId, input.taxonIds)).filter((s) => s.deletedAt === null);
        if (states.length !== input.taxonIds.length) {
          throw new HttpError(409, "selection_changed", `${input.taxonIds.length - states.length} of the selected taxa no longer exist in this study; reload and select again.`);
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
          throw badRequest(`The new ${what} would invert the range of ${rangeProblems.length} taxa: ${rangeProblems.slice(0, 5).join("; ")}${rangeProblems.length > 5 ? "; ..." : ""}`, {
            value: "Inverts some ranges",
          });
        }
        if (changed.length === 0) return { batchId: null, changed: 0, unchanged: states.length };
        await writeTaxa(tx, changed, user.id);
        await insertDecisions(tx, studyId, user.id, decisions);
        const shown = value === null ? "empty" : typeof value === "object" ? `${(value as { ma: number }).ma} Ma` : `"${value}"`;
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
