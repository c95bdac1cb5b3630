import { z } from "zod";
import { findUnit } from "../timescale/lookup";
import { AGE_LIMIT_MA, isoDateSchema, oneLine, uuidSchema, personOrNoneSchema } from "./common";
import { timescaleRankSchema } from "./timescale";

export const BOUNDARY_OUTCOMES = ["survivor", "victim", "excluded"] as const;
export const boundaryOutcomeSchema = z
  .enum(BOUNDARY_OUTCOMES, { message: "Outcome must be survivor, victim or excluded" })
  .meta({ id: "BoundaryOutcome", description: "survivor: range crosses the boundary; victim: last seen in the window below it; excluded: not at risk" });
export type BoundaryOutcomeName = z.infer<typeof boundaryOutcomeSchema>;

/** Largest page of taxa or overrides one request returns. */
export const MAX_PAGE_SIZE = 500;
/** Largest outcome column one bulk request applies (the JSON body limit is 2 MB). */
export const MAX_BULK_OVERRIDES = 20000;

const pageSchema = z.coerce.number({ message: "page must be a whole number from 1" }).int("page must be a whole number from 1").min(1, "page must be a whole number from 1").default(1);
const pageSizeSchema = z.coerce
  .number({ message: `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}` })
  .int(`pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}`)
  .min(1, `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}`)
  .max(MAX_PAGE_SIZE, `pageSize must be a whole number from 1 to ${MAX_PAGE_SIZE}`)
  .default(100);

/**
 * A number given as a query parameter (a string in the URL); an empty parameter counts as not given.
 * `check` states the allowed values; `what` says them in words for the message.
 */
export const blankAsMissing = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);
export const numberParam = (field: string, what: string, check: (v: number) => boolean) => {
  // The message is a sentence like every other one ("Window must be…"), naming the field in words ("breadthShare" -> "Breadth share").
  const words = field.replace(/([a-z])([A-Z])/g, "$1 $2").toLowerCase();
  const message = `${words.charAt(0).toUpperCase()}${words.slice(1)} must be ${what}`;
  return z.preprocess(
    blankAsMissing,
    z.coerce
      .number({ message })
      .refine((v) => Number.isFinite(v) && check(v), message)
      .optional(),
  );
};

/** A boundary given as a number of a form (not a URL): an age in Ma, older than the present. */
export const boundaryMaSchema = z
  .number({ message: "Boundary must be an age in Ma (a number greater than 0)" })
  .refine(Number.isFinite, "Boundary must be an age in Ma (a number greater than 0)")
  .refine((v) => v > 0, "Boundary must be an age in Ma greater than 0")
  .refine((v) => v <= AGE_LIMIT_MA, `Boundary must be at most ${AGE_LIMIT_MA.toLocaleString("en-US")} Ma: nothing is older than the Earth`);

const reasonSchema = z
  .string({ message: "A reason is required" })
  .trim()
  .min(1, "A reason is required: say why this outcome is set by hand")
  .max(2000, "Reason must have at most 2,000 characters");

// ---------------------------------------------------------------- GET outcomes

/** The boundary and window of a query (outcomes, turnover): an age or a unit of the time scale, and a window in Myr. */
export const boundaryQueryFields = {
  boundary: numberParam("boundary", `an age in Ma (a number greater than 0, at most ${AGE_LIMIT_MA.toLocaleString("en-US")})`, (v) => v > 0 && v <= AGE_LIMIT_MA).meta({ description: "Boundary age in Ma (a custom age); give this or boundaryUnit" }),
  boundaryUnit: z
    .preprocess(
      blankAsMissing,
      z
        .string({ message: "boundaryUnit must name a unit of the time scale" })
        .trim()
        .refine((name) => findUnit(name) !== undefined, "boundaryUnit is not a unit of the time scale (e.g. Paleogene, Danian, Triassic)")
        .optional(),
    )
    .meta({ description: 'A unit of the time scale whose base is the boundary, e.g. "Paleogene" for 66.0 Ma' }),
  window: numberParam("window", "a duration in Myr (a number of 0 or more)", (v) => v >= 0).meta({ description: "Window below the boundary in Myr; default: the duration of the stage just below the boundary" }),
};

/** Exactly one of boundary and boundaryUnit. */
export function requireOneBoundary(q: { boundary?: number; boundaryUnit?: string }, ctx: z.RefinementCtx): void {
  if (q.boundary === undefined && q.boundaryUnit === undefined) {
    ctx.addIssue({ code: "custom", path: ["boundary"], message: "Choose a boundary: give boundary (an age in Ma) or boundaryUnit (a unit of the time scale)" });
  }
  if (q.boundary !== undefined && q.boundaryUnit !== undefined) {
    ctx.addIssue({ code: "custom", path: ["boundary"], message: "Give either boundary or boundaryUnit, not both" });
  }
}

export const outcomesQuerySchema = z
  .object({
    ...boundaryQueryFields,
    group: z.preprocess(blankAsMissing, boundaryOutcomeSchema.optional()).meta({ description: "Return the list of this group only (for paging through it); default: the first page of each group" }),
    page: pageSchema,
    pageSize: pageSizeSchema,
  })
  .superRefine(requireOneBoundary);
