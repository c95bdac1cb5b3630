// What the trait-table services share: a taxon as an editable state (fields as the audit trail
// names them), the codebook as the value checks read it, and bulk writes of taxa and coding
// decisions (one statement per few thousand rows, so a 100,000-row import stays fast).
import { randomUUID } from "node:crypto";
import { and, asc, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "../db";
import { activity, traits } from "../../db/schema/index";
import type { CodebookTrait } from "../../shared/csv/values";
import type { RangeEnd, TaxonRow, TraitValue } from "../../shared/schemas/taxa";
import type { Trait } from "../../shared/schemas/traits";

/** A taxon as the services edit it: one object per row, fields as the audit trail names them. */
export interface TaxonState {
  id: string;
  name: string;
  higherTaxon: string;
  fadMa: number | null;
  fadInterval: string | null;
  ladMa: number | null;
  ladInterval: string | null;
  notes: string;
  traitValues: Record<string, TraitValue>;
  version: number;
  updatedAt: Date;
  deletedAt: Date | null;
}

/** A taxon not yet stored: a new id, version 1, nothing set but its name and higher taxon. */
export const newTaxonState = (name: string, higherTaxon = ""): TaxonState => ({
  id: randomUUID(),
  name,
  higherTaxon,
  fadMa: null,
  fadInterval: null,
  ladMa: null,
  ladInterval: null,
  notes: "",
  traitValues: {},
  version: 1,
  updatedAt: new Date(),
  deletedAt: null,
});

/** The value of a whole taxon in a coding decision (create, delete, restore). */
export interface TaxonSnapshot {
  name: string;
  higherTaxon: string;
  fad: RangeEnd;
  lad: RangeEnd;
  notes: string;
  values: Record<string, TraitValue>;
}

export const TAXON_FIELDS = ["name", "higherTaxon", "notes", "fad", "lad"] as const;
export type TaxonField = (typeof TAXON_FIELDS)[number];
export const isTaxonField = (f: string): f is TaxonField => (TAXON_FIELDS as readonly string[]).includes(f);

const rangeEnd = (ma: number | null, interval: string | null): RangeEnd => (ma === null ? null : { ma, interval });

/** The value of one field (a taxon column or a trait id) of a taxon; null when empty. */
export function fieldValue(s: TaxonState, field: string): unknown {
  switch (field) {
    case "name":
      return s.name;
    case "higherTaxon":
      return s.higherTaxon;
    case "notes":
      return s.notes;
    case "fad":
      return rangeEnd(s.fadMa, s.fadInterval);
    case "lad":
      return rangeEnd(s.ladMa, s.ladInterval);
    default:
      return s.traitValues[field] ?? null;
  }
}

/** Sets one field; null clears it (a trait value is then absent). */
export function setField(s: TaxonState, field: string, value: unknown): void {
  switch (field) {
    case "name":
      s.name = String(value);
      return;
    case "higherTaxon":
      s.higherTaxon = value === null ? "" : String(value);
      return;
    case "notes":
      s.notes = value === null ? "" : String(value);
      return;
    case "fad":
    case "lad": {
      const end = value as RangeEnd;
      if (field === "fad") [s.fadMa, s.fadInterval] = end ? [end.ma, end.interval] : [null, null];
      else [s.ladMa, s.ladInterval] = end ? [end.ma, end.interval] : [null, null];
      return;
    }
    default: {
      const values = { ...s.traitValues };
      if (value === null || value === undefined) delete values[field];
      else values[field] = value as TraitValue;
      s.traitValues = values;
    }
  }
}

/** Empty values need no reason to be filled in. */
export const isEmptyValue = (v: unknown) => v === null || v === undefined || v === "";

export function snapshotOf(s: TaxonState): TaxonSnapshot {
  return {
    name: s.name,
    higherTaxon: s.higherTaxon,
    fad: rangeEnd(s.fadMa, s.fadInterval),
    lad: rangeEnd(s.ladMa, s.ladInterval),
    notes: s.notes,
    values: { ...s.traitValues },
  };
}

/** The state a snapshot describes (for restoring a removed taxon). */
export function applySnapshot(s: TaxonState, snap: TaxonSnapshot): void {
  s.name = snap.name;
  s.higherTaxon = snap.higherTaxon;
  setField(s, "fad", snap.fad);
  setField(s, "lad", snap.lad);
  s.notes = snap.notes;
  s.traitValues = { ...snap.values };
}

/** One field's value inside a taxon-level decision's snapshot (for the history of one cell). */
export function snapshotField(snap: unknown, field: string): unknown {
  if (!snap || typeof snap !== "object") return null;
  const s = snap as Partial<TaxonSnapshot>;
  if (isTaxonField(field)) return (s as Record<string, unknown>)[field] ?? null;
  return s.values?.[field] ?? null;
}

// ---------------------------------------------------------------- reading

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

/** A JSON list as one query parameter (a text array would need a driver-specific form). */
export const jsonParam = (value: unknown) => sql`${JSON.stringify(value)}::jsonb`;
/**
 * `= ANY(uuid[])` for a list of ids in one parameter. Not `IN (SELECT ... jsonb_array_elements)`:
 * before a fresh table has statistics the planner made that a nested loop that unpacked the list
 * once per taxon of the study (280 ms for a page of 200 of the demo's 1,200 taxa, 0.5 ms this way).
 */
export const anyUuid = (ids: string[]) => sql`ANY(${`{${ids.join(",")}}`}::uuid[])`;

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

export type CodebookEntry = CodebookTrait & { sortOrder: number };

export function toTrait(row: typeof traits.$inferSelect): Trait {
  return {
    id: row.id,
    key: row.key,
    label: row.label,
    kind: row.kind,
    aspect: row.aspect,
    states: [...row.states].sort((a, b) => a.order - b.order),
    unit: row.unit,
    transform: row.transform,
    minValue: row.minValue,
    maxValue: row.maxValue,
    codingRule: row.codingRule,
    sortOrder: row.sortOrder,
    retired: row.retiredAt !== null,
    retiredAt: row.retiredAt?.toISOString() ?? null,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** The study's traits in codebook order, retired ones flagged. */
export async function loadCodebook(db: DbOrTx, studyId: string): Promise<Trait[]> {
  const rows = await db.select().from(traits).where(eq(traits.studyId, studyId)).orderBy(asc(traits.sortOrder), asc(traits.createdAt));
  return rows.map(toTrait);
}

/** The study's codebook keyed by trait id. */
export async function loadCodebookById(db: DbOrTx, studyId: string): Promise<Map<string, Trait>> {
  return new Map((await loadCodebook(db, studyId)).map((t) => [t.id, t]));
}

export async function loadTrait(db: DbOrTx, studyId: string, traitId: string): Promise<Trait | null> {
  const [row] = await db.select().from(traits).where(and(eq(traits.studyId, studyId), eq(traits.id, traitId)));
  return row ? toTrait(row) : null;
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

// ---------------------------------------------------------------- writing

/** Rows per bulk statement: a few MB of JSON, well inside what one statement handles quickly. */
export const WRITE_CHUNK = 5000;

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

export interface NewDecision {
  taxonId: string | null;
  traitId?: string | null;
  field: string;
  action: string;
  oldValue: unknown;
  newValue: unknown;
  reason: string;
  importId?: string | null;
  revertsId?: string | null;
  batchId?: string | null;
}

/**
 * Inserts coding decisions of one study and user. Each row takes the clock time of its insert,
 * so decisions written by one transaction still sort in the order they were made.
 */
export async function insertDecisions(tx: DbOrTx, studyId: string, userId: string | null, rows: NewDecision[], onChunk?: (done: number) => Promise<void>): Promise<void> {
  for (let i = 0; i < rows.length; i += WRITE_CHUNK) {
    const chunk = rows.slice(i, i + WRITE_CHUNK).map((d) => ({
      taxon_id: d.taxonId,
      trait_id: d.traitId ?? null,
      field: d.field,
      action: d.action,
      old_value: d.oldValue ?? null,
      new_value: d.newValue ?? null,
      reason: d.reason,
      import_id: d.importId ?? null,
      reverts_id: d.revertsId ?? null,
      batch_id: d.batchId ?? null,
    }));
    await tx.execute(sql`
      INSERT INTO coding_decisions (study_id, taxon_id, trait_id, field, action, old_value, new_value, reason, user_id, import_id, reverts_id, batch_id, created_at)
      SELECT ${studyId}, u.taxon_id, u.trait_id, u.field, u.action, u.old_value, u.new_value, u.reason, ${userId}, u.import_id, u.reverts_id, u.batch_id, clock_timestamp()
      FROM jsonb_to_recordset(${JSON.stringify(chunk)}::jsonb)
        AS u(taxon_id uuid, trait_id uuid, field text, action text, old_value jsonb, new_value jsonb, reason text, import_id uuid, reverts_id uuid, batch_id uuid)`);
    await onChunk?.(chunk.length);
  }
}

export async function recordActivity(
  tx: DbOrTx,
  entry: { studyId: string; userId: string | null; kind: string; summary: string; refType: string; refId: string },
): Promise<void> {
  await tx.insert(activity).values(entry);
}

export interface LastSetter {
  user: { id: string; name: string } | null;
  at: string | null;
  reason: string | null;
}

/**
 * Who last set each (taxon, field), from the audit trail: the newest decision of that field or
 * of the whole taxon (a create or restore sets every field); for the field "taxon", the newest
 * decision about the taxon at all.
 */
export async function lastSetters(db: DbOrTx, pairs: Array<{ taxonId: string; field: string }>): Promise<Map<string, LastSetter>> {
  const out = new Map<string, LastSetter>();
  if (pairs.length === 0) return out;
  const res = await db.execute(sql`
    SELECT DISTINCT ON (p.taxon_id, p.field) p.taxon_id, p.field, d.user_id, u.name AS user_name, d.created_at, d.reason
    FROM jsonb_to_recordset(${JSON.stringify(pairs.map((p) => ({ taxon_id: p.taxonId, field: p.field })))}::jsonb) AS p(taxon_id uuid, field text)
    JOIN coding_decisions d ON d.taxon_id = p.taxon_id AND (d.field = p.field OR d.field = 'taxon' OR p.field = 'taxon')
    LEFT JOIN users u ON u.id = d.user_id
    ORDER BY p.taxon_id, p.field, d.created_at DESC`);
  for (const r of res.rows as Array<Record<string, unknown>>) {
    out.set(`${r.taxon_id}|${r.field}`, {
      user: r.user_id ? { id: r.user_id as string, name: (r.user_name as string) ?? "" } : null,
      at: r.created_at ? new Date(r.created_at as string).toISOString() : null,
      reason: (r.reason as string) ?? null,
    });
  }
  return out;
}

export const newBatchId = () => randomUUID();

/** Postgres unique-violation code, raised when two writers add the same taxon name at once. */
export const isUniqueViolation = (err: unknown) => (err as { code?: string; cause?: { code?: string } })?.code === "23505" || (err as { cause?: { code?: string } })?.cause?.code === "23505";

export type { CodebookTrait };
