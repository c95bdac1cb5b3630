// Filtering and sorting the trait table's grid on an in-memory copy of a study's columns (see
// taxaGrid.ts for how the copy is kept current). Functions over arrays, and GridDerived, which
// keeps what they derive (sorted orders, lower-cased texts) current: a page is one pass over a
// sorted order of the study's live rows, testing each row against the filters, so a filter and a
// sort on 100,000 taxa cost a few milliseconds however many rows match.
//
// The semantics are those the grid promises (and the API tests hold): missing values sort last in
// both directions, ties by name then id; text filters are case-blind substrings with no wildcards;
// numeric bounds are inclusive; a state sort follows the codebook's order of states. Text compares
// by code units, as the C collation the bundled PostgreSQL cluster uses does for everyday text.
import type { TaxaColumnFilter, TaxaListQuery, TraitValue } from "../../shared/schemas/taxa";
import { TAXON_AGE_COLUMNS, TAXON_OCCURRENCE_COLUMNS, TAXON_TEXT_COLUMNS } from "../../shared/schemas/taxa";
import type { Trait } from "../../shared/schemas/traits";
import { invalidInput } from "../domain/errors";

/** One study's grid columns, row-aligned; removed rows stay as holes (alive false) until a reload. */
export interface GridColumns {
  ids: string[];
  names: string[];
  higherTaxa: string[];
  notes: string[];
  /** Ages in Ma; NaN where unknown. */
  fadMa: number[];
  ladMa: number[];
  fadIntervals: Array<string | null>;
  ladIntervals: Array<string | null>;
  /** Seconds since the epoch, to the microsecond. */
  updatedAt: number[];
  traitColumns: Map<string, Array<TraitValue | undefined>>;
  alive: boolean[];
}

type TextColumn = (typeof TAXON_TEXT_COLUMNS)[number];
type AgeColumn = (typeof TAXON_AGE_COLUMNS)[number];
export type OccurrenceColumn = (typeof TAXON_OCCURRENCE_COLUMNS)[number];

const isTextColumn = (c: string): c is TextColumn => (TAXON_TEXT_COLUMNS as readonly string[]).includes(c);
const isAgeColumn = (c: string): c is AgeColumn => (TAXON_AGE_COLUMNS as readonly string[]).includes(c);
export const isOccurrenceColumn = (c: string): c is OccurrenceColumn => (TAXON_OCCURRENCE_COLUMNS as readonly string[]).includes(c);

/**
 * Finds and distinct collections per taxon name, from the study's occurrences. They change with
 * occurrence uploads, not with the taxa, so they live beside the copy: `signature` names the committed
 * uploads they were counted from, and a sorted order by them is kept per signature.
 */
export interface OccurrenceCounts {
  signature: string;
  byName: Map<string, { occurrences: number; collections: number }>;
}

export function emptyColumns(): GridColumns {
  return {
    ids: [],
    names: [],
    higherTaxa: [],
    notes: [],
    fadMa: [],
    ladMa: [],
    fadIntervals: [],
    ladIntervals: [],
    updatedAt: [],
    traitColumns: new Map(),
    alive: [],
  };
}

function textColumn(columns: GridColumns, column: TextColumn): ReadonlyArray<string | null> {
  switch (column) {
    case "name":
      return columns.names;
    case "higherTaxon":
      return columns.higherTaxa;
    case "notes":
      return columns.notes;
    case "fadInterval":
      return columns.fadIntervals;
    case "ladInterval":
      return columns.ladIntervals;
  }
}

const ageColumn = (columns: GridColumns, column: AgeColumn): number[] => (column === "fadMa" ? columns.fadMa : columns.ladMa);

/** A trait's values, as a column as long as the copy (absent until some taxon holds a value). */
export function traitColumn(columns: GridColumns, traitId: string): ReadonlyArray<TraitValue | undefined> {
  return columns.traitColumns.get(traitId) ?? new Array<undefined>(columns.ids.length);
}

const compareText = (a: string, b: string): number => (a < b ? -1 : a > b ? 1 : 0);
const lowerOrNull = (v: string | null): string | null => (v === null ? null : v.toLowerCase());

function traitOf(codebook: Map<string, Trait>, id: string, what: string): Trait {
  const trait = codebook.get(id);
  if (!trait) throw invalidInput(`${what}: no trait of this study has the id ${id}`, { [what]: "Unknown trait" });
  return trait;
}

export type RowTest = (row: number) => boolean;

/**
 * The test a row must pass to be listed: every filter, every "missing" column and the open-thread
 * condition at once. Refuses filters that do not apply to their column, naming them.
 */
