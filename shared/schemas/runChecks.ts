// The checks a run makes of its own findings: crisis against background (is the crisis's
// selectivity different from the background boundaries'?) and the robustness panel (does each
// contrast survive other reasonable choices?). Parameters and stored results.
import { z } from "zod";
import { traitKindSchema } from "./traits";

const ciSchema = z.tuple([z.number(), z.number()]);

/** The run parameter naming the crisis among the run's boundaries. */
export const crisisBoundaryParamSchema = z
  .number({ message: "crisisBoundary must be the number of one of the run's boundaries (0 for the first)" })
  .int("crisisBoundary must be a whole number (0 for the first boundary)")
  .min(0, "crisisBoundary must be 0 or more (0 for the first boundary)")
  .optional()
  .meta({
    description:
      "Index (0 for the first) of the boundary that is the crisis; the others are background. With two or more boundaries, each trait's selectivity at the crisis is tested against background (Jablonski 1986). Left out: no such test.",
  });

export const crisisComparisonContrastSchema = z
  .object({
    contrast: z.string(),
    state: z.string().nullable(),
    backgroundOddsRatio: z.number(),
    backgroundCi: ciSchema,
    crisisOddsRatio: z.number(),
    crisisCi: ciSchema,
    ratio: z.object({ estimate: z.number(), ci: ciSchema }).meta({ description: "Crisis odds ratio over background odds ratio, with a Wald interval" }),
    sentence: z.string().nullable().meta({ description: "Set only when the trait's adjusted test and this contrast's interval say the crisis differed" }),
  })
  .meta({ id: "CrisisComparisonContrast" });

export const crisisComparisonTraitSchema = z
  .object({
    key: z.string(),
    label: z.string(),
    kind: traitKindSchema,
    reference: z.string().nullable(),
    used: z.number().int().meta({ description: "Taxon rows with a usable value, a taxon once per boundary it was at risk across" }),
    test: z
      .object({ statistic: z.number(), df: z.number().int(), pValue: z.number(), adjustedPValue: z.number().nullable() })
      .nullable()
      .meta({ description: "Likelihood-ratio test of the crisis interaction; null when the model could not be fitted (summary says why)" }),
    contrasts: z.array(crisisComparisonContrastSchema),
    differs: z.boolean().meta({ description: "The adjusted p-value is below 1 - level" }),
    summary: z.string(),
    method: z.string().nullable(),
    notes: z.array(z.string()),
  })
  .meta({ id: "CrisisComparisonTrait" });

export const crisisComparisonResultSchema = z
  .object({
    crisis: z.object({ index: z.number().int(), label: z.string() }),
    background: z.array(z.string()),
    correction: z.enum(["bh", "holm", "bonferroni"]),
    level: z.number(),
    traits: z.array(crisisComparisonTraitSchema),
    method: z.string(),
  })
  .meta({ id: "CrisisComparison" });

export type CrisisComparisonContrast = z.infer<typeof crisisComparisonContrastSchema>;
export type CrisisComparisonTrait = z.infer<typeof crisisComparisonTraitSchema>;
export type CrisisComparisonResult = z.infer<typeof crisisComparisonResultSchema>;

/** What a run stores about crisis against background: the result, or why there is none. */
export const runCrisisSchema = z
  .union([
    z.object({ status: z.literal("computed"), result: crisisComparisonResultSchema }),
    z.object({ status: z.literal("not-computed"), reason: z.string() }),
  ])
  .meta({ id: "RunCrisisComparison" });
export type RunCrisis = z.infer<typeof runCrisisSchema>;

// ---------------------------------------------------------------- robustness panel

/** Default alternative windows, as multiples of each boundary's own window. */
export const DEFAULT_WINDOW_FACTORS = [0.5, 1.5, 2];

export const robustnessParamsSchema = z
  .strictObject({
    windowFactors: z
      .array(
        z
          .number({ message: "Each window factor must be a number, e.g. 0.5 for half the window" })
          .refine((v) => Number.isFinite(v) && v > 0, "Each window factor must be greater than 0")
          .refine((v) => v <= 10, "Each window factor must be at most 10")
          .refine((v) => v !== 1, "A window factor of 1 is the run's own window; leave it out"),
        { message: "windowFactors must be a list of numbers, e.g. [0.5, 1.5, 2]" },
      )
      .max(6, "Give at most 6 window factors")
      .default(DEFAULT_WINDOW_FACTORS)
      .meta({ description: "Alternative windows as multiples of each boundary's window; default 0.5, 1.5 and 2" }),
    truncationMyr: z
      .number({ message: "truncationMyr must be a distance in Myr" })
      .refine((v) => Number.isFinite(v) && v > 0, "truncationMyr must be greater than 0")
      .optional()
      .meta({ description: "Last appearances within this distance (Myr) of the boundary are recoded in the truncation variants; default a quarter of each boundary's window" }),
  })
  .meta({ id: "RobustnessParams" });
export type RobustnessParams = z.output<typeof robustnessParamsSchema>;

const intervalSchema = z.object({ estimate: z.number(), ci: ciSchema });
const verdictSchema = z.object({
  status: z.enum(["holds", "fragile", "never-there", "not-estimated"]),
  changedUnder: z.array(z.string()).meta({ description: "Variants under which direction or significance differs from the run's own choice" }),
  sentence: z.string(),
});
const jackknifeSchema = z
  .object({
    min: z.number(),
    max: z.number(),
    mostInfluential: z.object({ clade: z.string(), estimate: z.number() }).nullable(),
    cladesLeftOut: z.number().int(),
  })
  .nullable();

export const robustnessPanelSchema = z
  .object({
    boundaryMa: z.number(),
    windowMyr: z.number(),
    truncationMyr: z.number(),
    variants: z.array(
      z.object({
        id: z.string(),
        kind: z.enum(["run", "window", "clade", "single-stage", "truncation-victims", "truncation-survivors"]),
        label: z.string(),
        victims: z.number().int(),
        survivors: z.number().int(),
      }),
    ),
    contrasts: z.array(
      z.object({
        traitKey: z.string(),
        traitLabel: z.string(),
        contrast: z.string(),
        state: z.string().nullable(),
        estimates: z.array(z.object({ variant: z.string(), crude: intervalSchema.nullable(), adjusted: intervalSchema.nullable() })),
        jackknife: z.object({ crude: jackknifeSchema, adjusted: jackknifeSchema }),
        verdict: z.object({ crude: verdictSchema, adjusted: verdictSchema }),
      }),
    ),
    notes: z.array(z.string()),
    method: z.string(),
  })
  .meta({ id: "RobustnessPanel" });

export type RobustnessPanel = z.infer<typeof robustnessPanelSchema>;

/** What a run stores about its robustness: one panel per boundary, or why there is none. */
export const runRobustnessSchema = z
  .union([
    z.object({
      status: z.literal("computed"),
      windowFactors: z.array(z.number()),
      boundaries: z.array(z.object({ index: z.number().int(), label: z.string(), panel: robustnessPanelSchema.nullable(), reason: z.string().nullable() })),
    }),
    z.object({ status: z.literal("not-computed"), reason: z.string() }),
  ])
  .meta({ id: "RunRobustness" });
export type RunRobustness = z.infer<typeof runRobustnessSchema>;
