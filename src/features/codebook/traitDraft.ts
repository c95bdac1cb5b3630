// The trait editor's working copy: text as typed, turned into the API's input and checked with the
// same zod schema the server uses.
import type { NumericTransform, TraitAspect, TraitKind } from "@shared/codebook";
import { traitCreateSchema, type Trait, type TraitCreateInput, type TraitUpdateInput } from "@shared/schemas/traits";
import { issuesToFieldErrors, type FieldErrors } from "../../lib/forms";

export interface StateDraft {
  /** A key for React lists; never sent. */
  localId: string;
  code: string;
  label: string;
  /** The code this row had when the editor opened (null for a new row): says which values move. */
  originalCode: string | null;
}

export interface TraitDraft {
  key: string;
  label: string;
  kind: TraitKind;
  aspect: TraitAspect;
  states: StateDraft[];
  unit: string;
  transform: NumericTransform;
  minValue: string;
  maxValue: string;
  codingRule: string;
}

let nextLocalId = 1;
export const newStateDraft = (code = "", label = "", originalCode: string | null = null): StateDraft => ({
  localId: `s${nextLocalId++}`,
  code,
  label,
  originalCode,
});

export function emptyDraft(): TraitDraft {
  return {
    key: "",
    label: "",
    kind: "categorical",
    aspect: "ecology",
    states: [newStateDraft(), newStateDraft()],
    unit: "",
    transform: "none",
    minValue: "",
    maxValue: "",
    codingRule: "",
  };
}

export function draftFromTrait(trait: Trait): TraitDraft {
  return {
    key: trait.key,
    label: trait.label,
    kind: trait.kind,
    aspect: trait.aspect,
    states: [...trait.states].sort((a, b) => a.order - b.order).map((s) => newStateDraft(s.code, s.label, s.code)),
    unit: trait.unit ?? "",
    transform: trait.transform,
    minValue: trait.minValue === null ? "" : String(trait.minValue),
    maxValue: trait.maxValue === null ? "" : String(trait.maxValue),
    codingRule: trait.codingRule,
  };
}

/** Empty stays null; anything else becomes a number (NaN for junk, which the schema names). */
const boundFromText = (text: string): number | null => (text.trim() === "" ? null : Number(text.trim()));

/** The definition as the API takes it; a numeric trait has no states, a state trait no unit. */
export function draftToInput(draft: TraitDraft): Required<Omit<TraitCreateInput, "aspect">> & { aspect: TraitAspect } {
  const numeric = draft.kind === "numeric";
  return {
    key: draft.key,
    label: draft.label,
    kind: draft.kind,
    aspect: draft.aspect,
    states: numeric ? [] : draft.states.map((s) => ({ code: s.code, label: s.label })),
    unit: numeric && draft.unit.trim() !== "" ? draft.unit : null,
    transform: numeric ? draft.transform : "none",
    minValue: numeric ? boundFromText(draft.minValue) : null,
    maxValue: numeric ? boundFromText(draft.maxValue) : null,
    codingRule: draft.codingRule,
  };
}

/** Field messages from the shared schema, keyed like the server's (`states.1.code`). */
export function checkDraft(draft: TraitDraft): { ok: true; input: ReturnType<typeof draftToInput> } | { ok: false; errors: FieldErrors } {
  const input = draftToInput(draft);
  const result = traitCreateSchema.safeParse(input);
  if (!result.success) {
    const errors = issuesToFieldErrors(result.error);
    // Two empty rows "share" the empty code; their own "required" messages already say it.
    for (const [path, message] of Object.entries(errors)) if (/^states\.\d+$/.test(path) && message.startsWith('"" already')) delete errors[path];
    return { ok: false, errors };
  }
  return { ok: true, input };
}

/** Only what changed, for PATCH; the merged definition was already checked whole. */
export function changesFrom(trait: Trait, input: ReturnType<typeof draftToInput>): TraitUpdateInput {
  const changes: TraitUpdateInput = {};
  if (input.key.trim() !== trait.key) changes.key = input.key;
  if (input.label.trim() !== trait.label) changes.label = input.label;
  if (input.kind !== trait.kind) changes.kind = input.kind;
  if (input.aspect !== trait.aspect) changes.aspect = input.aspect;
  const oldStates = [...trait.states].sort((a, b) => a.order - b.order).map((s) => `${s.code}\u0000${s.label}`);
  const newStates = (input.states ?? []).map((s) => `${s.code.trim()}\u0000${s.label.trim()}`);
  if (oldStates.join("\u0001") !== newStates.join("\u0001")) changes.states = input.states;
  if ((input.unit?.trim() || null) !== trait.unit) changes.unit = input.unit;
  if (input.transform !== trait.transform) changes.transform = input.transform;
  if (input.minValue !== trait.minValue) changes.minValue = input.minValue;
  if (input.maxValue !== trait.maxValue) changes.maxValue = input.maxValue;
  if (input.codingRule.trim() !== trait.codingRule) changes.codingRule = input.codingRule;
  return changes;
}

/** Codes of the saved trait that the draft no longer has: their values need a new home. */
export function removedCodes(trait: Trait, draft: TraitDraft): string[] {
  if (trait.kind === "numeric") return [];
  const kept = new Set(draft.kind === "numeric" ? [] : draft.states.map((s) => s.code.trim()));
  return trait.states.map((s) => s.code).filter((code) => !kept.has(code));
}
