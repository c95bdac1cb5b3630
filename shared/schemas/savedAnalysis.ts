// What every saved analysis of a study (a selectivity run, a modern comparison) says about itself:
// which study, its name, who saved it, when, and with which version of the app; and the confidence
// level both take.
import { z } from "zod";
import { isoDateSchema, personOrNoneSchema } from "./common";

/** The summary fields runs and comparisons share; each extends it with its own status, hash and counts. */
export const savedAnalysisSummarySchema = z.object({
  id: z.uuid(),
  studyId: z.uuid(),
  name: z.string(),
  appVersion: z.string().meta({ description: "The version of the app that computed it" }),
  createdBy: personOrNoneSchema,
  createdAt: isoDateSchema,
});

/** The confidence level of an analysis's intervals, 0.95 unless given. */
export const confidenceLevelSchema = z
  .number({ message: "level must be a number between 0.5 and 0.999" })
  .min(0.5, "level must be at least 0.5")
  .max(0.999, "level must be at most 0.999")
  .default(0.95)
  .meta({ description: "Confidence level of the intervals" });
