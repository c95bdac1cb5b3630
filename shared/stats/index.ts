// The statistics engine: pure functions over plain arrays, free of Node and DOM APIs, shared by the
// client, the server and worker threads. Conventions: a 2x2 table is [[a, b], [c, d]] with rows
// (trait state present, absent) and columns (extinct, survived); levels are 0.95 unless given;
// p-values are two-sided unless given.

export type { Alternative, FlatMatrix, Table2x2 } from "./types";
export { fisherExact, type FisherExactOptions, type FisherExactResult, type FisherMethod } from "./fisherExact";
export { oddsRatio, type OddsRatioOptions, type OddsRatioResult } from "./oddsRatio";
export { wilsonInterval } from "./wilsonInterval";
export {
  logisticRegression,
  type LogisticCoefficient,
  type LogisticRegressionOptions,
  type LogisticRegressionResult,
  type LogisticTerm,
  type LogisticTermTest,
} from "./logisticRegression";
export { buildDesignMatrix, type DesignMatrix, type DesignVariable, type VariableEncoding } from "./buildDesignMatrix";
export {
  mantelHaenszel,
  type BreslowDayResult,
  type MantelHaenszelOptions,
  type MantelHaenszelResult,
} from "./mantelHaenszel";
export { adjustPValues, type PValueAdjustment } from "./adjustPValues";
export { rocAuc, type RocAucResult } from "./rocAuc";
export { rocCurve, type RocPoint } from "./rocCurve";
export { spearman, type SpearmanResult } from "./spearman";
export { conditionalLogisticSlope, type ConditionalLogisticFit } from "./conditionalLogistic";
export { separationCheck, type SeparationCheckResult, type SeparationKind } from "./separationCheck";
