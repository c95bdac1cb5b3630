// The audit trail: listing coding decisions, the history of a taxon or of one cell, and reverts.
// A revert puts back the value a decision replaced, only while the value is still the one the
// decision wrote; it is itself a decision (action "revert"), so it can be reverted in turn.
import { and, count, desc, eq, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, DbOrTx, Transaction } from "../db";
import { codingDecisions, imports, taxa, traits, users } from "../../db/schema/index";
import { checkTraitValue, rangeProblem, sameValue } from "../../shared/csv/values";
import type { Decision, DecisionList, DecisionListQuery, RevertResult } from "../../shared/schemas/decisions";
import type { HistoryEntry, RangeEnd, TaxonHistory } from "../../shared/schemas/taxa";
import { detailedError, notFound } from "../domain/errors";
import { applySnapshot, fieldValue, setField, snapshotField, snapshotOf, type TaxonSnapshot, type TaxonState } from "./taxonModel";
import { loadCodebookById } from "./codebookStore";
import { lockTaxaById, writeTaxa } from "./taxaStore";
import { insertDecisions, lastSetters, newBatchId, recordActivity, type NewDecision } from "./decisionLog";

type DecisionRow = typeof codingDecisions.$inferSelect;

/** Conflicts listed in a refused revert; the count is always complete. */
const MAX_LISTED_CONFLICTS = 200;

type ConflictKind = "changed_since" | "already_reverted" | "not_revertible";

export interface RevertConflictEntry {
  kind: ConflictKind;
  decisionId: string;
  taxonId: string | null;
  taxonName: string | null;
  field: string;
  traitId: string | null;
  expectedValue: unknown;
  currentValue: unknown;
  message: string;
}

export interface RevertOptions {
  userId: string;
  reason: string;
  /** Carried by the revert decisions (an import's revert names the import). */
  importId?: string | null;
  /** Leave decisions whose value changed since alone instead of refusing the whole revert. */
  skipChanged: boolean;
  /** Decisions already undone (the value is back to what they replaced) are skipped quietly rather than refused. */
  skipUndone: boolean;
}

/**
 * Reverts decisions in one transaction, newest first. A value decision is revertible while the
 * field still holds the value it wrote; a taxon-level decision that brought a taxon in (create,
 * restore) is revertible while the taxon is as it was then, one that removed it while it is still
 * removed and its name is free. Conflicts refuse the whole revert unless `skipChanged`.
 */
