// Taxa as stored rows: reading them into editable states (by id, by name, one at a time, locked or
// not), the row the API answers with (open threads included), and bulk writes of new and changed
// taxa (one statement per WRITE_CHUNK rows, so a 100,000-row import stays fast).
import { sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import type { TaxonRow, TraitValue } from "../../shared/schemas/taxa";
import { DomainError } from "../domain/errors";
import type { TaxonState } from "./taxonModel";
import { anyUuid, WRITE_CHUNK } from "./sqlHelpers";

const TAXON_COLUMNS = sql`t.id, t.name, t.higher_taxon, t.fad_ma, t.fad_interval, t.lad_ma, t.lad_interval, t.notes, t.trait_values, t.version, t.updated_at, t.deleted_at`;

export function stateFromRow(r: Record<string, unknown>): TaxonState {
  return {
    id: r.id as string,
    name: r.name as string,
    higherTaxon: r.higher_taxon as string,
    fadMa: r.fad_ma as number | null,
    fadInterval: r.fad_interval as string | null,
    ladMa: r.lad_ma as number | null,
    ladInterval: r.lad_interval as string | null,
    notes: r.notes as string,
    traitValues: (r.trait_values ?? {}) as Record<string, TraitValue>,
    version: r.version as number,
    updatedAt: new Date(r.updated_at as string),
    deletedAt: r.deleted_at ? new Date(r.deleted_at as string) : null,
  };
}

/** Live taxa of the study by id, in no particular order. */
export async function loadTaxaById(db: DbOrTx, studyId: string, ids: string[]): Promise<TaxonState[]> {
  if (ids.length === 0) return [];
  const res = await db.execute(sql`SELECT ${TAXON_COLUMNS} FROM taxa t WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL AND t.id = ${anyUuid(ids)}`);
  return res.rows.map(stateFromRow);
}

/** Taxa of the study by id, locked for update (removed ones too, for restores). */
export async function lockTaxaById(tx: DbOrTx, studyId: string, ids: string[]): Promise<TaxonState[]> {
  if (ids.length === 0) return [];
  const res = await tx.execute(sql`SELECT ${TAXON_COLUMNS} FROM taxa t WHERE t.study_id = ${studyId} AND t.id = ${anyUuid(ids)} ORDER BY t.id FOR UPDATE`);
  return res.rows.map(stateFromRow);
}

/**
 * Live taxa of the study by name, optionally locked for update. The study's names come from an
 * index-only scan and are matched here, which stays fast for a 100,000-name file on a new study.
 */
export async function taxaByName(tx: DbOrTx, studyId: string, names: string[], lock: boolean): Promise<TaxonState[]> {
  if (names.length === 0) return [];
  const live = await tx.execute(sql`SELECT t.id, t.name FROM taxa t WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL`);
  const wanted = new Set(names);
  const ids = (live.rows as Array<{ id: string; name: string }>).filter((r) => wanted.has(r.name)).map((r) => r.id);
  if (ids.length === 0) return [];
  const res = await tx.execute(
    sql`SELECT ${TAXON_COLUMNS} FROM taxa t WHERE t.study_id = ${studyId} AND t.deleted_at IS NULL AND t.id = ${anyUuid(ids)}
        ORDER BY t.id ${lock ? sql`FOR UPDATE` : sql``}`,
  );
  // A taxon renamed between the two reads no longer matches.
  return res.rows.map(stateFromRow).filter((s) => wanted.has(s.name));
}

export async function getTaxonState(tx: DbOrTx, studyId: string, taxonId: string, opts: { lock?: boolean; includeDeleted?: boolean } = {}): Promise<TaxonState | null> {
  const res = await tx.execute(
    sql`SELECT ${TAXON_COLUMNS} FROM taxa t WHERE t.id = ${taxonId} AND t.study_id = ${studyId}
        ${opts.includeDeleted ? sql`` : sql`AND t.deleted_at IS NULL`} ${opts.lock ? sql`FOR UPDATE` : sql``}`,
  );
  return res.rows[0] ? stateFromRow(res.rows[0]) : null;
}

export interface OpenThreads {
  count: number;
  traitIds: string[];
}

/** Open threads about each taxon or one of its values. */
export async function openThreadsFor(db: DbOrTx, studyId: string, taxonIds: string[]): Promise<Map<string, OpenThreads>> {
  const out = new Map<string, OpenThreads>();
  if (taxonIds.length === 0) return out;
  const res = await db.execute(
    sql`SELECT target_id, trait_id, target_type FROM threads
        WHERE study_id = ${studyId} AND status = 'open' AND target_type IN ('taxon', 'value') AND target_id = ${anyUuid(taxonIds)}`,
  );
  for (const r of res.rows as Array<{ target_id: string; trait_id: string | null; target_type: string }>) {
    const entry = out.get(r.target_id) ?? { count: 0, traitIds: [] };
    entry.count++;
    if (r.target_type === "value" && r.trait_id && !entry.traitIds.includes(r.trait_id)) entry.traitIds.push(r.trait_id);
    out.set(r.target_id, entry);
  }
  return out;
}

export function toTaxonRow(s: TaxonState, threads?: OpenThreads): TaxonRow {
  return {
    id: s.id,
    name: s.name,
    higherTaxon: s.higherTaxon,
    fadMa: s.fadMa,
    ladMa: s.ladMa,
    fadInterval: s.fadInterval,
    ladInterval: s.ladInterval,
    notes: s.notes,
    values: s.traitValues,
    version: s.version,
    updatedAt: s.updatedAt.toISOString(),
    openThreads: threads ?? { count: 0, traitIds: [] },
  };
}

export async function taxonRowOf(db: DbOrTx, studyId: string, s: TaxonState): Promise<TaxonRow> {
  return toTaxonRow(s, (await openThreadsFor(db, studyId, [s.id])).get(s.id));
}

const recordsOf = (states: TaxonState[]) =>
  states.map((s) => ({
    id: s.id,
    name: s.name,
    higher_taxon: s.higherTaxon,
    fad_ma: s.fadMa,
    fad_interval: s.fadInterval,
    lad_ma: s.ladMa,
    lad_interval: s.ladInterval,
    notes: s.notes,
    trait_values: s.traitValues,
    deleted_at: s.deletedAt?.toISOString() ?? null,
  }));

const RECORD_TYPE = sql`(id uuid, name text, higher_taxon text, fad_ma float8, fad_interval text, lad_ma float8, lad_interval text, notes text, trait_values jsonb, deleted_at timestamptz)`;

/** Inserts new taxa (version 1). */
export async function insertTaxa(tx: DbOrTx, studyId: string, states: TaxonState[], userId: string | null, onChunk?: (done: number) => Promise<void>): Promise<void> {
  for (let i = 0; i < states.length; i += WRITE_CHUNK) {
    const chunk = states.slice(i, i + WRITE_CHUNK);
    await tx.execute(sql`
      INSERT INTO taxa (id, study_id, name, higher_taxon, fad_ma, fad_interval, lad_ma, lad_interval, notes, trait_values, version, updated_by)
      SELECT u.id, ${studyId}, u.name, u.higher_taxon, u.fad_ma, u.fad_interval, u.lad_ma, u.lad_interval, u.notes, u.trait_values, 1, ${userId}
      FROM jsonb_to_recordset(${JSON.stringify(recordsOf(chunk))}::jsonb) AS u${RECORD_TYPE}`);
    await onChunk?.(chunk.length);
  }
  for (const s of states) s.version = 1;
}

/**
 * Inserts new taxa and, in the same statement, their "create" coding decisions, whose snapshot
 * PostgreSQL builds from the inserted rows (sending each snapshot again would double the data a
 * large import moves). Same snapshot shape as snapshotOf.
 */
export async function insertTaxaWithDecisions(
  tx: DbOrTx,
  studyId: string,
  states: TaxonState[],
  userId: string | null,
  decision: { reason: string; importId: string | null; batchId: string | null },
  onChunk?: (done: number) => Promise<void>,
): Promise<void> {
  for (let i = 0; i < states.length; i += WRITE_CHUNK) {
    const chunk = states.slice(i, i + WRITE_CHUNK);
    await tx.execute(sql`
      WITH added AS (
        INSERT INTO taxa (id, study_id, name, higher_taxon, fad_ma, fad_interval, lad_ma, lad_interval, notes, trait_values, version, updated_by)
        SELECT u.id, ${studyId}, u.name, u.higher_taxon, u.fad_ma, u.fad_interval, u.lad_ma, u.lad_interval, u.notes, u.trait_values, 1, ${userId}
        FROM jsonb_to_recordset(${JSON.stringify(recordsOf(chunk))}::jsonb) AS u${RECORD_TYPE}
        RETURNING id, name, higher_taxon, fad_ma, fad_interval, lad_ma, lad_interval, notes, trait_values
      )
      INSERT INTO coding_decisions (study_id, taxon_id, field, action, old_value, new_value, reason, user_id, import_id, batch_id, created_at)
      SELECT ${studyId}, a.id, 'taxon', 'create', NULL,
        jsonb_build_object(
          'name', a.name, 'higherTaxon', a.higher_taxon,
          'fad', CASE WHEN a.fad_ma IS NULL THEN NULL ELSE jsonb_build_object('ma', a.fad_ma, 'interval', a.fad_interval) END,
          'lad', CASE WHEN a.lad_ma IS NULL THEN NULL ELSE jsonb_build_object('ma', a.lad_ma, 'interval', a.lad_interval) END,
          'notes', a.notes, 'values', a.trait_values),
        ${decision.reason}, ${userId}, ${decision.importId}, ${decision.batchId}, clock_timestamp()
      FROM added a`);
    await onChunk?.(chunk.length * 2);
  }
  for (const s of states) s.version = 1;
}

/** Writes whole rows back, each one version up. */
export async function writeTaxa(tx: DbOrTx, states: TaxonState[], userId: string | null, onChunk?: (done: number) => Promise<void>): Promise<void> {
  for (let i = 0; i < states.length; i += WRITE_CHUNK) {
    const chunk = states.slice(i, i + WRITE_CHUNK);
    await tx.execute(sql`
      UPDATE taxa AS t SET name = u.name, higher_taxon = u.higher_taxon, fad_ma = u.fad_ma, fad_interval = u.fad_interval,
        lad_ma = u.lad_ma, lad_interval = u.lad_interval, notes = u.notes, trait_values = u.trait_values, deleted_at = u.deleted_at,
        version = t.version + 1, updated_at = now(), updated_by = ${userId}
      FROM jsonb_to_recordset(${JSON.stringify(recordsOf(chunk))}::jsonb) AS u${RECORD_TYPE}
      WHERE t.id = u.id`);
    await onChunk?.(chunk.length);
  }
  const now = new Date();
  for (const s of states) {
    s.version += 1;
    s.updatedAt = now;
  }
}

/** Postgres unique-violation code, raised when two writers add the same taxon name at once. */
export const isUniqueViolation = (err: unknown) => (err as { code?: string; cause?: { code?: string } })?.code === "23505" || (err as { cause?: { code?: string } })?.cause?.code === "23505";

/** The refusal when a taxon of the same name was added by another writer meanwhile. */
export const nameTakenMeanwhile = () => new DomainError("conflict", "name_taken", "A taxon of the same name was added meanwhile; preview again.");
