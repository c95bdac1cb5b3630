// The codebook API: a study's trait definitions. Both sides check a definition with
// `traitDefinitionProblems`, so the codebook screen and the server give the same messages.
import { z } from "zod";
import { NUMERIC_TRANSFORMS, TRAIT_ASPECTS, TRAIT_KINDS, type NumericTransform, type TraitKind } from "../codebook";
import { isoDateSchema, oneLine, uuidSchema, wellFormed } from "./common";

export const traitKindSchema = z
  .enum(TRAIT_KINDS, { message: `Kind must be one of ${TRAIT_KINDS.join(", ")}` })
  .meta({ id: "TraitKind", description: "binary: two states; categorical: unordered states; ordinal: ordered states; numeric: a number with a unit" });
export const traitAspectSchema = z
  .enum(TRAIT_ASPECTS, { message: `Aspect must be one of ${TRAIT_ASPECTS.join(", ")}` })
  .meta({ id: "TraitAspect", description: "ecology: habitat, feeding, life habit, size, range, environment; other: anything else" });
export const numericTransformSchema = z
  .enum(NUMERIC_TRANSFORMS, { message: `Transform must be one of ${NUMERIC_TRANSFORMS.join(", ")}` })
  .meta({ id: "NumericTransform", description: "How analyses read a numeric trait: as given, or as its base-10 logarithm" });

export const TRAIT_KEY_PATTERN = /^[a-z][a-z0-9_]*$/;
export const STATE_CODE_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.+-]*$/;

export const traitKeySchema = z
  .string({ message: "Key is required" })
  .trim()
  .min(1, "Key is required")
  .max(60, "Key must have at most 60 characters")
  .regex(TRAIT_KEY_PATTERN, "Key must start with a lower-case letter and hold only lower-case letters, digits and _ (e.g. body_size)");

const labelSchema = z.string({ message: "Label is required" }).trim().min(1, "Label is required").max(120, "Label must have at most 120 characters").check(oneLine("Label"));

export const traitStateSchema = z
  .object({ code: z.string(), label: z.string(), order: z.number().int() })
  .meta({ id: "TraitState", description: "One allowed value of a binary, categorical or ordinal trait; `order` ranks ordinal states from 0" });

export const traitStateInputSchema = z
  .strictObject({
    code: z
      .string({ message: "State code is required" })
      .trim()
      .min(1, "State code is required")
      .max(40, "State code must have at most 40 characters")
      .regex(STATE_CODE_PATTERN, "State code must start with a letter or digit and hold only letters, digits and _ . + -"),
    label: labelSchema,
  })
  .meta({ id: "TraitStateInput", description: "The order of states is their order in the list" });

const unitSchema = z.string().trim().max(40, "Unit must have at most 40 characters").check(oneLine("Unit")).nullable();
const boundSchema = (what: string) =>
  z.number({ message: `${what} must be a number` }).refine(Number.isFinite, `${what} must be a finite number`).nullable();
const codingRuleSchema = z.string().trim().max(8000, "Coding rule must have at most 8,000 characters").check(wellFormed("Coding rule"));

export interface TraitDefinition {
  kind: TraitKind;
  states: Array<{ code: string; label: string }>;
  unit: string | null;
  transform: NumericTransform;
  minValue: number | null;
  maxValue: number | null;
}

/**
 * Problems of a whole trait definition, each with the field at fault. Codes and labels are read
 * case-blind in imports, so no code or label may stand for two different states.
 */
export function traitDefinitionProblems(def: TraitDefinition): Array<{ path: string[]; message: string }> {
  const problems: Array<{ path: string[]; message: string }> = [];
  const n = def.states.length;
  if (def.kind === "numeric") {
    if (n > 0) problems.push({ path: ["states"], message: "A numeric trait has no states; use unit, minimum and maximum instead" });
    if (def.minValue !== null && def.maxValue !== null && def.minValue > def.maxValue) {
      problems.push({ path: ["maxValue"], message: "Maximum must not be smaller than minimum" });
    }
    if (def.transform === "log10" && def.minValue !== null && def.minValue < 0) {
      problems.push({ path: ["minValue"], message: "A log10 transform needs values above 0: the minimum must be 0 or more" });
    }
  } else {
    if (def.kind === "binary" && n !== 2) problems.push({ path: ["states"], message: "A binary trait has exactly two states" });
    if (def.kind !== "binary" && n < 2) problems.push({ path: ["states"], message: `A ${def.kind} trait needs at least two states` });
    if (def.unit) problems.push({ path: ["unit"], message: "Only numeric traits have a unit" });
    if (def.transform !== "none") problems.push({ path: ["transform"], message: "Only numeric traits can be transformed" });
    if (def.minValue !== null) problems.push({ path: ["minValue"], message: "Only numeric traits have a minimum" });
    if (def.maxValue !== null) problems.push({ path: ["maxValue"], message: "Only numeric traits have a maximum" });
    const owner = new Map<string, number>();
    def.states.forEach((s, i) => {
      for (const word of new Set([s.code.toLowerCase(), s.label.toLowerCase()])) {
        const other = owner.get(word);
        if (other !== undefined && other !== i) {
          problems.push({ path: ["states", String(i)], message: `"${word}" already names state ${other + 1}: codes and labels must be unique (case is ignored)` });
        } else owner.set(word, i);
      }
    });
  }
  return problems;
}