export async function revertDecisions(tx: Transaction, studyId: string, decisions: DecisionRow[], opts: RevertOptions): Promise<RevertResult> {
  const ordered = [...decisions].sort((a, b) => b.createdAt.getTime() - a.createdAt.getTime());
  const taxonIds = [...new Set(ordered.map((d) => d.taxonId).filter((id): id is string => id !== null))];
  const states = new Map((await lockTaxaById(tx, studyId, taxonIds)).map((s) => [s.id, s]));
  const codebook = await loadCodebookById(tx, studyId);
  /** Why a value can no longer be put back (its state was removed, the trait changed kind), or null. */
  const codebookRefuses = (traitId: string, value: unknown): string | null => {
    if (value === null || value === undefined) return null;
    const trait = codebook.get(traitId);
    if (!trait) return "The trait of this value no longer exists.";
    // Retired traits keep their values, so a revert may put one back.
    const check = checkTraitValue({ ...trait, retired: false }, value);
    return check.ok ? null : `The codebook no longer allows this value: ${check.message}.`;
  };
  const conflicts: RevertConflictEntry[] = [];
  const undone: DecisionRow[] = [];
  const planned: NewDecision[] = [];
  const touched = new Set<TaxonState>();
  const batchId = newBatchId();
  // A removed taxon comes back only while no live taxon took its name (names are unique among live taxa).
  const restoreNames = ordered.filter((d) => d.field === "taxon" && d.newValue === null && d.oldValue).map((d) => (d.oldValue as TaxonSnapshot).name);
  const takenNames = new Set<string>();
  if (restoreNames.length) {
    const taken = await tx.execute(
      sql`SELECT name FROM taxa WHERE study_id = ${studyId} AND deleted_at IS NULL
          AND name IN (SELECT jsonb_array_elements_text(${JSON.stringify(restoreNames)}::jsonb))`,
    );
    for (const r of taken.rows as Array<{ name: string }>) takenNames.add(r.name);
  }

  for (const d of ordered) {
    const state = d.taxonId ? states.get(d.taxonId) : undefined;
    const conflict = (message: string, currentValue: unknown, kind: ConflictKind = "changed_since") =>
      conflicts.push({
        kind,
        decisionId: d.id,
        taxonId: d.taxonId,
        taxonName: state?.name ?? null,
        field: d.field,
        traitId: d.traitId,
        expectedValue: d.newValue,
        currentValue,
        message,
      });
    if (!state) {
      conflict("This decision is not about a taxon of the trait table; it cannot be reverted here.", null, "not_revertible");
      continue;
    }
    if (d.field === "outcome") {
      conflict("Outcome overrides are revoked on the Boundary screen, not reverted here.", null, "not_revertible");
      continue;
    }
    if (d.field === "taxon") {
      const broughtIn = d.newValue !== null;
      if (broughtIn) {
        if (state.deletedAt !== null) {
          if (opts.skipUndone) undone.push(d);
          else conflict(`${state.name} is already removed.`, null, "already_reverted");
          continue;
        }
        const now = snapshotOf(state);
        if (!sameValue(now, d.newValue)) {
          conflict(`${state.name} was edited after this decision; removing it would drop those edits.`, now);
          continue;
        }
        state.deletedAt = new Date();
        planned.push({ taxonId: state.id, field: "taxon", action: "revert", oldValue: now, newValue: null, reason: opts.reason, revertsId: d.id, importId: opts.importId, batchId });
      } else {
        if (state.deletedAt === null) {
          if (opts.skipUndone) undone.push(d);
          else conflict(`${state.name} is not removed.`, snapshotOf(state), "already_reverted");
          continue;
        }
        const snap = d.oldValue as TaxonSnapshot;
        const refused = Object.entries(snap.values ?? {})
          .map(([traitId, v]) => codebookRefuses(traitId, v))
          .find((m) => m !== null);
        if (refused) {
          conflict(`${snap.name} cannot come back as it was. ${refused}`, null, "not_revertible");
          continue;
        }
        if (takenNames.has(snap.name)) {
          conflict(`Another taxon named "${snap.name}" exists now; rename it before restoring this one.`, null);
          continue;
        }
        takenNames.add(snap.name);
        applySnapshot(state, snap);
        state.deletedAt = null;
        planned.push({ taxonId: state.id, field: "taxon", action: "revert", oldValue: null, newValue: snapshotOf(state), reason: opts.reason, revertsId: d.id, importId: opts.importId, batchId });
      }
      touched.add(state);
      continue;
    }
    if (state.deletedAt !== null) {
      conflict(`${state.name} is removed; restore it before reverting its values.`, null);
      continue;
    }
    const current = fieldValue(state, d.field);
    if (!sameValue(current, d.newValue)) {
      if (sameValue(current, d.oldValue) && opts.skipUndone) undone.push(d);
      else if (sameValue(current, d.oldValue)) conflict("The value is already what it was before this decision.", current, "already_reverted");
      else conflict("The value was changed after this decision.", current);
      continue;
    }
    const refused = d.traitId ? codebookRefuses(d.traitId, d.oldValue) : null;
    if (refused) {
      conflict(refused, current, "not_revertible");
      continue;
    }
    setField(state, d.field, d.oldValue);
    if (d.field === "fad" || d.field === "lad") {
      const problem = rangeProblem(fieldValue(state, "fad") as RangeEnd, fieldValue(state, "lad") as RangeEnd);
      if (problem) {
        setField(state, d.field, current);
        conflict(`Reverting would invert the range: ${problem}.`, current);
        continue;
      }
    }
    touched.add(state);
    planned.push({
      taxonId: state.id,
      traitId: d.traitId,
      field: d.field,
      action: "revert",
      oldValue: current,
      newValue: d.oldValue,
      reason: opts.reason,
      revertsId: d.id,
      importId: opts.importId,
      batchId,
    });
  }

  if (conflicts.length && !opts.skipChanged) {
    const listed = conflicts.slice(0, MAX_LISTED_CONFLICTS);
    const setters = await lastSetters(
      tx,
      listed.filter((c) => c.taxonId).map((c) => ({ taxonId: c.taxonId!, field: c.field })),
    );
    // The answer's code: the most telling kind among the conflicts.
    const code: ConflictKind = conflicts.some((c) => c.kind === "changed_since")
      ? "changed_since"
      : conflicts.some((c) => c.kind === "not_revertible")
        ? "not_revertible"
        : "already_reverted";
    throw detailedError("conflict",
      code,
      conflicts.length === 1
        ? `Nothing was reverted: ${conflicts[0].taxonName ? `${conflicts[0].taxonName}: ` : ""}${conflicts[0].message}`
        : `Nothing was reverted: ${conflicts.length} values changed since or cannot be reverted. Revert them one by one, or skip the changed ones.`,
      {
        conflicts: listed.map(({ kind: _kind, ...c }) => {
          const setter = c.taxonId ? setters.get(`${c.taxonId}|${c.field}`) : undefined;
          return { ...c, setBy: setter?.user ?? null, setAt: setter?.at ?? null };
        }),
        conflictCount: conflicts.length,
      },
    );
  }
  // With skipChanged, the decisions without conflicts apply; a conflicting one changed nothing.
  await writeTaxa(tx, [...touched], opts.userId);
  await insertDecisions(tx, studyId, opts.userId, planned);
  return { batchId, reverted: planned.length, skipped: conflicts.length + undone.length };
}