export function rowTest(
  columns: GridColumns,
  derived: GridDerived,
  query: Pick<TaxaListQuery, "filter" | "missing" | "hasOpenThread">,
  codebook: Map<string, Trait>,
  taxaWithOpenThreads: ReadonlySet<string> | null,
): RowTest {
  const tests: RowTest[] = [];
  for (const f of query.filter) tests.push(filterTest(columns, derived, f, codebook));
  for (const column of query.missing) tests.push(missingTest(columns, column, codebook));
  if (query.hasOpenThread !== undefined) {
    if (!taxaWithOpenThreads) throw new Error("rowTest: the open-thread filter needs the taxa with open threads");
    const wanted = query.hasOpenThread;
    const { ids } = columns;
    tests.push((row) => taxaWithOpenThreads.has(ids[row]) === wanted);
  }
  if (tests.length === 0) return () => true;
  if (tests.length === 1) return tests[0];
  return (row) => {
    for (const test of tests) if (!test(row)) return false;
    return true;
  };
}

function filterTest(columns: GridColumns, derived: GridDerived, f: TaxaColumnFilter, codebook: Map<string, Trait>): RowTest {
  const what = `filter ${f.column}:${f.op}`;
  const notApplicable = () => invalidInput(`${what}: ${f.op} does not apply to ${f.column}`, { filter: `${f.op} does not apply to ${f.column}` });
  if (isTextColumn(f.column)) {
    const values = textColumn(columns, f.column);
    if (f.op === "eq") return (row) => values[row] === f.value;
    if (f.op !== "contains") throw notApplicable();
    // Case-blind substring; % and _ are ordinary characters.
    const lower = derived.lowerCased(f.column);
    const needle = f.value.toLowerCase();
    return (row) => {
      const v = lower[row];
      return v !== null && v.includes(needle);
    };
  }
  if (isAgeColumn(f.column)) {
    const ages = ageColumn(columns, f.column);
    const n = Number(f.value);
    if (f.op === "contains") throw notApplicable();
    if (!Number.isFinite(n)) throw invalidInput(`${what}: ${f.column} is an age in Ma; give a number`, { filter: `${f.column} takes a number` });
    if (f.op === "eq") return (row) => ages[row] === n;
    if (f.op === "min") return (row) => ages[row] >= n;
    return (row) => ages[row] <= n;
  }
  if (f.column === "updatedAt" || isOccurrenceColumn(f.column)) throw notApplicable();
  const trait = traitOf(codebook, f.column, "filter");
  const values = traitColumn(columns, trait.id);
  if (trait.kind === "numeric") {
    const n = Number(f.value);
    if (!Number.isFinite(n)) throw invalidInput(`${what}: ${trait.label} is numeric; give a number`, { filter: `${trait.label} takes a number` });
    if (f.op === "eq") return (row) => values[row] === n;
    if (f.op === "min") return (row) => typeof values[row] === "number" && (values[row] as number) >= n;
    if (f.op === "max") return (row) => typeof values[row] === "number" && (values[row] as number) <= n;
    throw invalidInput(`${what}: ${trait.label} is numeric; use eq, min or max`, { filter: "Use eq, min or max on a numeric trait" });
  }
  if (f.op !== "eq") throw invalidInput(`${what}: ${trait.label} has states; use eq with a state code`, { filter: "Use eq with a state code" });
  return (row) => values[row] === f.value;
}

function missingTest(columns: GridColumns, column: string, codebook: Map<string, Trait>): RowTest {
  if (column === "fad" || column === "fadMa") return (row) => Number.isNaN(columns.fadMa[row]);
  if (column === "lad" || column === "ladMa") return (row) => Number.isNaN(columns.ladMa[row]);
  if (column === "higherTaxon") return (row) => columns.higherTaxa[row] === "";
  if (column === "notes") return (row) => columns.notes[row] === "";
  if (column === "fadInterval") return (row) => columns.fadIntervals[row] === null;
  if (column === "ladInterval") return (row) => columns.ladIntervals[row] === null;
  if (isOccurrenceColumn(column)) throw invalidInput(`missing=${column}: every taxon has a count of ${column} (0 without any)`, { missing: `Every taxon has a count of ${column}` });
  if (column === "name" || column === "updatedAt") throw invalidInput(`missing=${column}: every taxon has a ${column}`, { missing: `Every taxon has a ${column}` });
  const values = traitColumn(columns, traitOf(codebook, column, "missing").id);
  return (row) => values[row] === undefined;
}

const byName =
  ({ names, ids }: GridColumns) =>
  (a: number, b: number): number =>
    compareText(names[a], names[b]) || compareText(ids[a], ids[b]);

const traitValueAt = (columns: GridColumns, traitId: string, row: number): TraitValue | undefined => columns.traitColumns.get(traitId)?.[row];

function numericKey(v: TraitValue | undefined): number {
  return typeof v === "number" ? v : typeof v === "string" && v.trim() !== "" ? Number(v) : NaN;
}

