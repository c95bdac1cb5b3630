// The grid's filter, sort and count, answered from a per-process copy of each study's grid columns
// instead of a pass over the study's JSON trait values in PostgreSQL (about 100 ms per request at
// 100,000 taxa; a few ms here).
//
// The copy is never stale when a request is answered. It remembers the database snapshot it was
// read at; every request first asks the taxa_changes log (written by triggers in the changing
// transaction itself) which taxa were changed by transactions that snapshot cannot see, and reads
// those rows again, all inside one repeatable-read transaction whose snapshot becomes the copy's
// new one. So a change committed by any process before the request is in the answer, and a change
// not yet committed is not. Only page rows' ids come from the copy; their contents are read fresh.
import { sql } from "drizzle-orm";
import type { Database, DbOrTx } from "../db";
import { RepeatingTask } from "../jobs/repeatingTask";
import type { TaxaListQuery, TraitValue } from "../../shared/schemas/taxa";
import type { Trait } from "../../shared/schemas/traits";
import { anyUuid } from "./sqlHelpers";
import { emptyColumns, GridDerived, isOccurrenceColumn, pageOf, rowTest, type GridColumns, type OccurrenceCounts } from "./taxaGridQuery";

export interface TaxaGridOptions {
  /** Taxa kept in memory over all studies; the least recently used studies' copies go first. */
  maxTaxa?: number;
}

interface StudyCopy {
  columns: GridColumns;
  rowOf: Map<string, number>;
  liveCount: number;
  deadCount: number;
  derived: GridDerived;
  /** One instance of each repeated text. */
  texts: Map<string, string>;
  /** pg_current_snapshot() text and its xmin: every change the copy lacks comes from a transaction at or after xmin that this snapshot cannot see. */
  snapshot: string;
  snapshotXmin: string;
  syncedAt: number;
}

interface StudyEntry {
  studyId: string;
  copy: StudyCopy | null;
  running: Promise<void> | null;
  queued: Promise<void> | null;
  usedAt: number;
  /** Finds and collections per name, read when a page is sorted by them and the uploads changed since. */
  counts: OccurrenceCounts | null;
}

interface TaxonGridRow {
  id: string;
  name: string;
  higher_taxon: string;
  notes: string;
  fad_ma: number | null;
  lad_ma: number | null;
  fad_interval: string | null;
  lad_interval: string | null;
  updated: number;
  trait_values: Record<string, TraitValue> | null;
  removed: boolean;
}

/** When more than this share of a copy changed (or lies removed), it is read again whole. */
const RELOAD_SHARE = 0.25;
/** The log keeps six hours; a copy not synced for an hour is read again whole, well inside that. */
const LOG_KEEP = "6 hours";
const COPY_MAX_SILENCE_MS = 60 * 60 * 1000;
/** Copies nobody asked for in this long are dropped to free memory. */
const IDLE_DROP_MS = 30 * 60 * 1000;
const PRUNE_EVERY_MS = 10 * 60 * 1000;
/** Distinct texts shared per copy; beyond this (free-text values) rows keep their own. */
const MAX_SHARED_TEXTS = 20_000;

/**
 * Texts that repeat across taxa (states, higher taxa, intervals) are kept once: each row read from
 * the database brings its own copy, which for 100,000 taxa would double the memory.
 */
function sharedText<T extends string | null>(texts: Map<string, string>, text: T): T {
  if (text === null) return text;
  const known = texts.get(text) as T | undefined;
  if (known !== undefined) return known;
  if (texts.size < MAX_SHARED_TEXTS) texts.set(text, text);
  return text;
}

/** The statement's snapshot, and its xmin (below which every transaction is settled). */
const SNAPSHOT_COLUMNS = sql`pg_current_snapshot()::text AS snapshot, pg_snapshot_xmin(pg_current_snapshot())::text AS xmin`;

const GRID_COLUMNS = sql`t.id, t.name, t.higher_taxon, t.notes, t.fad_ma, t.lad_ma, t.fad_interval, t.lad_interval,
  extract(epoch FROM t.updated_at)::float8 AS updated, t.trait_values, t.deleted_at IS NOT NULL AS removed`;