const REVERTED_BY = sql<string | null>`(SELECT r.id FROM coding_decisions r WHERE r.reverts_id = ${codingDecisions.id} ORDER BY r.created_at DESC LIMIT 1)`;

export function createDecisionService(db: Database) {
  const traitsAlias = alias(traits, "decision_trait");
  function toDecision(r: { d: DecisionRow; taxonName: string | null; traitKey: string | null; userName: string | null; revertedById: string | null }): Decision {
    return {
      id: r.d.id,
      taxonId: r.d.taxonId,
      taxonName: r.taxonName,
      traitId: r.d.traitId,
      traitKey: r.traitKey,
      field: r.d.field,
      action: r.d.action,
      oldValue: r.d.oldValue ?? null,
      newValue: r.d.newValue ?? null,
      reason: r.d.reason,
      user: r.d.userId ? { id: r.d.userId, name: r.userName ?? "" } : null,
      importId: r.d.importId,
      revertsId: r.d.revertsId,
      revertedById: r.revertedById,
      batchId: r.d.batchId,
      createdAt: r.d.createdAt.toISOString(),
    };
  }

  async function revertable(tx: DbOrTx, studyId: string, where: SQL): Promise<DecisionRow[]> {
    return tx.select().from(codingDecisions).where(and(eq(codingDecisions.studyId, studyId), where));
  }

  return {
    async list(studyId: string, q: DecisionListQuery): Promise<DecisionList> {
      const conditions = [eq(codingDecisions.studyId, studyId)];
      if (q.taxonId) conditions.push(eq(codingDecisions.taxonId, q.taxonId));
      if (q.traitId) conditions.push(eq(codingDecisions.traitId, q.traitId));
      if (q.importId) conditions.push(eq(codingDecisions.importId, q.importId));
      if (q.userId) conditions.push(eq(codingDecisions.userId, q.userId));
      if (q.batchId) conditions.push(eq(codingDecisions.batchId, q.batchId));
      const where = and(...conditions);
      const [rows, [{ total }]] = await Promise.all([
        db
          .select({ d: codingDecisions, taxonName: taxa.name, traitKey: traitsAlias.key, userName: users.name, revertedById: REVERTED_BY })
          .from(codingDecisions)
          .leftJoin(taxa, eq(taxa.id, codingDecisions.taxonId))
          .leftJoin(traitsAlias, eq(traitsAlias.id, codingDecisions.traitId))
          .leftJoin(users, eq(users.id, codingDecisions.userId))
          .where(where)
          .orderBy(desc(codingDecisions.createdAt), desc(codingDecisions.id))
          .limit(q.pageSize)
          .offset((q.page - 1) * q.pageSize),
        db.select({ total: count() }).from(codingDecisions).where(where),
      ]);
      return { rows: rows.map(toDecision), total, page: q.page, pageSize: q.pageSize };
    },

    /** Newest first; for one cell (traitId or field), taxon-level entries show that cell's value only. */
    async history(studyId: string, taxonId: string, q: { traitId?: string; field?: string }): Promise<TaxonHistory> {
      const [taxon] = await db.select({ id: taxa.id, name: taxa.name, deletedAt: taxa.deletedAt }).from(taxa).where(and(eq(taxa.id, taxonId), eq(taxa.studyId, studyId)));
      if (!taxon) throw notFound("Taxon not found in this study.");
      const cell = q.traitId ?? q.field ?? null;
      const conditions = [eq(codingDecisions.taxonId, taxonId), eq(codingDecisions.studyId, studyId)];
      if (cell) conditions.push(sql`(${codingDecisions.field} = ${cell} OR ${codingDecisions.field} = 'taxon')`);
      const rows = await db
        .select({ d: codingDecisions, userName: users.name, importFileName: imports.fileName })
        .from(codingDecisions)
        .leftJoin(users, eq(users.id, codingDecisions.userId))
        .leftJoin(imports, eq(imports.id, codingDecisions.importId))
        .where(and(...conditions))
        .orderBy(desc(codingDecisions.createdAt), desc(codingDecisions.id));
      const entries: HistoryEntry[] = [];
      for (const { d, userName, importFileName } of rows) {
        let oldValue: unknown = d.oldValue ?? null;
        let newValue: unknown = d.newValue ?? null;
        if (cell && d.field === "taxon") {
          oldValue = snapshotField(d.oldValue, cell);
          newValue = snapshotField(d.newValue, cell);
          // A taxon created or removed without a value in this cell says nothing about the cell.
          if (oldValue === null && newValue === null) continue;
        }
        entries.push({
          decisionId: d.id,
          field: d.field,
          traitId: d.traitId,
          action: d.action,
          oldValue,
          newValue,
          reason: d.reason,
          user: d.userId ? { id: d.userId, name: userName ?? "" } : null,
          importId: d.importId,
          importFileName: importFileName ?? null,
          revertsId: d.revertsId,
          batchId: d.batchId,
          createdAt: d.createdAt.toISOString(),
        });
      }
      return { taxonId, name: taxon.name, deleted: taxon.deletedAt !== null, entries };
    },

    async revert(studyId: string, decisionId: string, user: { id: string }, reason: string): Promise<RevertResult> {
      return db.transaction(async (tx) => {
        const rows = await revertable(tx, studyId, eq(codingDecisions.id, decisionId));
        if (rows.length === 0) throw notFound("Coding decision not found in this study.");
        return revertDecisions(tx, studyId, rows, { userId: user.id, reason, skipChanged: false, skipUndone: false });
      });
    },

    /** Reverts every decision of a bulk edit (or any batch) at once. */
    async revertBatch(studyId: string, batchId: string, user: { id: string }, reason: string): Promise<RevertResult> {
      return db.transaction(async (tx) => {
        const rows = await revertable(tx, studyId, eq(codingDecisions.batchId, batchId));
        if (rows.length === 0) throw notFound("No coding decisions of this study carry this batch id.");
        const result = await revertDecisions(tx, studyId, rows, { userId: user.id, reason, skipChanged: false, skipUndone: true });
        await recordActivity(tx, { studyId, userId: user.id, kind: "bulk.reverted", summary: `Reverted ${result.reverted} decisions of one edit: ${reason}`, refType: "batch", refId: result.batchId });
        return result;
      });
    },
  };
}
export type DecisionService = ReturnType<typeof createDecisionService>;