/** A sorted order of the live rows, and the comparison that defines it (used to merge changed rows in). */
interface KeptOrder {
  rows: Int32Array;
  compare: (a: number, b: number) => number;
  usedAt: number;
}

/** Sorted orders beyond this many are dropped, least recently used first: each costs a pass per change. */
const MAX_KEPT_ORDERS = 8;

/**
 * What the grid derives from a copy's columns, built on first use and kept current as rows change:
 * lower-cased texts for the case-blind filters, and the sorted orders. A few changed rows are merged
 * into each order in one pass instead of a new sort.
 */
export class GridDerived {
  private readonly lowered = new Map<TextColumn, Array<string | null>>();
  private readonly numbers = new Map<string, number[]>();
  private readonly counted = new Map<OccurrenceColumn, { counts: OccurrenceCounts; keys: number[] }>();
  private readonly orders = new Map<string, KeptOrder>();
  private clock = 0;

  constructor(private readonly columns: GridColumns) {}

  lowerCased(column: TextColumn): ReadonlyArray<string | null> {
    let lower = this.lowered.get(column);
    if (!lower) {
      lower = textColumn(this.columns, column).map(lowerOrNull);
      this.lowered.set(column, lower);
    }
    return lower;
  }

  /** Live rows by name, then id: the order every other order refines. */
  nameOrder(): Int32Array {
    return this.kept("name", byName(this.columns), () => {
      const rows: number[] = [];
      for (let i = 0; i < this.columns.ids.length; i++) if (this.columns.alive[i]) rows.push(i);
      return Int32Array.from(rows.sort(byName(this.columns)));
    }).rows;
  }

  /**
   * Live rows in the order of a sort: by the key in the asked direction with missing keys last, ties
   * by name then id. Built from the name order by a stable sort on the key alone (or, for states, by
   * one bucket per state), so ties never compare names again.
   */
  sortedOrder(sort: string, dir: "asc" | "desc", codebook: Map<string, Trait>, counts: OccurrenceCounts | null = null): Int32Array {
    const { columns } = this;
    if (sort === "name") {
      const ascending = this.nameOrder();
      if (dir === "asc") return ascending;
      const names = byName(columns);
      return this.kept("name:desc", (a, b) => names(b, a), () => ascending.slice().reverse()).rows;
    }
    const sign = dir === "asc" ? 1 : -1;
    if (isOccurrenceColumn(sort)) {
      if (!counts) throw new Error("sortedOrder: a sort by occurrence counts needs the counts");
      // A taxon without finds counts 0 (not missing); an order is kept per set of uploads counted.
      const keys = this.countKeys(sort, counts);
      return this.keyed(`${sort}:${dir}:${counts.signature}`, () => false, (a, b) => sign * (keys[a] - keys[b])).rows;
    }
    const trait = isTextColumn(sort) || isAgeColumn(sort) || sort === "updatedAt" ? null : traitOf(codebook, sort, "sort");
    if (trait && trait.kind !== "numeric") {
      const codes = trait.states.map((s) => s.code);
      const place = new Map(codes.map((code, i) => [code, i]));
      // No value, or a code the codebook no longer has, sorts with the missing.
      const placeOf = (row: number) => place.get(traitValueAt(columns, trait.id, row) as string);
      return this.keyed(`${sort}:${dir}:${JSON.stringify(codes)}`, (row) => placeOf(row) === undefined, (a, b) => sign * (placeOf(a)! - placeOf(b)!), () =>
        bucketOrder(this.nameOrder(), placeOf, codes.length, dir),
      ).rows;
    }
    if (isTextColumn(sort)) {
      // Empty higher taxa and notes count as missing.
      const values = textColumn(columns, sort);
      return this.keyed(`${sort}:${dir}`, (row) => !values[row], (a, b) => sign * compareText(values[a]!, values[b]!)).rows;
    }
    const numbers = trait ? this.traitNumbers(trait.id) : sort === "updatedAt" ? columns.updatedAt : ageColumn(columns, sort as AgeColumn);
    return this.keyed(`${sort}:${dir}`, (row) => Number.isNaN(numbers[row]), (a, b) => sign * (numbers[a] - numbers[b])).rows;
  }

  /** A numeric trait's values as sort keys (NaN where missing). */
  private traitNumbers(traitId: string): number[] {
    let keys = this.numbers.get(traitId);
    if (!keys) {
      keys = new Array<number>(this.columns.ids.length);
      for (let row = 0; row < keys.length; row++) keys[row] = numericKey(traitValueAt(this.columns, traitId, row));
      this.numbers.set(traitId, keys);
    }
    return keys;
  }

