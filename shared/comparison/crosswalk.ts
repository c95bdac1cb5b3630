// The crosswalk between a modern list's own words and the study's codebook: which list column holds
// which trait, and which list value means which state. Values the crosswalk cannot use are listed
// with how many species hold them, never dropped silently.
import { isMissingCell, parseNumberCell } from "../csv/values";
import type { Crosswalk, CrosswalkCoverage, CrosswalkPair, CrosswalkTrait, ListColumn, PairCoverage, UnusableValue } from "./types";

const normal = (s: string) => s.toLowerCase().replace(/[^a-z0-9]/g, "");

/**
 * The distinct values of each named column over the species' raw traits, most frequent first (ties
 * in natural order), with the count of species that leave the column empty or NA.
 *
 * @example
 * listColumns([{ diet: "hunter" }, { diet: "hunter" }, { diet: "NA" }], ["diet"])
 * // => [{ name: "diet", values: [{ value: "hunter", count: 2 }], missing: 1 }]
 */
export function listColumns(rawTraits: Array<Record<string, string>>, names: string[]): ListColumn[] {
  return names.map((name) => {
    const counts = new Map<string, number>();
    let missing = 0;
    for (const raw of rawTraits) {
      const text = raw[name] ?? "";
      if (isMissingCell(text)) {
        missing++;
        continue;
      }
      const value = text.trim();
      counts.set(value, (counts.get(value) ?? 0) + 1);
    }
    const values = [...counts.entries()]
      .map(([value, count]) => ({ value, count }))
      .sort((a, b) => b.count - a.count || a.value.localeCompare(b.value, "en", { numeric: true }));
    return { name, values, missing };
  });
}

/** A state of the trait whose code or label is the value, ignoring case, spaces and punctuation. */
function stateFor(trait: CrosswalkTrait, value: string): string | null {
  const n = normal(value);
  if (!n) return null;
  return (trait.states.find((s) => normal(s.code) === n) ?? trait.states.find((s) => normal(s.label) === n))?.code ?? null;
}

/**
 * The list values whose name is a state's code or label (case, spaces and punctuation ignored), as
 * value -> state code; values already decided in `decided` are left as they are. Used when a column
 * is paired, by the suggestion or by hand, so identical state names never wait for a decision.
 *
 * @example
 * statesWithSameName(habit, ["Burrowing", "free", "sessile"], {}) // => { Burrowing: "burrowing", free: "free" }
 */
export function statesWithSameName(trait: CrosswalkTrait, values: string[], decided: Record<string, string | null> = {}): Record<string, string | null> {
  const states: Record<string, string | null> = { ...decided };
  if (trait.kind === "numeric") return states;
  for (const value of values) {
    if (value in states) continue;
    const code = stateFor(trait, value);
    if (code) states[value] = code;
  }
  return states;
}

/**
 * A first crosswalk for a list: a trait paired as an earlier crosswalk of the study paired it (when
 * that column exists here; its value mappings come along), else with a column of the same name as
 * the trait's key or label (case, spaces and punctuation ignored: "Life habit" meets life_habit,
 * but "habit" does not meet "life habit" nor "habitat" "habit"); values are matched to states by
 * code or label. Unmatched values stay out, so the screen lists them for a decision. Retired traits
 * are never suggested; each column serves one trait at most.
 *
 * @example
 * suggestCrosswalk([{ name: "Feeding", values: [{ value: "predator", count: 4 }, { value: "parasite", count: 1 }], missing: 0 }], [feeding], [])
 * // => { pairs: [{ traitId: feeding.id, column: "Feeding", states: { predator: "predator" }, multiplier: 1 }] }
 */
export function suggestCrosswalk(columns: ListColumn[], traits: CrosswalkTrait[], earlier: Crosswalk[] = []): Crosswalk {
  const byName = new Map(columns.map((c) => [c.name, c]));
  const used = new Set<string>();
  const pairs: CrosswalkPair[] = [];
  for (const trait of traits) {
    if (trait.retired) continue;
    const remembered = earlier.flatMap((c) => c.pairs).find((p) => p.traitId === trait.id && byName.has(p.column) && !used.has(p.column));
    const column =
      remembered?.column ??
      columns.find((c) => !used.has(c.name) && (normal(c.name) === normal(trait.key) || normal(c.name) === normal(trait.label)))?.name;
    if (!column) continue;
    used.add(column);
    const states: Record<string, string | null> = {};
    if (trait.kind !== "numeric") {
      const codes = new Set(trait.states.map((s) => s.code));
      for (const { value } of byName.get(column)!.values) {
        const earlierChoice = remembered?.states[value];
        if (remembered && value in remembered.states && (earlierChoice === null || codes.has(earlierChoice!))) states[value] = earlierChoice!;
        else {
          const code = stateFor(trait, value);
          if (code) states[value] = code;
        }
      }
    }
    pairs.push({ traitId: trait.id, column, states, multiplier: trait.kind === "numeric" ? (remembered?.multiplier ?? 1) : 1 });
  }
  return { pairs };
}

/** Reading one list value through a pair: a state code or a number, null when missing, or why it cannot be used. */
export type CrosswalkReading = { ok: true; value: string | number | null } | { ok: false; message: string };

