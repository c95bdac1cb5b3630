// The audit trail API: every change of a trait value, a range or a taxon is one coding decision.
// Any decision, bulk edit or import can be reverted; a revert is itself a decision.
import { z } from "zod";
import { isoDateSchema, uuidSchema } from "./common";
import { decisionUserSchema, requiredReasonSchema } from "./taxa";

export const DECISION_ACTIONS = ["create", "update", "delete", "restore", "revert", "override"] as const;

export const decisionSchema = z
  .object({
    id: z.uuid(),
    taxonId: z.uuid().nullable(),
    taxonName: z.string().nullable(),
    traitId: z.uuid().nullable(),
    traitKey: z.string().nullable(),
    field: z.string().meta({ description: "A trait id, name | higherTaxon | notes | fad | lad, taxon (created, deleted, restored) or outcome" }),
    action: z.string().meta({ description: DECISION_ACTIONS.join(" | ") }),
    oldValue: z.unknown(),
    newValue: z.unknown(),
    reason: z.string(),
    user: decisionUserSchema,
    importId: z.uuid().nullable(),
    revertsId: z.uuid().nullable().meta({ description: "The decision this one reverted" }),
    revertedById: z.uuid().nullable().meta({ description: "The latest decision that reverted this one" }),
    batchId: z.uuid().nullable(),
    createdAt: isoDateSchema,
  })
  .meta({ id: "Decision" });
export type Decision = z.infer<typeof decisionSchema>;

export const decisionListQuerySchema = z.object({
  taxonId: uuidSchema.optional(),
  traitId: uuidSchema.optional(),
  importId: uuidSchema.optional(),
  userId: uuidSchema.optional(),
  batchId: uuidSchema.optional(),
  page: z.coerce.number({ message: "page must be a whole number from 1" }).int("page must be a whole number from 1").min(1, "page must be a whole number from 1").default(1),
  pageSize: z.coerce
    .number({ message: "pageSize must be a whole number from 1 to 500" })
    .int("pageSize must be a whole number from 1 to 500")
    .min(1, "pageSize must be a whole number from 1 to 500")
    .max(500, "pageSize must be a whole number from 1 to 500")
    .default(50),
});
export type DecisionListQuery = z.output<typeof decisionListQuerySchema>;

export const decisionListSchema = z
  .object({ rows: z.array(decisionSchema).meta({ description: "Newest first" }), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() })
  .meta({ id: "DecisionList" });
export type DecisionList = z.infer<typeof decisionListSchema>;

export const decisionParamsSchema = z.object({ studyId: uuidSchema, decisionId: uuidSchema });
export const batchParamsSchema = z.object({ studyId: uuidSchema, batchId: uuidSchema });

export const decisionRevertSchema = z.strictObject({ reason: requiredReasonSchema }).meta({ id: "DecisionRevert" });
export type DecisionRevertInput = z.input<typeof decisionRevertSchema>;

export const revertResultSchema = z
  .object({
    batchId: z.uuid().meta({ description: "Shared by the revert decisions written" }),
    reverted: z.number().int().meta({ description: "Decisions reverted" }),
    skipped: z.number().int().meta({ description: "Decisions left alone because the value changed since (only with skipChanged)" }),
  })
  .meta({ id: "RevertResult" });
export type RevertResult = z.infer<typeof revertResultSchema>;

/** 409 answer of a revert when values changed since the decisions being reverted. */
export const revertConflictSchema = z
  .object({
    error: z.object({ code: z.enum(["changed_since", "already_reverted", "not_revertible"]), message: z.string() }),
    conflicts: z
      .array(
        z.object({
          decisionId: z.uuid(),
          taxonId: z.uuid().nullable(),
          taxonName: z.string().nullable(),
          field: z.string(),
          traitId: z.uuid().nullable(),
          expectedValue: z.unknown().meta({ description: "The value the decision wrote" }),
          currentValue: z.unknown().meta({ description: "The value held now" }),
          message: z.string().meta({ description: "Why this decision cannot be reverted now" }),
          setBy: decisionUserSchema,
          setAt: isoDateSchema.nullable(),
        }),
      )
      .meta({ description: "Up to 200 conflicts" }),
    conflictCount: z.number().int(),
  })
  .meta({ id: "RevertConflict" });
export type RevertConflict = z.infer<typeof revertConflictSchema>;
