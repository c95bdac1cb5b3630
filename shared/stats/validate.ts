// Input checks shared by the statistics functions. Each throws an Error whose message starts with
// the calling function's name and says what is wrong and where.

/** Throws unless `value` is a finite number. */
export function assertFinite(fn: string, what: string, value: unknown): asserts value is number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new Error(`${fn}: ${what} is ${describe(value)}; it must be a finite number`);
  }
}

/** Throws unless `value` is a non-negative integer count. */
export function assertCount(fn: string, what: string, value: unknown): asserts value is number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < 0) {
    throw new Error(`${fn}: ${what} is ${describe(value)}; counts must be non-negative integers`);
  }
}

/** Throws unless `level` is a confidence level strictly between 0 and 1. */
export function assertLevel(fn: string, level: unknown): asserts level is number {
  if (typeof level !== "number" || !Number.isFinite(level) || level <= 0 || level >= 1) {
    throw new Error(`${fn}: level is ${describe(level)}; it must lie strictly between 0 and 1`);
  }
}

/** Throws unless `values` is an array of finite numbers of the expected length (if given). */
export function assertFiniteArray(fn: string, what: string, values: unknown, length?: number): asserts values is number[] {
  if (!Array.isArray(values)) throw new Error(`${fn}: ${what} must be an array of numbers`);
  if (length !== undefined && values.length !== length) {
    throw new Error(`${fn}: ${what} has ${values.length} values but ${length} were expected (lengths must match)`);
  }
  for (let i = 0; i < values.length; i++) assertFinite(fn, `${what}[${i}]`, values[i]);
}

/** Throws unless every label is exactly 0 or 1 and the array has the expected length. */
export function assertBinaryLabels(fn: string, what: string, labels: unknown, length: number): asserts labels is number[] {
  if (!Array.isArray(labels)) throw new Error(`${fn}: ${what} must be an array of 0/1 labels`);
  if (labels.length !== length) {
    throw new Error(`${fn}: ${what} has ${labels.length} values but ${length} were expected (lengths must match)`);
  }
  for (let i = 0; i < labels.length; i++) {
    const v = labels[i];
    if (v !== 0 && v !== 1) throw new Error(`${fn}: ${what}[${i}] is ${describe(v)}; labels must be 0 or 1`);
  }
}

/**
 * Checks a contingency table of counts: at least `minRows` x `minColumns`, rectangular,
 * non-negative integers, not all zero. Returns the grand total.
 */
export function assertCountTable(fn: string, table: unknown, minRows = 2, minColumns = 2): number {
  if (!Array.isArray(table) || table.length === 0) throw new Error(`${fn}: the table is empty; it needs at least ${minRows} rows`);
  if (table.length < minRows) throw new Error(`${fn}: the table has ${table.length} row(s); it needs at least ${minRows}`);
  let columns = -1;
  let total = 0;
  for (let i = 0; i < table.length; i++) {
    const row = table[i];
    if (!Array.isArray(row)) throw new Error(`${fn}: row ${i} is not an array`);
    if (columns < 0) columns = row.length;
    if (row.length !== columns) {
      throw new Error(`${fn}: row ${i} has ${row.length} cells but row 0 has ${columns}; the table must be rectangular`);
    }
    for (let j = 0; j < row.length; j++) {
      assertCount(fn, `cell [${i}][${j}]`, row[j]);
      total += row[j];
    }
  }
  if (columns < minColumns) throw new Error(`${fn}: the table has ${columns} column(s); it needs at least ${minColumns}`);
  if (total === 0) throw new Error(`${fn}: the table is empty (all counts are 0)`);
  return total;
}

function describe(value: unknown): string {
  if (typeof value === "number") return String(value);
  if (value === undefined) return "missing";
  if (value === null) return "null";
  if (typeof value === "string") return `the text "${value}"`;
  return `a ${typeof value}`;
}
