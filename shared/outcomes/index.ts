// Survival across a boundary and boundary-crosser rates: pure functions on stratigraphic ranges in Ma.
export { classifyAcrossBoundary, DEFAULT_EDGE_TOLERANCE, type BoundaryOutcome, type ClassifyOptions } from "./classifyAcrossBoundary";
export { boundaryCrosserRates, countBoundaryCrossers, type BoundaryCrosserCounts, type BoundaryCrosserRates } from "./boundaryCrosserRates";
export { ratesThroughTime, type IntervalRates } from "./ratesThroughTime";
export { outcomeWarnings, type OutcomeWarnings, type WarningGroup } from "./outcomeWarnings";
export { rangeProblem, type NamedInterval, type RangeProblem, type TaxonRange } from "./validateRanges";
export { backgroundContrast, MAD_NORMAL_CONSISTENCY, MIN_BACKGROUND_VALUES, type BackgroundContrast } from "./backgroundContrast";