  /** Each row's count (finds or collections) under one set of counts; a renamed row's is refreshed in rowsChanged. */
  private countKeys(column: OccurrenceColumn, counts: OccurrenceCounts): number[] {
    const held = this.counted.get(column);
    if (held && held.counts === counts) return held.keys;
    const keys = new Array<number>(this.columns.ids.length);
    for (let row = 0; row < keys.length; row++) keys[row] = counts.byName.get(this.columns.names[row])?.[column] ?? 0;
    this.counted.set(column, { counts, keys });
    return keys;
  }

  /** Brings every derived thing up to date after the given rows changed, were added or removed. */
  rowsChanged(rows: number[]): void {
    const touched = [...new Set(rows)];
    for (const [column, { counts, keys }] of this.counted) for (const row of touched) keys[row] = counts.byName.get(this.columns.names[row])?.[column] ?? 0;
    for (const [column, lower] of this.lowered) {
      const values = textColumn(this.columns, column);
      for (const row of touched) lower[row] = lowerOrNull(values[row]);
    }
    for (const [traitId, keys] of this.numbers) for (const row of touched) keys[row] = numericKey(traitValueAt(this.columns, traitId, row));
    const mark = new Uint8Array(this.columns.ids.length);
    for (const row of touched) mark[row] = 1;
    for (const order of this.orders.values()) order.rows = mergeRows(order.rows, touched, mark, this.columns.alive, order.compare);
  }

  private keyed(name: string, isMissing: (row: number) => boolean, compareKeys: (a: number, b: number) => number, build?: () => Int32Array): KeptOrder {
    const names = byName(this.columns);
    const compare = (a: number, b: number): number => {
      const missingA = isMissing(a);
      if (missingA !== isMissing(b)) return missingA ? 1 : -1;
      return (missingA ? 0 : compareKeys(a, b)) || names(a, b);
    };
    return this.kept(name, compare, build ?? (() => keyedOrder(this.nameOrder(), isMissing, compareKeys)));
  }

  private kept(name: string, compare: (a: number, b: number) => number, build: () => Int32Array): KeptOrder {
    let order = this.orders.get(name);
    if (!order) {
      order = { rows: build(), compare, usedAt: 0 };
      if (this.orders.size >= MAX_KEPT_ORDERS) {
        const [oldest] = [...this.orders.entries()].filter(([key]) => key !== "name").sort((a, b) => a[1].usedAt - b[1].usedAt)[0];
        this.orders.delete(oldest);
      }
      this.orders.set(name, order);
    }
    order.usedAt = ++this.clock;
    return order;
  }
}

/** The previous order without the changed rows, with the changed rows that are alive merged back in. */
function mergeRows(previous: Int32Array, touched: number[], mark: Uint8Array, alive: boolean[], compare: (a: number, b: number) => number): Int32Array {
  const added = touched.filter((row) => alive[row]).sort(compare);
  let kept = 0;
  for (const row of previous) if (!mark[row]) kept++;
  const merged = new Int32Array(kept + added.length);
  let out = 0;
  let next = 0;
  for (const row of previous) {
    if (mark[row]) continue;
    while (next < added.length && compare(added[next], row) < 0) merged[out++] = added[next++];
    merged[out++] = row;
  }
  while (next < added.length) merged[out++] = added[next++];
  return merged;
}

function keyedOrder(byNameOrder: Int32Array, isMissing: (row: number) => boolean, compareKeys: (a: number, b: number) => number): Int32Array {
  const present: number[] = [];
  const missing: number[] = [];
  for (const row of byNameOrder) (isMissing(row) ? missing : present).push(row);
  // Array.prototype.sort is stable, so rows with equal keys stay in name order.
  present.sort(compareKeys);
  return Int32Array.from([...present, ...missing]);
}

function bucketOrder(byNameOrder: Int32Array, placeOf: (row: number) => number | undefined, places: number, dir: "asc" | "desc"): Int32Array {
  const buckets = Array.from({ length: places }, () => [] as number[]);
  const missing: number[] = [];
  for (const row of byNameOrder) {
    const at = placeOf(row);
    if (at === undefined) missing.push(row);
    else buckets[at].push(row);
  }
  if (dir === "desc") buckets.reverse();
  return Int32Array.from([...buckets.flat(), ...missing]);
}

/**
 * How many rows of a sorted order pass the test, and the rows of the asked page. The test runs over
 * the rows in storage order first (the sorted order visits them at random, and reading every row's
 * text at random addresses costs several times more), then one pass over the order counts.
 */
export function pageOf(order: Int32Array, test: RowTest, rowCount: number, offset: number, limit: number): { rows: number[]; total: number } {
  const passes = new Uint8Array(rowCount);
  for (let row = 0; row < rowCount; row++) if (test(row)) passes[row] = 1;
  const rows: number[] = [];
  let total = 0;
  const end = offset + limit;
  for (const row of order) {
    if (!passes[row]) continue;
    if (total >= offset && total < end) rows.push(row);
    total++;
  }
  return { rows, total };
}