export function readThroughPair(pair: CrosswalkPair, trait: CrosswalkTrait, text: string | undefined, opts: { decimalComma: boolean }): CrosswalkReading {
  if (text === undefined || isMissingCell(text)) return { ok: true, value: null };
  const value = text.trim();
  if (trait.kind === "numeric") {
    const n = parseNumberCell(value, opts);
    if (!n.ok) return { ok: false, message: `${trait.label}: ${n.message}` };
    return { ok: true, value: n.value * pair.multiplier };
  }
  if (!(value in pair.states)) return { ok: false, message: `"${value}" has no state of ${trait.label} in the crosswalk` };
  const code = pair.states[value];
  if (code === null) return { ok: false, message: `"${value}" is marked as matching no state of ${trait.label}` };
  if (!trait.states.some((s) => s.code === code)) return { ok: false, message: `"${value}" is mapped to "${code}", which is no longer a state of ${trait.label}` };
  return { ok: true, value: code };
}

/**
 * A species' trait values by trait key through the crosswalk, with the reason for each value the
 * list holds but the crosswalk cannot use. Traits no column is paired with are absent.
 */
export function readSpeciesTraits(
  rawTraits: Record<string, string>,
  crosswalk: Crosswalk,
  traits: CrosswalkTrait[],
  opts: { decimalComma: boolean },
): { values: Record<string, string | number | null>; problems: Record<string, string> } {
  const byId = new Map(traits.map((t) => [t.id, t]));
  const values: Record<string, string | number | null> = {};
  const problems: Record<string, string> = {};
  for (const pair of crosswalk.pairs) {
    const trait = byId.get(pair.traitId);
    if (!trait) continue;
    const reading = readThroughPair(pair, trait, rawTraits[pair.column], opts);
    if (reading.ok) values[trait.key] = reading.value;
    else {
      values[trait.key] = null;
      problems[trait.key] = reading.message;
    }
  }
  return { values, problems };
}

/**
 * How much of the list a crosswalk reads: per pair, the species whose value is usable, missing or
 * unusable, with every unusable value listed and counted; list columns paired with no trait; traits
 * paired with no column.
 *
 * @example
 * crosswalkCoverage([{ name: "diet", values: [{ value: "hunter", count: 3 }, { value: "parasite", count: 1 }], missing: 2 }],
 *                   { pairs: [{ traitId: feeding.id, column: "diet", states: { hunter: "predator" }, multiplier: 1 }] }, [feeding], { decimalComma: false })
 * // => { pairs: [{ column: "diet", usable: 3, missing: 2, unusableSpecies: 1,
 * //                unusable: [{ value: "parasite", count: 1, message: '"parasite" has no state of Feeding mode in the crosswalk' }], ... }],
 * //      unpairedColumns: [], unpairedTraits: [] }
 */
export function crosswalkCoverage(columns: ListColumn[], crosswalk: Crosswalk, traits: CrosswalkTrait[], opts: { decimalComma: boolean }): CrosswalkCoverage {
  const byName = new Map(columns.map((c) => [c.name, c]));
  const byId = new Map(traits.map((t) => [t.id, t]));
  const pairs: PairCoverage[] = [];
  for (const pair of crosswalk.pairs) {
    const trait = byId.get(pair.traitId);
    const column = byName.get(pair.column);
    if (!trait || !column) continue;
    let usable = 0;
    let unusableSpecies = 0;
    const unusable: UnusableValue[] = [];
    for (const { value, count } of column.values) {
      const reading = readThroughPair(pair, trait, value, opts);
      if (reading.ok) usable += count;
      else {
        unusableSpecies += count;
        unusable.push({ value, count, message: reading.message });
      }
    }
    pairs.push({ traitId: trait.id, traitKey: trait.key, traitLabel: trait.label, kind: trait.kind, column: column.name, usable, missing: column.missing, unusable, unusableSpecies });
  }
  const pairedColumns = new Set(crosswalk.pairs.map((p) => p.column));
  const pairedTraits = new Set(crosswalk.pairs.map((p) => p.traitId));
  return {
    pairs,
    unpairedColumns: columns.filter((c) => !pairedColumns.has(c.name)).map((c) => c.name),
    unpairedTraits: traits.filter((t) => !t.retired && !pairedTraits.has(t.id)).map((t) => ({ traitId: t.id, key: t.key, label: t.label })),
  };
}

/**
 * Problems of a crosswalk against the codebook and the list's columns, by field path (as the API
 * names fields): an unknown or retired trait, a column the list lacks, states on a numeric trait,
 * a state code the trait does not have, a multiplier on a trait with states.
 */
export function crosswalkProblems(crosswalk: Crosswalk, traits: CrosswalkTrait[], columnNames: string[]): Record<string, string> {
  const problems: Record<string, string> = {};
  const byId = new Map(traits.map((t) => [t.id, t]));
  const has = new Set(columnNames);
  crosswalk.pairs.forEach((pair, i) => {
    const at = `pairs.${i}`;
    const trait = byId.get(pair.traitId);
    if (!trait) {
      problems[`${at}.traitId`] = "No trait of this study has this id (it may have been deleted)";
      return;
    }
    if (trait.retired) problems[`${at}.traitId`] = `${trait.label} is retired from the codebook; restore it there to pair it`;
    if (!has.has(pair.column)) problems[`${at}.column`] = `The list has no column "${pair.column}"`;
    if (trait.kind === "numeric") {
      if (Object.keys(pair.states).length) problems[`${at}.states`] = `${trait.label} is numeric: its values are read as numbers and have no states to map`;
      return;
    }
    if (pair.multiplier !== 1) problems[`${at}.multiplier`] = `${trait.label} has states; only numeric traits take a multiplier`;
    const codes = trait.states.map((s) => s.code);
    for (const [value, code] of Object.entries(pair.states)) {
      if (code !== null && !codes.includes(code)) problems[`${at}.states.${value}`] = `"${code}" is not a state of ${trait.label} (allowed: ${codes.join(", ")})`;
    }
  });
  return problems;
}
