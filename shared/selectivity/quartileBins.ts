import { formatCompact } from "./formatNumber";
import { formatQuantityRange } from "../format/units";
import { proportionRow } from "./stateTable";
import type { StateRow } from "./types";

/**
 * Extinction proportions of a numeric trait in quartile bins, for the table and the bar chart. The
 * cut points are the sample quartiles (the smallest value with at least a quarter, a half, three
 * quarters of the values at or below it), so tied values always share a bin; bins left empty by
 * ties are dropped. Each bin is labelled with the range of raw values it holds, e.g. "2.4–18 mm".
 * Missing values are NaN in `raw` and are skipped.
 *
 * @example
 * quartileBins(Float64Array.of(1, 2, 3, 4, 5, 6, 7, 8), Uint8Array.of(1, 1, 0, 1, 0, 0, 1, 0), 0.95, "mm")
 * // => Q1 "1–2 mm" (2 victims, 0 survivors), Q2 "3–4 mm" (1, 1), Q3 "5–6 mm" (0, 2), Q4 "7–8 mm" (1, 1)
 */
export function quartileBins(raw: Float64Array, outcome: Uint8Array, level: number, unit?: string | null): StateRow[] {
  let m = 0;
  for (let i = 0; i < raw.length; i++) if (!Number.isNaN(raw[i])) m++;
  if (m === 0) return [];
  const sorted = new Float64Array(m);
  for (let i = 0, k = 0; i < raw.length; i++) if (!Number.isNaN(raw[i])) sorted[k++] = raw[i];
  sorted.sort();
  const edges = [1, 2, 3].map((q) => sorted[Math.ceil((q * m) / 4) - 1]);
  edges.push(Infinity);

  const victims = new Int32Array(4);
  const survivors = new Int32Array(4);
  const lows = new Float64Array(4).fill(Infinity);
  const highs = new Float64Array(4).fill(-Infinity);
  for (let i = 0; i < raw.length; i++) {
    const value = raw[i];
    if (Number.isNaN(value)) continue;
    let bin = 0;
    while (value > edges[bin]) bin++;
    if (outcome[i] === 1) victims[bin]++;
    else survivors[bin]++;
    if (value < lows[bin]) lows[bin] = value;
    if (value > highs[bin]) highs[bin] = value;
  }
  const rows: StateRow[] = [];
  for (let bin = 0; bin < 4; bin++) {
    if (victims[bin] + survivors[bin] === 0) continue;
    // "1 region", "3–4 regions", "0.15–14.8 mm": the unit in the singular after exactly 1.
    const range = formatQuantityRange(lows[bin], highs[bin], unit, formatCompact);
    rows.push(proportionRow(`Q${bin + 1}`, range, victims[bin], survivors[bin], level));
  }
  return rows;
}
