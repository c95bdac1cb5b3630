import { z } from "zod";
import { blankAsMissing, boundaryQueryFields, numberParam, requireOneBoundary } from "./outcomes";

// ---------------------------------------------------------------- GET turnover

/** The default share above which a group counts as hit in the scorecard's breadth, realms and geography. */
export const DEFAULT_BREADTH_SHARE = 0.3;

export const turnoverQuerySchema = z
  .object({
    ...boundaryQueryFields,
    splitBy: z
      .preprocess(
        blankAsMissing,
        z
          .string({ message: 'splitBy must be "higherTaxon" or the key of a trait with states' })
          .trim()
          .max(100, 'splitBy must be "higherTaxon" or the key of a trait with states')
          .optional(),
      )
      .meta({ description: 'Split the diversity curve by "higherTaxon" or by the states of this trait (its key); default: no split' }),
    breadthShare: numberParam("breadthShare", "a share between 0 and 1 (e.g. 0.3)", (v) => v > 0 && v < 1).meta({
      description: "Scorecard: a group is hit when it loses more than this share; default 0.3",
    }),
  })
  .superRefine(requireOneBoundary);
export type TurnoverQuery = z.input<typeof turnoverQuerySchema>;
export type TurnoverParams = z.output<typeof turnoverQuerySchema>;

const contrastSchema = z
  .object({
    value: z.number().nullable().meta({ description: "The crisis stage's rate (per stage); null when undefined" }),
    z: z.number().nullable().meta({ description: "Robust z: (value - median) / (1.4826 * mad); null with fewer than 5 other stages, mad 0, or no rate" }),
    median: z.number().nullable().meta({ description: "Median of the other stages' rates" }),
    mad: z.number().nullable().meta({ description: "Median absolute deviation of the other stages' rates, unscaled" }),
    n: z.number().int().meta({ description: "Other stages with a rate" }),
    departs: z.boolean().nullable().meta({ description: "|z| >= 3.5 (Iglewicz & Hoaglin 1993); null when z is null" }),
    reason: z.string().nullable().meta({ description: "Why z is null, in words" }),
  })
  .meta({ id: "RateContrast" });

const stageCountsSchema = z.object({
  name: z.string(),
  rangeThrough: z.number().int().meta({ description: "Taxa whose range reaches into the stage" }),
  crossingBase: z.number().int().meta({ description: "Taxa crossing the stage's base" }),
  crossingTop: z.number().int().meta({ description: "Taxa crossing the stage's top" }),
});

export const turnoverStageSchema = z
  .object({
    name: z.string(),
    label: z.string(),
    base: z.number(),
    top: z.number(),
    duration: z.number(),
    nbt: z.number().int(),
    nbL: z.number().int(),
    nFt: z.number().int(),
    nFL: z.number().int(),
    q: z.number().nullable().meta({ description: "Per-capita extinction rate per stage (Foote 2000); null when undefined" }),
    p: z.number().nullable().meta({ description: "Per-capita origination rate per stage (Foote 2000); null when undefined" }),
    qPerMyr: z.number().nullable(),
    pPerMyr: z.number().nullable(),
    rangeThrough: z.number().int().meta({ description: "Range-through richness: taxa whose range reaches into the stage" }),
    crossingBase: z.number().int(),
    crossingTop: z.number().int(),
    firstSeen: z.number().int(),
    lastSeen: z.number().int(),
    singleStage: z.number().int(),
    crisis: z.boolean().meta({ description: "The stage the boundary closes" }),
    edge: z.boolean().meta({ description: "The oldest or youngest stage of the span: its counts and rates are truncated" }),
  })
  .meta({ id: "TurnoverStage" });
export type TurnoverStage = z.infer<typeof turnoverStageSchema>;

const groupLossRowSchema = z.object({
  name: z.string(),
  victims: z.number().int(),
  atRisk: z.number().int(),
  proportion: z.number().nullable(),
  ci: z.tuple([z.number(), z.number()]).nullable(),
  over: z.boolean().nullable().meta({ description: "Lost more than the chosen share; null when fewer than 5 taxa were at risk" }),
});

const lossDimensionSchema = z.object({
  key: z.string(),
  label: z.string(),
  assessed: z.number().int(),
  over: z.number().int(),
  share: z.number().nullable(),
  groups: z.array(groupLossRowSchema),
});

export const SCORECARD_STATUSES = ["meets", "falls short", "uncertain", "reported", "not assessable"] as const;

export const scorecardItemSchema = z
  .object({
    criterion: z.enum(["magnitude", "breadth", "realms", "geography", "brevity", "standingOut"]),
    label: z.string(),
    status: z.enum(SCORECARD_STATUSES),
    summary: z.string(),
    value: z.number().nullable(),
    ci: z.tuple([z.number(), z.number()]).nullable(),
    dimensions: z.array(lossDimensionSchema),
  })
  .meta({ id: "ScorecardItem" });
export type ScorecardItemResult = z.infer<typeof scorecardItemSchema>;

export const turnoverResultSchema = z
  .object({
    timescaleVersion: z.string(),
    method: z.string(),
    boundary: z.number().meta({ description: "Boundary age in Ma" }),
    window: z.number().meta({ description: "Window below the boundary in Myr" }),
    taxaUsed: z.number().int(),
    leftOut: z.object({ missingRange: z.number().int(), invalidRange: z.number().int() }),
    crisisStage: z
      .object({ name: z.string(), label: z.string(), base: z.number(), top: z.number() })
      .nullable()
      .meta({ description: "The stage the boundary closes (the stage holding the window); null when the study's taxa do not reach it" }),
    stages: z.array(turnoverStageSchema).meta({ description: "Oldest first, over the stages the study's taxa reach" }),
    contrast: z
      .object({
        extinction: contrastSchema,
        origination: contrastSchema,
        departing: z.enum(["extinction", "origination", "both", "neither", "not assessable"]),
        sentence: z.string(),
        departureZ: z.number(),
        method: z.string(),
      })
      .nullable()
      .meta({ description: "How far the crisis stage's rates stand out from the other stages; null without a crisis stage" }),
    diversity: z.object({
      splitBy: z.object({ kind: z.enum(["none", "higherTaxon", "trait"]), key: z.string().nullable(), label: z.string() }),
      groups: z
        .array(z.object({ key: z.string().nullable(), label: z.string(), taxa: z.number().int(), stages: z.array(stageCountsSchema) }))
        .meta({ description: "One per higher taxon or trait state (key null: not coded); empty without a split" }),
      splitOptions: z.array(z.object({ value: z.string(), label: z.string() })).meta({ description: "What the curve can be split by" }),
      cautions: z.array(z.string()),
    }),
    scorecard: z.object({
      items: z.array(scorecardItemSchema),
      threshold: z.number(),
      breadthShare: z.number(),
      level: z.number(),
      minGroupAtRisk: z.number().int(),
      source: z.string(),
      caution: z.string(),
    }),
  })
  .meta({ id: "TurnoverResult" });
export type TurnoverResult = z.infer<typeof turnoverResultSchema>;
