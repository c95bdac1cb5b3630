// Which CSV column fills which part of a taxon: guessed from header names, or as the study mapped
// the same header last time (remembered per study by header name).
import type { ImportMapping, ImportMappingDraft } from "../schemas/imports";
import type { CodebookTrait } from "./values";

/** What a column can be mapped to; a trait as `trait:<id>`. */
export type MappingTarget = "name" | "higherTaxon" | "firstAppearance" | "lastAppearance" | "notes" | `trait:${string}`;

/** A study's remembered mapping: header name -> target. */
export type RememberedMapping = Record<string, MappingTarget>;

const normal = (s: string) => s.toLowerCase().replace(/[^a-z0-9]/g, "");

// Header words people commonly use for each column (common practice, no source).
const GUESSES: Array<[Exclude<MappingTarget, `trait:${string}`>, string[]]> = [
  ["name", ["name", "taxon", "taxonname", "taxa", "genus", "species", "scientificname"]],
  ["higherTaxon", ["highertaxon", "clade", "family", "order", "class", "phylum", "group", "highertaxa"]],
  ["firstAppearance", ["firstappearance", "fad", "fadma", "first", "firstoccurrence", "firstinterval", "origination", "maxma"]],
  ["lastAppearance", ["lastappearance", "lad", "ladma", "last", "lastoccurrence", "lastinterval", "extinction", "minma"]],
  ["notes", ["notes", "note", "comment", "comments", "remarks"]],
];

function emptyDraft(): ImportMappingDraft {
  return { name: null, higherTaxon: null, firstAppearance: null, lastAppearance: null, notes: null, traits: {} };
}

function assign(draft: ImportMappingDraft, target: MappingTarget, header: string): boolean {
  if (target.startsWith("trait:")) {
    const id = target.slice(6);
    if (draft.traits[id]) return false;
    draft.traits[id] = header;
    return true;
  }
  const key = target as Exclude<MappingTarget, `trait:${string}`>;
  if (draft[key] !== null) return false;
  draft[key] = header;
  return true;
}

/**
 * A first mapping for a file's header: remembered targets first (when the target still exists
 * and is free), then guesses from the header words and the codebook's keys and labels. Retired
 * traits are never suggested.
 */
export function suggestMapping(
  header: string[],
  traits: CodebookTrait[],
  remembered: RememberedMapping = {},
): { mapping: ImportMappingDraft; rememberedColumns: string[] } {
  const draft = emptyDraft();
  const active = traits.filter((t) => !t.retired);
  const activeIds = new Set(active.map((t) => t.id));
  const used = new Set<string>();
  const rememberedColumns: string[] = [];
  for (const h of header) {
    const target = remembered[h];
    if (!target) continue;
    if (target.startsWith("trait:") && !activeIds.has(target.slice(6))) continue;
    if (assign(draft, target, h)) {
      used.add(h);
      rememberedColumns.push(h);
    }
  }
  for (const h of header) {
    if (used.has(h)) continue;
    const n = normal(h);
    const fixed = GUESSES.find(([, words]) => words.includes(n));
    if (fixed && assign(draft, fixed[0], h)) {
      used.add(h);
      continue;
    }
    const trait = active.find((t) => normal(t.key) === n || normal(t.label) === n);
    if (trait && assign(draft, `trait:${trait.id}`, h)) used.add(h);
  }
  return { mapping: draft, rememberedColumns };
}

/** The mapping to remember for next time: header -> target. */
export function mappingToRemember(mapping: ImportMapping): RememberedMapping {
  const out: RememberedMapping = { [mapping.name]: "name" };
  if (mapping.higherTaxon) out[mapping.higherTaxon] = "higherTaxon";
  if (mapping.firstAppearance) out[mapping.firstAppearance] = "firstAppearance";
  if (mapping.lastAppearance) out[mapping.lastAppearance] = "lastAppearance";
  if (mapping.notes) out[mapping.notes] = "notes";
  for (const [id, header] of Object.entries(mapping.traits)) out[header] = `trait:${id}`;
  return out;
}

/** Problems of a mapping against a file's header and the codebook, by mapping field. */
export function mappingProblems(mapping: ImportMapping, header: string[], traits: CodebookTrait[]): Record<string, string> {
  const problems: Record<string, string> = {};
  const has = new Set(header);
  const check = (path: string, column: string | null) => {
    if (column !== null && !has.has(column)) problems[path] = `The file has no column "${column}"`;
  };
  check("name", mapping.name);
  check("higherTaxon", mapping.higherTaxon);
  check("firstAppearance", mapping.firstAppearance);
  check("lastAppearance", mapping.lastAppearance);
  check("notes", mapping.notes);
  const byId = new Map(traits.map((t) => [t.id, t]));
  for (const [id, column] of Object.entries(mapping.traits)) {
    const trait = byId.get(id);
    if (!trait) problems[`traits.${id}`] = "No trait of this study has this id";
    else if (trait.retired) problems[`traits.${id}`] = `${trait.label} is retired: restore it in the codebook to import its values`;
    else check(`traits.${id}`, column);
  }
  return problems;
}
