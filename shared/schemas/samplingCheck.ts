// Sampling as a covariate of a run's multiple regression: which covariates a run may add, and what
// the comparison with and without them says per trait contrast (stored in a run's results).
import { z } from "zod";

/** The sampling covariates a run can add to the multiple regression. */
export const SAMPLING_COVARIATES = ["occurrences", "collections"] as const;
export type SamplingCovariate = (typeof SAMPLING_COVARIATES)[number];
export const SAMPLING_COVARIATE_LABELS: Record<SamplingCovariate, string> = {
  occurrences: "Number of occurrences (log scale)",
  collections: "Number of collections",
};

export const samplingCovariatesSchema = z
  .array(z.enum(SAMPLING_COVARIATES, { message: "samplingCovariates lists occurrences and/or collections" }), {
    message: "samplingCovariates must be a list: occurrences, collections",
  })
  .max(2, "samplingCovariates lists each of occurrences and collections at most once")
  .refine((list) => new Set(list).size === list.length, "samplingCovariates lists a covariate twice")
  .optional()
  .meta({
    description:
      "Sampling covariates added to the multiple regression, from the study's occurrences: occurrences (log10 of the number of finds) and collections (distinct collections). The result compares each trait's odds ratio with and without them; left out: none",
  });

const oddsRatioSchema = z.object({ estimate: z.number(), ci: z.tuple([z.number(), z.number()]) }).nullable();

export const SAMPLING_VERDICTS = ["holds", "does_not_hold", "no_signal", "not_estimable"] as const;
export type SamplingVerdict = (typeof SAMPLING_VERDICTS)[number];

export const samplingCheckSchema = z
  .object({
    covariates: z.array(z.enum(SAMPLING_COVARIATES)),
    /** Taxa of the boundary that enter both fits: those with at least one find. */
    taxa: z.number().int().meta({ description: "Victims and survivors with at least one occurrence: the sample of both fits" }),
    withoutOccurrences: z.number().int().meta({ description: "Victims and survivors with no occurrence in the study's uploads: left out of both fits" }),
    covariateTerms: z
      .array(z.object({ covariate: z.enum(SAMPLING_COVARIATES), label: z.string(), oddsRatio: oddsRatioSchema, pValue: z.number().nullable() }))
      .meta({ description: "The sampling covariates' own odds ratios in the fit that holds them" }),
    contrasts: z.array(
      z.object({
        traitKey: z.string(),
        traitLabel: z.string(),
        state: z.string().nullable().meta({ description: "The state compared with the reference; null for a numeric trait" }),
        contrast: z.string(),
        withoutSampling: oddsRatioSchema.meta({ description: "Odds ratio adjusted for the other traits, over the same taxa, without the sampling covariates" }),
        withSampling: oddsRatioSchema.meta({ description: "The same odds ratio once the sampling covariates are in the model" }),
        verdict: z.enum(SAMPLING_VERDICTS).meta({ description: "holds: the interval excludes 1 on the same side with and without sampling; does_not_hold: it excluded 1 without sampling and no longer does; no_signal: it included 1 without sampling" }),
        words: z.string(),
      }),
    ),
    note: z.string().nullable().meta({ description: "Why there is no comparison (no occurrences, too few taxa, no model), or null" }),
    method: z.string(),
    caution: z.string(),
  })
  .meta({ id: "SamplingCheck" });
export type SamplingCheck = z.infer<typeof samplingCheckSchema>;
