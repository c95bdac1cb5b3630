// Checking trait values and range ends against the codebook and the time scale: for values typed
// into the grid (JSON) and for cells of an imported CSV file (text). Messages name the trait and
// say what is allowed, so the grid and the import preview can show them as they are.
import type { NumericTransform, TraitKind, TraitState } from "../codebook";
import { chartInterval, hasBins, numberedIntervalHint, type IntervalLookup } from "../timebins/intervalLookup";
import { AGE_LIMIT_MA, AGE_LIMIT_MESSAGE } from "../schemas/common";
import type { RangeEnd, RangeEndInput } from "../schemas/taxa";

/** The parts of a trait definition that decide which values it accepts. */
export interface CodebookTrait {
  id: string;
  key: string;
  label: string;
  kind: TraitKind;
  states: TraitState[];
  unit: string | null;
  transform: NumericTransform;
  minValue: number | null;
  maxValue: number | null;
  retired?: boolean;
}

export type Checked<T> = { ok: true; value: T } | { ok: false; message: string };

const ok = <T>(value: T): Checked<T> => ({ ok: true, value });
const fail = <T>(message: string): Checked<T> => ({ ok: false, message });

/** Cells that mean "no value" in a CSV file (common practice, no source). */
export const MISSING_MARKERS = ["", "NA", "N/A", "n/a", "na"];
export const isMissingCell = (text: string) => MISSING_MARKERS.includes(text.trim());

const NUMBER_PATTERN = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/**
 * A number written in a cell: "12.5", "-3", "1e3", and "12,5" when the file's separator is not a
 * comma (decimal comma). Thousands separators are refused: "1,250" or "1.250,5" could mean two
 * different numbers.
 */
export function parseNumberCell(text: string, opts: { decimalComma: boolean }): Checked<number> {
  const t = text.trim();
  if (t.includes(",")) {
    if (!opts.decimalComma) return fail(`"${t}" is not a number: a decimal comma is ambiguous in a comma-separated file (write 12.5)`);
    if (t.includes(".") || t.indexOf(",") !== t.lastIndexOf(",")) return fail(`"${t}" is not a number: write it without thousands separators (e.g. 1250.5)`);
  }
  const normal = t.replace(",", ".");
  if (!NUMBER_PATTERN.test(normal)) return fail(`"${t}" is not a number`);
  const n = Number(normal);
  return Number.isFinite(n) ? ok(n) : fail(`"${t}" is not a finite number`);
}

const stateList = (trait: CodebookTrait) => trait.states.map((s) => s.code).join(", ");
const withUnit = (n: number, trait: CodebookTrait) => (trait.unit ? `${n} ${trait.unit}` : String(n));

function checkNumber(trait: CodebookTrait, n: number): Checked<number> {
  if (trait.minValue !== null && n < trait.minValue) return fail(`${trait.label}: ${withUnit(n, trait)} is below the minimum ${withUnit(trait.minValue, trait)}`);
  if (trait.maxValue !== null && n > trait.maxValue) return fail(`${trait.label}: ${withUnit(n, trait)} is above the maximum ${withUnit(trait.maxValue, trait)}`);
  if (trait.transform === "log10" && n <= 0) return fail(`${trait.label}: ${withUnit(n, trait)} cannot be log-transformed; values must be above 0`);
  return ok(n);
}

/**
 * A value sent through the API (the grid, a bulk edit): a state trait takes one of its codes
 * exactly, a numeric trait a finite number within its range.
 */
export function checkTraitValue(trait: CodebookTrait, value: unknown): Checked<string | number> {
  if (trait.retired) return fail(`${trait.label} is retired: restore it in the codebook before editing its values`);
  if (trait.kind === "numeric") {
    if (typeof value !== "number" || !Number.isFinite(value)) return fail(`${trait.label} takes a number${trait.unit ? ` in ${trait.unit}` : ""}`);
    return checkNumber(trait, value);
  }
  if (typeof value !== "string" || !trait.states.some((s) => s.code === value)) {
    return fail(`${JSON.stringify(value)} is not a state of ${trait.label} (allowed: ${stateList(trait)})`);
  }
  return ok(value);
}

/**
 * A CSV cell for a trait: null when missing; a state trait reads a code or a label, case-blind,
 * and stores the code; a numeric trait reads a number (decimal comma allowed unless the file is
 * comma separated).
 */
export function readTraitCell(trait: CodebookTrait, text: string, opts: { decimalComma: boolean }): Checked<string | number | null> {
  if (isMissingCell(text)) return ok(null);
  const t = text.trim();
  if (trait.kind === "numeric") {
    const n = parseNumberCell(t, opts);
    if (!n.ok) return fail(`${trait.label}: ${n.message}`);
    return checkNumber(trait, n.value);
  }
  const lower = t.toLowerCase();
  const state = trait.states.find((s) => s.code.toLowerCase() === lower) ?? trait.states.find((s) => s.label.toLowerCase() === lower);
  if (!state) return fail(`Unknown state "${t}" for ${trait.label} (allowed: ${stateList(trait)})`);
  return ok(state.code);
}

