// Comparing two runs side by side (computed by shared/runs/compareRuns.ts): each number as a
// pair of the base run's value and the other run's, with what changed; the checks a run makes of
// its findings (sampling, robustness, crisis against background) as verdicts before and after,
// with the verdicts that changed in words.
import { z } from "zod";
import { uuidSchema } from "./common";
import { runSummarySchema } from "./runs";
import { SAMPLING_VERDICTS } from "./samplingCheck";

const pairSchema = z.object({ base: z.number().nullable(), run: z.number().nullable() });
const presenceSchema = z.enum(["both", "baseOnly", "runOnly"]);
/** A verdict of each run; null where that run has none (the item or the whole check is missing there). */
const verdictPair = <T extends z.ZodType>(verdict: T) => z.object({ base: verdict.nullable(), run: verdict.nullable() });

const checkSideSchema = z
  .object({
    status: z
      .enum(["computed", "not-computed", "absent"])
      .meta({ description: "computed: the run holds this check; not-computed: the run says why it has none (reason); absent: the run holds nothing of it (saved before the check existed, or it did not ask for it)" }),
    reason: z.string().nullable(),
  })
  .meta({ id: "RunDiffCheckSide" });

/** What every compared check says about itself: whether each run has it, and its changes in words. */
const checkFields = {
  base: checkSideSchema,
  run: checkSideSchema,
  note: z
    .string()
    .nullable()
    .meta({ description: "Set when only one of the two runs has this check (e.g. \"Not in the earlier run: ...\"): its verdicts are then not compared" }),
  changes: z.array(z.string()).meta({ description: "The verdicts that differ, one sentence each; empty when none does or only one run has the check" }),
  changed: z.boolean().meta({ description: "changes is not empty" }),
};

/** Which contrast of which trait a compared verdict belongs to, and which runs have it. */
const contrastIdentity = { traitKey: z.string(), traitLabel: z.string(), contrast: z.string(), presence: presenceSchema };

const ROBUSTNESS_STATUSES = ["holds", "fragile", "never-there", "not-estimated"] as const;
const robustnessCountsSchema = z
  .object({ holds: z.number().int(), fragile: z.number().int(), "never-there": z.number().int(), "not-estimated": z.number().int() })
  .nullable()
  .meta({ description: "Contrasts per verdict; null where the run has no panel at this boundary" });
const robustnessMeasureSchema = z.object({
  status: verdictPair(z.enum(ROBUSTNESS_STATUSES)),
  changedUnder: z.object({ base: z.array(z.string()).nullable(), run: z.array(z.string()).nullable() }).meta({ description: "Variants under which each run found the contrast fragile" }),
});

export const runDiffSamplingSchema = z
  .object({
    ...checkFields,
    contrasts: z.array(
      z.object({
        ...contrastIdentity,
        verdict: verdictPair(z.enum(SAMPLING_VERDICTS)),
        withSampling: pairSchema.meta({ description: "The odds ratio once the sampling covariates are in the model" }),
        changed: z.boolean().meta({ description: "Both runs hold the check, and the verdict differs or only one run has this contrast" }),
      }),
    ),
  })
  .meta({ id: "RunDiffSampling", description: "Does each contrast hold once sampling is allowed for, in each run" });

export const runDiffRobustnessSchema = z
  .object({
    ...checkFields,
    counts: z.object({ crude: z.object({ base: robustnessCountsSchema, run: robustnessCountsSchema }), adjusted: z.object({ base: robustnessCountsSchema, run: robustnessCountsSchema }) }),
    contrasts: z.array(
      z.object({
        ...contrastIdentity,
        crude: robustnessMeasureSchema,
        adjusted: robustnessMeasureSchema,
        changed: z.boolean().meta({ description: "Both runs hold the panel, and a verdict or the variants a fragile verdict names differ, or only one run has this contrast" }),
      }),
    ),
  })
  .meta({ id: "RunDiffRobustness", description: "The robustness panel's verdicts at this boundary, in each run" });

export const runDiffCrisisSchema = z
  .object({
    ...checkFields,
    crisis: z.object({ base: z.string().nullable(), run: z.string().nullable() }).meta({ description: "The boundary each run took as the crisis" }),
    traits: z.array(
      z.object({
        key: z.string(),
        label: z.string(),
        presence: presenceSchema,
        verdict: verdictPair(z.enum(["differs", "same", "not-tested"])).meta({
          description: "differs: the adjusted test says the crisis sorted differently from background; same: it does not; not-tested: the model could not be fitted",
        }),
        adjustedPValue: pairSchema,
        contrasts: z.array(
          z.object({
            contrast: z.string(),
            presence: presenceSchema,
            verdict: verdictPair(z.enum(["differs", "same"])).meta({ description: "differs: the trait's adjusted test and this contrast's interval both say the crisis differed" }),
            ratio: pairSchema.meta({ description: "Crisis odds ratio over background odds ratio" }),
            changed: z.boolean(),
          }),
        ),
        changed: z.boolean().meta({ description: "Both runs compared the crisis, and the trait's or a contrast's verdict differs, or only one run has it" }),
      }),
    ),
  })
  .meta({ id: "RunDiffCrisis", description: "Crisis against background, trait by trait, in each run" });

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
        sampling: runDiffSamplingSchema,
        robustness: runDiffRobustnessSchema,
      }),
    ),
    crisis: runDiffCrisisSchema,
  })
  .meta({ id: "RunDiff" });
export type RunDiff = z.infer<typeof runDiffSchema>;

export const runDiffQuerySchema = z.object({ against: uuidSchema.meta({ description: "The run to compare with" }) });
export type RunDiffCheckSide = z.infer<typeof checkSideSchema>;
export type RunDiffSampling = z.infer<typeof runDiffSamplingSchema>;
export type RunDiffRobustness = z.infer<typeof runDiffRobustnessSchema>;
export type RunDiffCrisis = z.infer<typeof runDiffCrisisSchema>;