export type OutcomesQuery = z.input<typeof outcomesQuerySchema>;

export const OUTCOME_FLAGS = ["singleInterval", "lastSeenBelowBoundary", "missingRange", "invalidRange"] as const;

export const outcomeOverrideBriefSchema = z
  .object({
    id: z.uuid(),
    outcome: boundaryOutcomeSchema,
    boundaryMa: z.number().nullable().meta({ description: "The boundary it was set for; null: any boundary" }),
    reason: z.string(),
    source: z.enum(["manual", "import"]),
  })
  .meta({ id: "OutcomeOverrideBrief" });

export const outcomeTaxonSchema = z
  .object({
    taxonId: z.uuid(),
    name: z.string(),
    higherTaxon: z.string(),
    fad: z.number().nullable().meta({ description: "First appearance in Ma" }),
    lad: z.number().nullable().meta({ description: "Last appearance in Ma" }),
    computedOutcome: boundaryOutcomeSchema.meta({ description: "From the range alone (excluded when the range is missing or invalid)" }),
    outcome: boundaryOutcomeSchema.meta({ description: "Final outcome: the override's when there is one, else the computed one" }),
    override: outcomeOverrideBriefSchema.nullable(),
    rangeProblem: z.string().nullable().meta({ description: "Why the range cannot be used, when it cannot" }),
    flags: z.array(z.enum(OUTCOME_FLAGS)),
  })
  .meta({ id: "OutcomeTaxon" });
export type OutcomeTaxon = z.infer<typeof outcomeTaxonSchema>;

export const outcomeTaxonPageSchema = z
  .object({
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
    items: z.array(outcomeTaxonSchema).meta({ description: "Sorted by name" }),
  })
  .meta({ id: "OutcomeTaxonPage" });

const countsSchema = z.object({ survivor: z.number().int(), victim: z.number().int(), excluded: z.number().int(), total: z.number().int() });

export const outcomeWarningSchema = z
  .object({
    count: z.number().int().meta({ description: "How many taxa the warning touches" }),
    sample: z.array(z.string()).meta({ description: "Names of up to 20 of them, by name" }),
    note: z.string().meta({ description: "What the warning means for the result" }),
  })
  .meta({ id: "OutcomeWarning" });

export const outcomesResultSchema = z
  .object({
    boundary: z.number().meta({ description: "Boundary age in Ma" }),
    boundaryUnits: z
      .array(z.object({ name: z.string(), label: z.string(), rank: timescaleRankSchema }))
      .meta({ description: "Units of the time scale whose base is the boundary, broadest first (empty for a custom age between bases)" }),
    window: z.number().meta({ description: "Window below the boundary in Myr" }),
    windowDefaultFrom: z
      .object({
        name: z.string(),
        label: z.string(),
        base: z.number(),
        top: z.number(),
        duration: z.number(),
        wholeStage: z.boolean().meta({ description: "True when the boundary is the stage's top (the window is its duration); false for an age inside the stage (the window reaches down to its base)" }),
      })
      .nullable()
      .meta({ description: "The stage whose base ends the default window (the stage the boundary falls in), when no window was given; null when the window was given" }),
    timescaleVersion: z.string(),
    counts: countsSchema.meta({ description: "Final outcomes, after overrides" }),
    computedCounts: countsSchema.meta({ description: "Outcomes from the ranges alone, before overrides" }),
    overridesApplied: z.number().int().meta({ description: "Taxa whose final outcome comes from an override" }),
    proportionalExtinction: z.object({
      victims: z.number().int(),
      atRisk: z.number().int().meta({ description: "victims + survivors" }),
      value: z.number().nullable().meta({ description: "victims / atRisk; null when no taxon is at risk" }),
      ci: z.tuple([z.number(), z.number()]).nullable(),
      level: z.number(),
      method: z.string(),
    }),
    warnings: z.object({
      singleInterval: outcomeWarningSchema,
      lastSeenBelowBoundary: outcomeWarningSchema,
      missingRange: outcomeWarningSchema,
      invalidRange: outcomeWarningSchema,
    }),
    lists: z
      .object({ survivor: outcomeTaxonPageSchema.optional(), victim: outcomeTaxonPageSchema.optional(), excluded: outcomeTaxonPageSchema.optional() })
      .meta({ description: "One page of each group, or of the requested group only" }),
  })
  .meta({ id: "OutcomesResult" });
export type OutcomesResult = z.infer<typeof outcomesResultSchema>;

// ---------------------------------------------------------------- overrides

export const outcomeOverrideCreateSchema = z
  .strictObject({
    taxonId: uuidSchema,
    outcome: boundaryOutcomeSchema,
    boundaryMa: boundaryMaSchema.nullable().default(null).meta({ description: "The boundary this outcome holds for; null: any boundary" }),
    reason: reasonSchema,
  })
  .meta({ id: "OutcomeOverrideCreate" });
export type OutcomeOverrideCreateInput = z.input<typeof outcomeOverrideCreateSchema>;

