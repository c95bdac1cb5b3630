// Outcome overrides: a taxon's outcome set by hand (or from an imported outcome column), for one
// boundary or for any, each with its coding decision; revoking one falls back to the computed
// outcome. Writes of one study's overrides run one at a time, each in one transaction.
import { randomUUID } from "node:crypto";
import { and, asc, count, desc, eq, inArray, isNotNull, isNull, sql, type SQL } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Database, DbOrTx, Transaction } from "../db";
import { codingDecisions, outcomeOverrides, taxa, users } from "../../db/schema/index";
import type { BoundaryOutcome } from "../../shared/outcomes/index";
import type { OutcomeOverride } from "../../shared/schemas/outcomes";
import { conflict, DomainError, invalidInput } from "../domain/errors";

/** Two boundary ages closer than this (Myr, about nine hours) are the same boundary. */
const SAME_BOUNDARY_TOLERANCE = 1e-9;
/** Unknown names reported one by one in `fields` when a bulk request is refused. */
const MAX_REPORTED_ROWS = 1000;

interface SessionPerson {
  id: string;
}

/** An active override as the classification applies it. */
export type ActiveOverride = Pick<typeof outcomeOverrides.$inferSelect, "id" | "taxonId" | "boundaryMa" | "outcome" | "reason" | "source">;
const ACTIVE_OVERRIDE_COLUMNS = {
  id: outcomeOverrides.id,
  taxonId: outcomeOverrides.taxonId,
  boundaryMa: outcomeOverrides.boundaryMa,
  outcome: outcomeOverrides.outcome,
  reason: outcomeOverrides.reason,
  source: outcomeOverrides.source,
};

export function sameBoundary(a: number | null, b: number | null): boolean {
  if (a === null || b === null) return a === b;
  return Math.abs(a - b) <= SAME_BOUNDARY_TOLERANCE;
}

/** For each taxon, the override that applies at `boundary`: one set for this boundary wins over one set for any boundary; the newest wins among equals. */
function overridesAt(active: ActiveOverride[], boundary: number): Map<string, ActiveOverride> {
  const specific = new Map<string, ActiveOverride>();
  const general = new Map<string, ActiveOverride>();
  for (const o of active) {
    // `active` is oldest first, so a later row replaces an earlier one.
    if (o.boundaryMa === null) general.set(o.taxonId, o);
    else if (sameBoundary(o.boundaryMa, boundary)) specific.set(o.taxonId, o);
  }
  for (const [taxonId, o] of specific) general.set(taxonId, o);
  return general;
}

const boundarySql = (boundaryMa: number | null): SQL =>
  boundaryMa === null
    ? isNull(outcomeOverrides.boundaryMa)
    : sql`abs(${outcomeOverrides.boundaryMa} - ${boundaryMa}) <= ${SAME_BOUNDARY_TOLERANCE}`;

