// What every saved analysis of a study (a selectivity run, a modern comparison) says about itself:
// which study, its name, who saved it, when, and with which version of the app.
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
