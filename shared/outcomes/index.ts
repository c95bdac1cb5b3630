// Survival across a boundary and boundary-crosser rates: pure functions on stratigraphic ranges in Ma.
export { classifyAcrossBoundary, DEFAULT_EDGE_TOLERANCE, type BoundaryOutcome, type ClassifyOptions } from "./classifyAcrossBoundary";
export { boundaryCrosserRates, countBoundaryCrossers, type BoundaryCrosserCounts, type BoundaryCrosserRates } from "./boundaryCrosserRates";
export { ratesThroughTime, type IntervalRates } from "./ratesThroughTime";
export { outcomeWarnings, type OutcomeWarnings, type WarningGroup } from "./outcomeWarnings";
export { rangeProblem, type NamedInterval, type RangeProblem, type TaxonRange } from "./validateRanges";
export { backgroundContrast, MAD_NORMAL_CONSISTENCY, MIN_BACKGROUND_VALUES, type BackgroundContrast } from "./backgroundContrast";
export { diversityThroughTime, type DiversityThroughTime, type GroupDiversity, type StageDiversity } from "./diversityThroughTime";
export { crisisTurnover, DEPARTURE_Z, type CrisisTurnover, type RateContrast } from "./crisisTurnover";
export {
  boundaryScorecard,
  BROAD_SHARE_OF_GROUPS,
  MASS_EXTINCTION_CONVENTION,
  MIN_GROUP_AT_RISK,
  SCORECARD_CAUTION,
  SCORECARD_SOURCE,
  type BoundaryScorecard,
  type BoundaryScorecardInput,
  type GroupLoss,
  type GroupLossRow,
  type LossDimension,
  type ScorecardCriterion,
  type ScorecardItem,
  type ScorecardStatus,
} from "./boundaryScorecard";
