// Modern comparison: a modern species list read through a crosswalk onto the study's codebook,
// scored with a past crisis's fitted model and held against the list's threat categories. Pure
// functions over plain data, free of Node and DOM APIs.

export type * from "./types";
export { compareWithThreatList, ROC_MAX_POINTS, type CompareInput } from "./compareWithThreatList";
export { crosswalkCoverage, crosswalkProblems, listColumns, readSpeciesTraits, readThroughPair, statesWithSameName, suggestCrosswalk, type CrosswalkReading } from "./crosswalk";
export { modernMappingProblems, suggestModernListMapping, validateModernListRows, type ModernListRow, type ModernListValidation } from "./readModernList";

/** Shown at the top of every comparison's results, and in every export and report (docs/architecture.md, "Where a rule lives"). */
export const MODERN_COMPARISON_CAUTION =
  "A modern comparison is a screening aid: it does not replace a formal threat assessment, and the drivers of modern loss differ from those of past crises. Conservation decisions follow the relevant authority and local rules.";