export function createOverrideStore(db: Database) {
  const creator = alias(users, "override_creator");
  const revoker = alias(users, "override_revoker");

  /** Overrides on one page, with who set and revoked them and the reason given at revocation. */
  async function describeOverrides(tx: DbOrTx, where: SQL, page?: { limit: number; offset: number }): Promise<OutcomeOverride[]> {
    const base = tx
      .select({ o: outcomeOverrides, taxonName: taxa.name, creatorName: creator.name, revokerName: revoker.name })
      .from(outcomeOverrides)
      .innerJoin(taxa, eq(taxa.id, outcomeOverrides.taxonId))
      .leftJoin(creator, eq(creator.id, outcomeOverrides.createdBy))
      .leftJoin(revoker, eq(revoker.id, outcomeOverrides.revokedBy))
      .where(where)
      .orderBy(desc(outcomeOverrides.createdAt), desc(outcomeOverrides.id));
    const rows = page ? await base.limit(page.limit).offset(page.offset) : await base;
    const revoked = rows.filter((r) => r.o.revokedAt);
    const revokedIds = revoked.map((r) => r.o.id);
    const revokeReasons = new Map<string, string>();
    if (revokedIds.length) {
      // Narrowed by taxon first (indexed), then matched on the override id kept in the decision's old value.
      const overrideIdSql = sql<string>`${codingDecisions.oldValue}->>'overrideId'`;
      const decisions = await tx
        .select({ overrideId: overrideIdSql, reason: codingDecisions.reason })
        .from(codingDecisions)
        .where(
          and(
            inArray(codingDecisions.taxonId, [...new Set(revoked.map((r) => r.o.taxonId))]),
            eq(codingDecisions.field, "outcome"),
            eq(codingDecisions.action, "revert"),
            inArray(overrideIdSql, revokedIds),
          ),
        );
      for (const d of decisions) revokeReasons.set(d.overrideId, d.reason);
    }
    return rows.map(({ o, taxonName, creatorName, revokerName }) => ({
      id: o.id,
      taxonId: o.taxonId,
      taxonName,
      outcome: o.outcome as BoundaryOutcome,
      boundaryMa: o.boundaryMa,
      reason: o.reason,
      source: o.source as "manual" | "import",
      active: o.revokedAt === null,
      createdAt: o.createdAt.toISOString(),
      createdBy: o.createdBy ? { id: o.createdBy, name: creatorName ?? "" } : null,
      revokedAt: o.revokedAt ? o.revokedAt.toISOString() : null,
      revokedBy: o.revokedBy ? { id: o.revokedBy, name: revokerName ?? "" } : null,
      revokeReason: o.revokedAt ? (revokeReasons.get(o.id) ?? null) : null,
    }));
  }

  // Override writes of one study run one at a time, so two people replacing the same taxon's
  // override cannot both see it active and leave two active overrides behind.
  async function lockStudyOverrides(tx: Transaction, studyId: string): Promise<void> {
    await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${"outcome_overrides:" + studyId}))`);
  }

  /**
   * Revokes the given active overrides, each with a 'revert' coding decision pointing at the decision
   * that set it. A few statements however many rows (the rows travel as one JSON parameter), so that a
   * large imported column is replaced quickly; no statement joins on a JSON field.
   */
  async function revokeRows(tx: Transaction, studyId: string, rows: ActiveOverride[], user: SessionPerson, reason: string, batchId: string): Promise<void> {
    if (!rows.length) return;
    const ids = JSON.stringify(rows.map((r) => r.id));
    // The decisions that set these overrides. Matching them by the JSON field in SQL can turn into a
    // nested loop (rows x decisions) on a large column, so they are read by taxon (few rows) or all at
    // once for the study (many rows) and matched here.
    const fewRows = rows.length <= 100;
    const taxonIds = `{${[...new Set(rows.map((r) => r.taxonId))].join(",")}}`;
    const setDecisions = await tx.execute<{ id: string; overrideId: string }>(sql`
      SELECT id, new_value->>'overrideId' AS "overrideId" FROM coding_decisions
      WHERE study_id = ${studyId}::uuid AND field = 'outcome' AND action = 'override'
        ${fewRows ? sql`AND taxon_id = ANY(${taxonIds}::uuid[])` : sql``}
    `);
    const setDecisionOf = new Map(setDecisions.rows.map((d) => [d.overrideId, d.id]));
    const decisions = rows.map((r) => ({
      taxonId: r.taxonId,
      revertsId: setDecisionOf.get(r.id) ?? null,
      oldValue: { overrideId: r.id, outcome: r.outcome, boundaryMa: r.boundaryMa, source: r.source },
    }));
    await tx.execute(sql`
      UPDATE outcome_overrides SET revoked_at = now(), revoked_by = ${user.id}::uuid
      WHERE study_id = ${studyId}::uuid AND id IN (SELECT jsonb_array_elements_text(${ids}::jsonb)::uuid)
    `);
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, field, action, old_value, new_value, reason, user_id, reverts_id, batch_id)
      SELECT ${studyId}::uuid, d."taxonId", 'outcome', 'revert', d."oldValue", NULL, ${reason}::text, ${user.id}::uuid, d."revertsId", ${batchId}::uuid
      FROM jsonb_to_recordset(${JSON.stringify(decisions)}::jsonb) AS d("taxonId" uuid, "revertsId" uuid, "oldValue" jsonb)
    `);
  }

  /** Active overrides of these taxa set for exactly this boundary (or, for null, for any boundary). */
  async function activeMatching(tx: Transaction, studyId: string, taxonIds: Set<string>, boundaryMa: number | null): Promise<ActiveOverride[]> {
    const rows = await tx
      .select(ACTIVE_OVERRIDE_COLUMNS)
      .from(outcomeOverrides)
      .where(and(eq(outcomeOverrides.studyId, studyId), isNull(outcomeOverrides.revokedAt), boundarySql(boundaryMa)));
    return rows.filter((r) => taxonIds.has(r.taxonId));
  }

  /** Writes new overrides (replacing active ones of the same taxa and boundary) and their coding decisions. */
  async function writeOverrides(
    tx: Transaction,
    studyId: string,
    user: SessionPerson,
    input: { boundaryMa: number | null; reason: string; source: "manual" | "import"; items: Array<{ taxonId: string; outcome: BoundaryOutcome }> },
  ): Promise<{ created: Array<{ id: string; taxonId: string }>; replaced: ActiveOverride[]; batchId: string }> {
    const batchId = randomUUID();
    const replaced = await activeMatching(tx, studyId, new Set(input.items.map((i) => i.taxonId)), input.boundaryMa);
    await revokeRows(tx, studyId, replaced, user, `Replaced by a newer override: ${input.reason}`, batchId);
    const replacedByTaxon = new Map(replaced.map((r) => [r.taxonId, r]));
    // Ids are made here so that the overrides and their decisions are written from the same rows, with no join.
    const items = input.items.map((i) => {
      const previous = replacedByTaxon.get(i.taxonId);
      return {
        id: randomUUID(),
        taxonId: i.taxonId,
        outcome: i.outcome,
        previous: previous ? { overrideId: previous.id, outcome: previous.outcome, boundaryMa: previous.boundaryMa, source: previous.source } : null,
      };
    });
    const itemsJson = JSON.stringify(items);
    await tx.execute(sql`
      INSERT INTO outcome_overrides (id, study_id, taxon_id, boundary_ma, outcome, reason, source, created_by)
      SELECT i.id, ${studyId}::uuid, i."taxonId", ${input.boundaryMa}::double precision, i.outcome, ${input.reason}::text, ${input.source}::text, ${user.id}::uuid
      FROM jsonb_to_recordset(${itemsJson}::jsonb) AS i(id uuid, "taxonId" uuid, outcome text)
    `);
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, field, action, old_value, new_value, reason, user_id, batch_id)
      SELECT ${studyId}::uuid, i."taxonId", 'outcome', 'override', i.previous,
        jsonb_build_object('overrideId', i.id, 'outcome', i.outcome, 'boundaryMa', ${input.boundaryMa}::double precision, 'source', ${input.source}::text),
        ${input.reason}::text, ${user.id}::uuid, ${batchId}::uuid
      FROM jsonb_to_recordset(${itemsJson}::jsonb) AS i(id uuid, "taxonId" uuid, outcome text, previous jsonb)
    `);
    const created = items.map((i) => ({ id: i.id, taxonId: i.taxonId }));
    return { created, replaced, batchId };
  }

  return {
    /** For each taxon of the study, the active override that applies at `boundary` (see overridesAt). */
    async activeAt(studyId: string, boundary: number): Promise<Map<string, ActiveOverride>> {
      const activeRows = await db
        .select(ACTIVE_OVERRIDE_COLUMNS)
        .from(outcomeOverrides)
        .where(and(eq(outcomeOverrides.studyId, studyId), isNull(outcomeOverrides.revokedAt)))
        .orderBy(asc(outcomeOverrides.createdAt), asc(outcomeOverrides.id));
      return overridesAt(activeRows, boundary);
    },

    async listOverrides(studyId: string, query: { status: "active" | "revoked" | "all"; page: number; pageSize: number }) {
      const conditions = [eq(outcomeOverrides.studyId, studyId)];
      if (query.status === "active") conditions.push(isNull(outcomeOverrides.revokedAt));
      if (query.status === "revoked") conditions.push(isNotNull(outcomeOverrides.revokedAt));
      const where = and(...conditions)!;
      const [{ total }] = await db.select({ total: count() }).from(outcomeOverrides).where(where);
      const overrides = await describeOverrides(db, where, { limit: query.pageSize, offset: (query.page - 1) * query.pageSize });
      return { total, page: query.page, pageSize: query.pageSize, overrides };
    },

    /** Sets one taxon's outcome by hand; an active override of the same taxon and boundary is revoked and replaced. */
    async createOverride(studyId: string, user: SessionPerson, input: { taxonId: string; outcome: BoundaryOutcome; boundaryMa: number | null; reason: string }) {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const [taxon] = await tx
          .select({ id: taxa.id })
          .from(taxa)
          .where(and(eq(taxa.id, input.taxonId), eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
        if (!taxon) throw new DomainError("not_found", "not_found", "This study has no such taxon (it may have been deleted).", { taxonId: "No such taxon in this study" });
        const { created, replaced } = await writeOverrides(tx, studyId, user, {
          boundaryMa: input.boundaryMa,
          reason: input.reason,
          source: "manual",
          items: [{ taxonId: taxon.id, outcome: input.outcome }],
        });
        const [override] = await describeOverrides(tx, eq(outcomeOverrides.id, created[0].id));
        return { override, replacedOverrideId: replaced[0]?.id ?? null };
      });
    },

    /** Revokes an override: the taxon's outcome falls back to the computed one (or to an override set for any boundary). */
    async revokeOverride(studyId: string, overrideId: string, user: SessionPerson, reason: string): Promise<OutcomeOverride> {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const [row] = await tx
          .select()
          .from(outcomeOverrides)
          .where(and(eq(outcomeOverrides.id, overrideId), eq(outcomeOverrides.studyId, studyId)));
        if (!row) throw new DomainError("not_found", "not_found", "This study has no such override.");
        if (row.revokedAt) throw conflict(`This override was already revoked on ${row.revokedAt.toISOString().slice(0, 10)}.`);
        await revokeRows(tx, studyId, [row], user, reason, randomUUID());
        const [override] = await describeOverrides(tx, eq(outcomeOverrides.id, row.id));
        return override;
      });
    },

    /**
     * Applies an imported outcome column: one override per row, in one transaction. Refuses the whole
     * column, naming each row, when a name is not a taxon of the study or appears twice.
     */
    async bulkOverride(
      studyId: string,
      user: SessionPerson,
      input: { boundaryMa: number | null; reason: string; items: Array<{ taxonName: string; outcome: BoundaryOutcome }> },
    ) {
      return db.transaction(async (tx) => {
        await lockStudyOverrides(tx, studyId);
        const known = await tx
          .select({ id: taxa.id, name: taxa.name })
          .from(taxa)
          .where(and(eq(taxa.studyId, studyId), isNull(taxa.deletedAt)));
        const idByName = new Map(known.map((t) => [t.name, t.id]));
        const rowOfName = new Map<string, number>();
        const fields: Record<string, string> = {};
        const badRows: number[] = [];
        input.items.forEach((item, i) => {
          const id = idByName.get(item.taxonName);
          const earlier = rowOfName.get(item.taxonName);
          let problem: string | null = null;
          if (!id) problem = `Row ${i + 1}: this study has no taxon named "${item.taxonName}"`;
          else if (earlier !== undefined) problem = `Row ${i + 1}: "${item.taxonName}" is also on row ${earlier + 1}; give each taxon once`;
          else rowOfName.set(item.taxonName, i);
          if (problem) {
            badRows.push(i + 1);
            if (badRows.length <= MAX_REPORTED_ROWS) fields[`items.${i}.taxonName`] = problem;
          }
        });
        if (badRows.length) {
          const shown = badRows.slice(0, 10).join(", ");
          throw invalidInput(
            `${badRows.length} row${badRows.length === 1 ? "" : "s"} of the outcome column name no taxon of this study, or name one twice ` +
              `(row${badRows.length === 1 ? "" : "s"} ${shown}${badRows.length > 10 ? ", ..." : ""}). Nothing was applied.`,
            fields,
          );
        }
        const { created, replaced, batchId } = await writeOverrides(tx, studyId, user, {
          boundaryMa: input.boundaryMa,
          reason: input.reason,
          source: "import",
          items: input.items.map((item) => ({ taxonId: idByName.get(item.taxonName)!, outcome: item.outcome })),
        });
        return { created: created.length, replaced: replaced.length, batchId };
      });
    },
  };
}
export type OverrideStore = ReturnType<typeof createOverrideStore>;