export const traitCreateSchema = z
  .strictObject({
    key: traitKeySchema,
    label: labelSchema,
    kind: traitKindSchema,
    aspect: traitAspectSchema.default("ecology"),
    states: z.array(traitStateInputSchema).max(200, "At most 200 states").default([]),
    unit: unitSchema.default(null),
    transform: numericTransformSchema.default("none"),
    minValue: boundSchema("Minimum").default(null),
    maxValue: boundSchema("Maximum").default(null),
    codingRule: codingRuleSchema.default(""),
  })
  .superRefine((def, ctx) => {
    for (const p of traitDefinitionProblems(def)) ctx.addIssue({ code: "custom", path: p.path, message: p.message });
  })
  .meta({ id: "TraitCreate" });
export type TraitCreateInput = z.input<typeof traitCreateSchema>;

export const traitUpdateSchema = z
  .strictObject({
    key: traitKeySchema.optional(),
    label: labelSchema.optional(),
    kind: traitKindSchema.optional(),
    aspect: traitAspectSchema.optional(),
    states: z.array(traitStateInputSchema).max(200, "At most 200 states").optional(),
    unit: unitSchema.optional(),
    transform: numericTransformSchema.optional(),
    minValue: boundSchema("Minimum").optional(),
    maxValue: boundSchema("Maximum").optional(),
    codingRule: codingRuleSchema.optional(),
    retired: z.boolean({ message: "retired must be true or false" }).optional().meta({ description: "true retires the trait (its values are kept), false restores it" }),
    remap: z
      .record(z.string(), z.string().nullable())
      .optional()
      .meta({ description: "Where the values of removed states go: { oldCode: newCode } or { oldCode: null } to clear them; one coding decision per changed value" }),
    reason: z.string().trim().max(2000, "Reason must have at most 2,000 characters").optional().meta({ description: "Reason recorded on the coding decisions a remap writes" }),
  })
  .meta({ id: "TraitUpdate", description: "Only the given fields change; the merged definition must pass the same checks as a new trait" });
export type TraitUpdateInput = z.input<typeof traitUpdateSchema>;

export const traitReorderSchema = z
  .strictObject({
    traitIds: z.array(uuidSchema, { message: "traitIds must be a list of trait ids" }).min(1, "traitIds must name every trait of the study in the new order"),
  })
  .meta({ id: "TraitReorder" });
export type TraitReorderInput = z.input<typeof traitReorderSchema>;

export const traitSchema = z
  .object({
    id: z.uuid(),
    key: z.string(),
    label: z.string(),
    kind: traitKindSchema,
    aspect: traitAspectSchema,
    states: z.array(traitStateSchema),
    unit: z.string().nullable(),
    transform: numericTransformSchema,
    minValue: z.number().nullable(),
    maxValue: z.number().nullable(),
    codingRule: z.string(),
    sortOrder: z.number().int(),
    retired: z.boolean(),
    retiredAt: isoDateSchema.nullable(),
    createdAt: isoDateSchema,
    updatedAt: isoDateSchema,
  })
  .meta({ id: "Trait" });
export type Trait = z.infer<typeof traitSchema>;

export const traitListSchema = z.object({ traits: z.array(traitSchema).meta({ description: "In codebook order, retired ones included" }) }).meta({ id: "TraitList" });
export type TraitList = z.infer<typeof traitListSchema>;

export const traitParamsSchema = z.object({ studyId: uuidSchema, traitId: uuidSchema });

const taxonBriefSchema = z.object({ id: z.uuid(), name: z.string() });

export const traitUsageSchema = z
  .object({
    traitId: z.uuid(),
    taxaCount: z.number().int().meta({ description: "Taxa of the study" }),
    valueCount: z.number().int().meta({ description: "Taxa holding a value of this trait" }),
    byState: z
      .array(z.object({ code: z.string(), label: z.string(), count: z.number().int(), sample: z.array(taxonBriefSchema).meta({ description: "Up to 10, by name" }) }))
      .meta({ description: "For state traits: every state with the taxa holding it; values outside the codebook appear with an empty label" }),
    numeric: z.object({ min: z.number().nullable(), max: z.number().nullable() }).nullable().meta({ description: "For numeric traits: the smallest and largest value held" }),
  })
  .meta({ id: "TraitUsage" });
export type TraitUsage = z.infer<typeof traitUsageSchema>;

/** 409 answer of PATCH traits/:traitId when the change would orphan values. */
export const traitChangeConflictSchema = z
  .object({
    error: z.object({ code: z.enum(["states_in_use", "values_out_of_range", "kind_in_use"]), message: z.string() }),
    affected: z
      .array(
        z.object({
          code: z.string().nullable().meta({ description: "The removed state; null for numeric values" }),
          label: z.string(),
          count: z.number().int(),
          sample: z.array(taxonBriefSchema.extend({ value: z.union([z.string(), z.number()]) })).meta({ description: "Up to 10 taxa, by name" }),
        }),
      )
      .meta({ description: "states_in_use: send `remap` to say where each removed state's values go" }),
  })
  .meta({ id: "TraitChangeConflict" });
export type TraitChangeConflict = z.infer<typeof traitChangeConflictSchema>;

export const traitUpdateResultSchema = z
  .object({ trait: traitSchema, remapped: z.number().int().meta({ description: "Values changed by the remap (one coding decision each)" }), batchId: z.uuid().nullable() })
  .meta({ id: "TraitUpdateResult" });
export type TraitUpdateResult = z.infer<typeof traitUpdateResultSchema>;