export const outcomeOverrideRevokeSchema = z.strictObject({ reason: reasonSchema }).meta({ id: "OutcomeOverrideRevoke" });
export type OutcomeOverrideRevokeInput = z.input<typeof outcomeOverrideRevokeSchema>;

export const outcomeOverrideBulkSchema = z
  .strictObject({
    boundaryMa: boundaryMaSchema.nullable().meta({ description: "The boundary the column was coded for; null: any boundary" }),
    reason: reasonSchema,
    items: z
      .array(
        z.strictObject({
          taxonName: z.string({ message: "Taxon name is required" }).trim().min(1, "Taxon name is required").check(oneLine("Taxon name")),
          outcome: boundaryOutcomeSchema,
        }),
        { message: "items must be a list of { taxonName, outcome }" },
      )
      .min(1, "The outcome column is empty")
      .max(MAX_BULK_OVERRIDES, `At most ${MAX_BULK_OVERRIDES.toLocaleString("en-US")} rows per request`),
  })
  .meta({ id: "OutcomeOverrideBulk" });
export type OutcomeOverrideBulkInput = z.input<typeof outcomeOverrideBulkSchema>;

export const outcomeOverrideParamsSchema = z.object({ studyId: uuidSchema, overrideId: uuidSchema });

export const outcomeOverrideListQuerySchema = z.object({
  status: z.enum(["active", "revoked", "all"], { message: "status must be active, revoked or all" }).default("all"),
  page: pageSchema,
  pageSize: pageSizeSchema,
});

export const outcomeOverrideSchema = z
  .object({
    id: z.uuid(),
    taxonId: z.uuid(),
    taxonName: z.string(),
    outcome: boundaryOutcomeSchema,
    boundaryMa: z.number().nullable().meta({ description: "null: any boundary" }),
    reason: z.string(),
    source: z.enum(["manual", "import"]),
    active: z.boolean(),
    createdAt: isoDateSchema,
    createdBy: personOrNoneSchema,
    revokedAt: isoDateSchema.nullable(),
    revokedBy: personOrNoneSchema,
    revokeReason: z.string().nullable(),
  })
  .meta({ id: "OutcomeOverride" });
export type OutcomeOverride = z.infer<typeof outcomeOverrideSchema>;

export const outcomeOverrideListSchema = z
  .object({
    total: z.number().int(),
    page: z.number().int(),
    pageSize: z.number().int(),
    overrides: z.array(outcomeOverrideSchema).meta({ description: "Newest first" }),
  })
  .meta({ id: "OutcomeOverrideList" });

export const outcomeOverrideCreatedSchema = z
  .object({
    override: outcomeOverrideSchema,
    replacedOverrideId: z.uuid().nullable().meta({ description: "The active override for the same taxon and boundary that this one replaced (it is revoked)" }),
  })
  .meta({ id: "OutcomeOverrideCreated" });

export const outcomeOverrideBulkResultSchema = z
  .object({
    created: z.number().int(),
    replaced: z.number().int().meta({ description: "Active overrides for the same taxa and boundary that were revoked and replaced" }),
    batchId: z.uuid().meta({ description: "Shared by the coding decisions this request wrote" }),
  })
  .meta({ id: "OutcomeOverrideBulkResult" });

// ---------------------------------------------------------------- rates through time

/** The common teaching threshold for calling a loss a mass extinction (common practice, no source). */
export const MASS_EXTINCTION_TEACHING_THRESHOLD = 0.3;

export const stageRatesSchema = z
  .object({
    name: z.string(),
    label: z.string(),
    base: z.number(),
    top: z.number(),
    duration: z.number(),
    nbt: z.number().int().meta({ description: "Crosses both the base and the top" }),
    nbL: z.number().int().meta({ description: "Crosses the base, last seen in the stage" }),
    nFt: z.number().int().meta({ description: "First seen in the stage, crosses the top" }),
    nFL: z.number().int().meta({ description: "First and last seen in the stage" }),
    taxonCount: z.number().int(),
    q: z.number().nullable().meta({ description: "Per-capita extinction rate per stage, -ln(nbt / (nbt + nbL)); null when undefined" }),
    qPerMyr: z.number().nullable(),
    p: z.number().nullable().meta({ description: "Per-capita origination rate per stage; null when undefined" }),
    pPerMyr: z.number().nullable(),
    proportionalExtinction: z.number().nullable().meta({ description: "(nbL + nFL) / taxonCount; null when no taxon is present" }),
    proportionalOrigination: z.number().nullable(),
  })
  .meta({ id: "StageRates" });
export type StageRates = z.infer<typeof stageRatesSchema>;

export const ratesResultSchema = z
  .object({
    timescaleVersion: z.string(),
    method: z.string(),
    stages: z.array(stageRatesSchema).meta({ description: "Oldest first, from the oldest to the youngest stage the study's taxa reach" }),
    taxaUsed: z.number().int(),
    leftOut: z.object({ missingRange: z.number().int(), invalidRange: z.number().int() }).meta({ description: "Taxa without a usable range, not counted" }),
    threshold: z.object({ proportion: z.number(), note: z.string() }),
  })
  .meta({ id: "RatesResult" });
export type RatesResult = z.infer<typeof ratesResultSchema>;
