// The checks a run makes of its own findings: crisis against background (is the crisis's
// selectivity different from the background boundaries'?). Parameters and stored results.
import { z } from "zod";
import type { CrisisComparisonResult } from "../selectivity/crisisComparison";
import { traitKindSchema } from "./traits";
import type { Same } from "./common";

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

const crisisSchemaMatchesContract: Same<z.infer<typeof crisisComparisonResultSchema>, CrisisComparisonResult> = true;
void crisisSchemaMatchesContract;

/** What a run stores about crisis against background: the result, or why there is none. */
export const runCrisisSchema = z
  .union([
    z.object({ status: z.literal("computed"), result: crisisComparisonResultSchema }),
    z.object({ status: z.literal("not-computed"), reason: z.string() }),
  ])
  .meta({ id: "RunCrisisComparison" });
export type RunCrisis = z.infer<typeof runCrisisSchema>;
