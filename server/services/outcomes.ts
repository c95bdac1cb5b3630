// The outcomes of a study's taxa across boundaries, as one service: the classification across a
// boundary with overrides applied (outcomeClassification.ts), the overrides themselves
// (outcomeOverrides.ts) and rates through time (outcomeRates.ts).
import type { Database } from "../db";
import { createOutcomeClassifier } from "./outcomeClassification";
import { createOverrideStore } from "./outcomeOverrides";
import { studyRates } from "./outcomeRates";

export function createOutcomeService(db: Database) {
  const overrides = createOverrideStore(db);
  const { outcomes, finalOutcomes } = createOutcomeClassifier(db, overrides);
  return {
    outcomes,
    finalOutcomes,
    rates: (studyId: string) => studyRates(db, studyId),
    listOverrides: overrides.listOverrides,
    createOverride: overrides.createOverride,
    revokeOverride: overrides.revokeOverride,
    bulkOverride: overrides.bulkOverride,
  };
}
export type OutcomeService = ReturnType<typeof createOutcomeService>;
