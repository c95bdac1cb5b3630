// Occurrences (dated finds of taxa): ranges derived from them and three-timer sampling and rates. Pure functions.
export { deriveRanges, type AgeMode, type DeriveRangesOptions, type DerivedRange, type DroppedOccurrence } from "./deriveRanges";
export { threeTimerRates, type ThreeTimerRow } from "./threeTimerRates";
export type { Occurrence, TimeBin } from "./types";
