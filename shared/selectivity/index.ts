// Selectivity analysis: per-trait tables and tests, odds ratios crude and adjusted, the multiple
// logistic regression and the confounding check; and scoring new taxa with the fitted model. Pure
// functions over plain data, free of Node and DOM APIs.

export type * from "./types";
export { analyzeSelectivity } from "./analyzeSelectivity";
export { scoreWithModel, type ModelScore } from "./scoreWithModel";
export { encodeTrait, MISSING, INVALID, type DropReason, type EncodedNumbers, type EncodedStates, type EncodedTrait } from "./encodeTrait";
export { countStates, proportionRow, stateRows, type StateCounts } from "./stateTable";
export { chooseReference } from "./chooseReference";
export { quartileBins } from "./quartileBins";
export { testStateTrait, whyNoTest, whyNoOutcomeContrast, type TraitTest } from "./testStateTrait";
export { countCladeStates, stateContrasts, type CladeStateCounts } from "./stateContrasts";
export { scaleNumericTrait, numericStep, numericPredictorLabel, type NumericScaling } from "./scaleNumericTrait";
export { testNumericTrait, plainMessage, type NumericTraitTest } from "./testNumericTrait";
export { cladeAdjustedSlope } from "./cladeAdjustedSlope";
export { fitStratifiedSlope, type StratifiedSlopeFit } from "./stratifiedSlope";
export { fitSelectivityModel, type ModelTraitInput, type SelectivityModelFit } from "./fitSelectivityModel";
export { confoundingCheck, confoundingMethod, relativeChange, type ConfoundingContext } from "./confoundingCheck";
export { judgeCladeConfounding, judgeStateConfounding, standardisedLogOdds, crudeLogOdds, cladeIntercept, CONFOUNDING_CITATION, DEFAULT_MIN_INFORMATIVE_CLADES, type CladeGroup, type CladeCells, type CladeConfoundingOptions } from "./cladeConfounding";
export { formatCompact, formatNumber } from "./formatNumber";
export {
  crisisVersusBackground,
  type CrisisVersusBackgroundContrast,
  type CrisisVersusBackgroundInput,
  type CrisisVersusBackgroundResult,
  type CrisisVersusBackgroundRow,
  type CrisisVersusBackgroundTrait,
} from "./crisisVersusBackground";
export {
  crisisComparison,
  type CrisisComparisonContrast,
  type CrisisComparisonInput,
  type CrisisComparisonResult,
  type CrisisComparisonTrait,
} from "./crisisComparison";
export {
  robustnessPanel,
  type JackknifeSummary,
  type RobustnessContrast,
  type RobustnessInput,
  type RobustnessPanel,
  type RobustnessVariant,
  type RobustnessVerdict,
  type VariantKind,
  type VerdictStatus,
} from "./robustnessPanel";
