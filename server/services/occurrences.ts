// What a study does with occurrences (one row per dated find): the uploads (occurrenceUploads.ts), one
// taxon's finds (occurrenceFinds.ts), ranges derived from them (occurrenceRanges.ts) and three-timer
// sampling per stage (occurrenceSampling.ts).
import type { Database } from "../db";
import type { RangeDerivation } from "../../shared/schemas/occurrences";
import { taxonFinds } from "./occurrenceFinds";
import { applyRanges, previewRanges } from "./occurrenceRanges";
import { threeTimerSampling } from "./occurrenceSampling";
import { createOccurrenceUploadService } from "./occurrenceUploads";

export function createOccurrenceService(db: Database) {
  return {
    ...createOccurrenceUploadService(db),
    /** One taxon's finds, oldest first, with the upload each came from. */
    ofTaxon: (studyId: string, taxon: string) => taxonFinds(db, studyId, taxon),
    previewRanges: (studyId: string, opts: RangeDerivation) => previewRanges(db, studyId, opts),
    applyRanges: (studyId: string, user: { id: string }, input: RangeDerivation & { taxa: string[]; reason: string }) => applyRanges(db, studyId, user, input),
    threeTimer: (studyId: string, boundaryMa: number | undefined) => threeTimerSampling(db, studyId, boundaryMa),
  };
}
export type OccurrenceService = ReturnType<typeof createOccurrenceService>;