export function createTaxaGrid(db: Database, options: TaxaGridOptions = {}) {
  const maxTaxa = options.maxTaxa ?? 500_000;
  const entries = new Map<string, StudyEntry>();

  /** Writes row `row` of the copy; `fresh`: the row was never written (its trait slots are all empty already). */
  function setRow(copy: StudyCopy, row: number, r: TaxonGridRow, fresh = false): void {
    const c = copy.columns;
    c.ids[row] = r.id;
    c.names[row] = r.name;
    c.higherTaxa[row] = sharedText(copy.texts, r.higher_taxon);
    c.notes[row] = r.notes;
    c.fadMa[row] = r.fad_ma ?? NaN;
    c.ladMa[row] = r.lad_ma ?? NaN;
    c.fadIntervals[row] = sharedText(copy.texts, r.fad_interval);
    c.ladIntervals[row] = sharedText(copy.texts, r.lad_interval);
    c.updatedAt[row] = r.updated;
    c.alive[row] = !r.removed;
    if (!fresh) for (const values of c.traitColumns.values()) values[row] = undefined;
    const traitValues = r.trait_values;
    if (!traitValues) return;
    for (const traitId in traitValues) {
      let values = c.traitColumns.get(traitId);
      if (!values) {
        values = new Array<TraitValue | undefined>(c.ids.length).fill(undefined);
        c.traitColumns.set(traitId, values);
      }
      const value = traitValues[traitId];
      values[row] = typeof value === "string" ? sharedText(copy.texts, value) : (value ?? undefined);
    }
  }

  function appendRow(copy: StudyCopy, r: TaxonGridRow): number {
    const row = copy.columns.ids.length;
    copy.columns.ids.push(r.id);
    for (const values of copy.columns.traitColumns.values()) values.push(undefined);
    setRow(copy, row, r);
    copy.rowOf.set(r.id, row);
    return row;
  }

  function buildCopy(rows: TaxonGridRow[], snapshot: string, snapshotXmin: string): StudyCopy {
    const columns = emptyColumns();
    const copy: StudyCopy = {
      columns,
      rowOf: new Map(),
      liveCount: rows.length,
      deadCount: 0,
      derived: new GridDerived(columns),
      texts: new Map(),
      snapshot,
      snapshotXmin,
      syncedAt: Date.now(),
    };
    // All rows at once: the ids first, so that each trait column is made at its full length when first
    // met, instead of growing by one slot per trait per row as appendRow does (a third of the first
    // read of a 100,000-taxon study).
    for (const r of rows) columns.ids.push(r.id);
    rows.forEach((r, row) => {
      setRow(copy, row, r, true);
      copy.rowOf.set(r.id, row);
    });
    return copy;
  }

  /** Applies re-read rows (changed, added or removed); the sorted orders take them in by merging. */
  function applyChanges(copy: StudyCopy, rows: TaxonGridRow[]): void {
    const touched: number[] = [];
    for (const r of rows) {
      const existing = copy.rowOf.get(r.id);
      if (existing === undefined) {
        if (r.removed) continue;
        touched.push(appendRow(copy, r));
        copy.liveCount++;
        continue;
      }
      const wasAlive = copy.columns.alive[existing];
      setRow(copy, existing, r);
      if (wasAlive && r.removed) {
        copy.liveCount--;
        copy.deadCount++;
      } else if (!wasAlive && !r.removed) {
        copy.liveCount++;
        copy.deadCount--;
      }
      touched.push(existing);
    }
    copy.derived.rowsChanged(touched);
  }

  /** The taxa changed by transactions the copy's snapshot cannot see, and the snapshot they were found at. */
  async function changesSince(conn: DbOrTx, studyId: string, copy: StudyCopy) {
    const res = await conn.execute(sql`SELECT ${SNAPSHOT_COLUMNS},
      ARRAY(SELECT DISTINCT taxon_id::text FROM taxa_changes
        WHERE study_id = ${studyId} AND txid >= ${copy.snapshotXmin}::bigint
          AND NOT pg_visible_in_snapshot(txid::text::xid8, ${copy.snapshot}::pg_snapshot)) AS changed`);
    return res.rows[0] as { snapshot: string; xmin: string; changed: string[] };
  }

  /** Brings the study's copy up to the database's latest committed state (or reads it whole). */
  async function sync(entry: StudyEntry): Promise<void> {
    const before = entry.copy;
    const mustReload = !before || before.deadCount > RELOAD_SHARE * before.columns.ids.length || Date.now() - before.syncedAt > COPY_MAX_SILENCE_MS;
    if (before && !mustReload) {
      // The usual case, nothing changed: one statement, whose snapshot becomes the copy's.
      const quick = await changesSince(db, entry.studyId, before);
      if (quick.changed.length === 0) {
        before.snapshot = quick.snapshot;
        before.snapshotXmin = quick.xmin;
        before.syncedAt = Date.now();
        return;
      }
    }
    // Changes (or no copy): find and read them under one snapshot, which becomes the copy's.
    const result = await db.transaction(
      async (tx) => {
        const whole = async () => {
          const [{ snapshot, xmin }] = (await tx.execute(sql`SELECT ${SNAPSHOT_COLUMNS}`)).rows as Array<{ snapshot: string; xmin: string }>;
          const rows = (await tx.execute(sql`SELECT ${GRID_COLUMNS} FROM taxa t WHERE t.study_id = ${entry.studyId} AND t.deleted_at IS NULL`)).rows;
          return { snapshot, xmin, rows: rows as unknown as TaxonGridRow[], whole: true };
        };
        const copy = entry.copy;
        if (!copy || mustReload) return whole();
        const { snapshot, xmin, changed } = await changesSince(tx, entry.studyId, copy);
        if (changed.length > RELOAD_SHARE * Math.max(copy.liveCount, 1)) return whole();
        const rows = changed.length
          ? ((await tx.execute(sql`SELECT ${GRID_COLUMNS} FROM taxa t WHERE t.study_id = ${entry.studyId} AND t.id = ${anyUuid(changed)}`)).rows as unknown as TaxonGridRow[])
          : [];
        // A taxon logged for this study but gone from it (deleted with its study) is removed from the copy.
        const found = new Set(rows.map((r) => r.id));
        for (const id of changed) if (!found.has(id) && copy.rowOf.has(id)) rows.push({ ...goneRow, id });
        return { snapshot, xmin, rows, whole: false };
      },
      { isolationLevel: "repeatable read", accessMode: "read only" },
    );
    // Applied in one synchronous step, so no request ever sees a half-updated copy.
    if (result.whole) {
      entry.copy = buildCopy(result.rows, result.snapshot, result.xmin);
      evictBeyondLimit(entry);
    } else {
      const copy = entry.copy!;
      if (result.rows.length) applyChanges(copy, result.rows);
      copy.snapshot = result.snapshot;
      copy.snapshotXmin = result.xmin;
      copy.syncedAt = Date.now();
    }
  }

  /**
   * One sync at a time per study. A request arriving while a sync runs waits for the next one,
   * which starts after it: the running sync's snapshot may predate what the request must see.
   */
  function current(entry: StudyEntry): Promise<void> {
    if (entry.queued) return entry.queued;
    if (entry.running) {
      entry.queued = entry.running
        .catch(() => undefined)
        .then(() => {
          entry.queued = null;
          return current(entry);
        });
      return entry.queued;
    }
    entry.running = sync(entry).finally(() => {
      entry.running = null;
    });
    return entry.running;
  }

  /** Taxa held in memory over all studies' copies. */
  function heldTaxa(): number {
    let total = 0;
    for (const e of entries.values()) total += e.copy?.columns.ids.length ?? 0;
    return total;
  }

  function evictBeyondLimit(keep: StudyEntry): void {
    let total = heldTaxa();
    const byAge = [...entries.values()].filter((e) => e !== keep && e.copy).sort((a, b) => a.usedAt - b.usedAt);
    for (const e of byAge) {
      if (total <= maxTaxa) break;
      total -= e.copy!.columns.ids.length;
      e.copy = null;
    }
  }

  /** Deletes log entries older than any copy can need and drops copies nobody has asked for lately. */
  async function prune(): Promise<void> {
    await db.execute(sql`DELETE FROM taxa_changes WHERE changed_at < now() - ${LOG_KEEP}::interval`);
    const now = Date.now();
    for (const [studyId, entry] of entries) {
      if (!entry.running && !entry.queued && now - entry.usedAt > IDLE_DROP_MS) entries.delete(studyId);
    }
  }

  const pruner = new RepeatingTask("grid copy pruning", prune, PRUNE_EVERY_MS);

  /**
   * The study's counts of finds and collections per taxon name, read again only when its occurrence uploads
   * changed. The signature lists every committed or reverted upload with its status: occurrence rows are
   * written and removed in the transaction that sets that status, and a revert is final, so a signature
   * never comes back and an order kept for it never goes stale.
   */
  async function occurrenceCounts(entry: StudyEntry): Promise<OccurrenceCounts> {
    const signatureOf = sql`SELECT coalesce(string_agg(id::text || ':' || status, ',' ORDER BY id), '') FROM imports
      WHERE study_id = ${entry.studyId} AND target = 'occurrences' AND status IN ('committed', 'reverted')`;
    const [{ signature }] = (await db.execute(sql`SELECT (${signatureOf}) AS signature`)).rows as Array<{ signature: string }>;
    if (entry.counts?.signature === signature) return entry.counts;
    const res = await db.transaction(
      (tx) =>
        tx.execute(sql`SELECT (${signatureOf}) AS signature, taxon, count(*)::int AS occurrences,
          count(DISTINCT collection) FILTER (WHERE collection <> '')::int AS collections
          FROM occurrences WHERE study_id = ${entry.studyId} GROUP BY taxon`),
      { isolationLevel: "repeatable read", accessMode: "read only" },
    );
    const rows = res.rows as Array<{ signature: string; taxon: string; occurrences: number; collections: number }>;
    const counts: OccurrenceCounts = {
      signature: rows[0]?.signature ?? signature,
      byName: new Map(rows.map((r) => [r.taxon, { occurrences: r.occurrences, collections: r.collections }])),
    };
    entry.counts = counts;
    return counts;
  }

  async function taxaWithOpenThreads(studyId: string): Promise<Set<string>> {
    const res = await db.execute(sql`SELECT DISTINCT target_id FROM threads WHERE study_id = ${studyId} AND status = 'open' AND target_type IN ('taxon', 'value')`);
    return new Set(res.rows.map((r) => (r as { target_id: string }).target_id));
  }

  return {
    /** The ids of one grid page, in order, and how many taxa pass the filters. */
    async page(studyId: string, query: TaxaListQuery, codebookSource: Map<string, Trait> | Promise<Map<string, Trait>>): Promise<{ ids: string[]; total: number }> {
      let entry = entries.get(studyId);
      if (!entry) {
        entry = { studyId, copy: null, running: null, queued: null, usedAt: Date.now(), counts: null };
        entries.set(studyId, entry);
      }
      entry.usedAt = Date.now();
      // The codebook, the open threads and the copy's sync are read side by side. A sync that
      // finishes first can only be overtaken by a later one, which is newer still.
      const [codebook, threads, counts] = await Promise.all([
        codebookSource,
        query.hasOpenThread === undefined ? null : taxaWithOpenThreads(studyId),
        isOccurrenceColumn(query.sort) ? occurrenceCounts(entry) : null,
        current(entry),
      ]);
      // A copy dropped for memory while this request waited is read again.
      while (!entry.copy) await current(entry);
      // From here to the return nothing waits, so the copy cannot change underneath.
      const copy = entry.copy;
      const test = rowTest(copy.columns, copy.derived, query, codebook, threads);
      const order = copy.derived.sortedOrder(query.sort, query.dir, codebook, counts);
      const { rows, total } = pageOf(order, test, copy.columns.ids.length, (query.page - 1) * query.pageSize, query.pageSize);
      return { ids: rows.map((row) => copy.columns.ids[row]), total };
    },

    prune,

    startPruning: () => pruner.start(),
    stopPruning: () => pruner.stop(),

    /** Taxa held in memory, for the bench and tests. */
    heldTaxa,
  };
}
export type TaxaGrid = ReturnType<typeof createTaxaGrid>;

const goneRow: TaxonGridRow = {
  id: "",
  name: "",
  higher_taxon: "",
  notes: "",
  fad_ma: null,
  lad_ma: null,
  fad_interval: null,
  lad_interval: null,
  updated: 0,
  trait_values: null,
  removed: true,
};
