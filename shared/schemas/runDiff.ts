// Comparing two runs side by side (computed by shared/runs/compareRuns.ts): each number as a
// pair of the base run's value and the other run's, with what changed.
import { z } from "zod";
import { uuidSchema } from "./common";
import { runSummarySchema } from "./runs";

const pairSchema = z.object({ base: z.number().nullable(), run: z.number().nullable() });

export const runDiffSchema = z
  .object({
    base: runSummarySchema.meta({ description: "The run compared against (?against=)" }),
    run: runSummarySchema,
    hashChanged: z.boolean().meta({ description: "The two runs read different data" }),
    rowCount: pairSchema.extend({ change: z.number().nullable() }),
    paramsChanged: z.array(z.string()).meta({ description: "Parameters that differ, in words; empty when the same analysis was run" }),
    boundaries: z.array(
      z.object({
        boundaryMa: z.number(),
        windowMyr: pairSchema,
        label: z.string(),
        presence: z.enum(["both", "baseOnly", "runOnly"]),
        victims: pairSchema,
        survivors: pairSchema,
        completeCases: pairSchema,
        traits: z.array(
          z.object({
            key: z.string(),
            label: z.string(),
            presence: z.enum(["both", "baseOnly", "runOnly"]),
            used: pairSchema,
            pValue: pairSchema,
            adjustedPValue: pairSchema,
            contrasts: z.array(
              z.object({
                contrast: z.string(),
                crudeOddsRatio: pairSchema,
                cladeAdjustedOddsRatio: pairSchema,
                modelAdjustedOddsRatio: pairSchema,
                flagged: z.object({ base: z.boolean().nullable(), run: z.boolean().nullable() }),
                changed: z.boolean().meta({ description: "Any number or flag of this contrast differs" }),
              }),
            ),
            changed: z.boolean().meta({ description: "Any number of this trait differs" }),
          }),
        ),
      }),
    ),
  })
  .meta({ id: "RunDiff" });
export type RunDiff = z.infer<typeof runDiffSchema>;

export const runDiffQuerySchema = z.object({ against: uuidSchema.meta({ description: "The run to compare with" }) });