/**
 * A range end as given (age or interval name) to the stored form; an interval resolves to its base
 * (first appearance) or top (last appearance) through `intervals` (the study's bins, then the ICS
 * chart; the chart alone unless given).
 */
export function resolveRangeEnd(input: RangeEndInput, end: "fad" | "lad", intervals: IntervalLookup = chartInterval): Checked<RangeEnd> {
  if (input === null) return ok(null);
  if ("ma" in input) {
    if (!Number.isFinite(input.ma) || input.ma < 0) return fail("Age must be a number of Ma, 0 or more");
    if (input.ma > AGE_LIMIT_MA) return fail(AGE_LIMIT_MESSAGE);
    return ok({ ma: input.ma, interval: null });
  }
  const found = intervals(input.interval);
  if (!found) return fail(`Unknown interval "${input.interval}": not one of the study's time bins nor a unit of the time scale${numberedIntervalHint(input.interval, hasBins(intervals))}`);
  return ok({ ma: end === "fad" ? found.baseMa : found.topMa, interval: found.name });
}

/** "12 Ma": an age said to be one, which a number naming a study bin would otherwise not be. */
const EXPLICIT_AGE = /^([+-]?[\d.,]+(?:[eE][+-]?\d+)?)\s*Ma$/;

/**
 * A CSV cell for a range end: an age in Ma, or an interval name; null when missing. With the study's
 * `intervals`, a name (a number too) of one of its bins is read as that bin before anything else, so
 * numbered slices are not taken for ages; "12 Ma" is always an age.
 */
export function readRangeCell(text: string, end: "fad" | "lad", opts: { decimalComma: boolean; intervals?: IntervalLookup }): Checked<RangeEnd> {
  if (isMissingCell(text)) return ok(null);
  const intervals = opts.intervals ?? chartInterval;
  const raw = text.trim();
  const bin = hasBins(intervals) ? intervals(raw) : undefined;
  if (bin?.source === "bin") return ok({ ma: end === "fad" ? bin.baseMa : bin.topMa, interval: bin.name });
  const explicitAge = EXPLICIT_AGE.exec(raw);
  const t = explicitAge ? explicitAge[1]! : raw;
  if (explicitAge || /^[+-]?[\d.,]/.test(t)) {
    const n = parseNumberCell(t, opts);
    if (!n.ok) return n;
    if (n.value < 0) return fail(`${t} is not an age: ages are in Ma before present and cannot be negative`);
    if (n.value > AGE_LIMIT_MA) return fail(`${t} is not an age: ${AGE_LIMIT_MESSAGE.charAt(0).toLowerCase()}${AGE_LIMIT_MESSAGE.slice(1)}`);
    return ok({ ma: n.value, interval: null });
  }
  const found = intervals(t);
  if (!found) {
    return fail(
      !hasBins(intervals)
        ? `Unknown interval name "${t}": not a unit of the time scale (give an age in Ma or a name such as Maastrichtian)`
        : `Unknown interval name "${t}": not one of the study's time bins nor a unit of the time scale (give an age in Ma or a name such as Maastrichtian)`,
    );
  }
  return ok({ ma: end === "fad" ? found.baseMa : found.topMa, interval: found.name });
}

/**
 * The range check of a taxon: the first appearance may not be younger than the last (ages in Ma,
 * larger is older). When both ends are named intervals the first must begin strictly before the
 * last ends, as resolveIntervalRange requires: equal ages there mean the names were swapped.
 */
export function rangeProblem(fad: RangeEnd | undefined, lad: RangeEnd | undefined): string | null {
  if (!fad || !lad) return null;
  if (fad.ma < lad.ma) return `First appearance (${fad.ma} Ma) is younger than last appearance (${lad.ma} Ma)`;
  if (fad.interval && lad.interval && fad.ma === lad.ma) {
    return `First appearance interval ${fad.interval} begins (${fad.ma} Ma) where last appearance interval ${lad.interval} ends: the names look swapped`;
  }
  return null;
}

/** Equality of stored values (trait values, texts, range ends). */
export function sameValue(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (a === undefined || b === undefined || a === null || b === null) return (a ?? null) === (b ?? null);
  if (typeof a === "object" && typeof b === "object") {
    const x = a as Record<string, unknown>;
    const y = b as Record<string, unknown>;
    const keys = new Set([...Object.keys(x), ...Object.keys(y)]);
    for (const k of keys) if (!sameValue(x[k], y[k])) return false;
    return true;
  }
  return false;
}
