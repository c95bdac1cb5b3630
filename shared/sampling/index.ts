// Sampling as a covariate of a selectivity run's multiple regression (see samplingCovariateCheck).
export { samplingCovariateCheck, SAMPLING_CAUTION, SAMPLING_MIN_TAXA, type SamplingCheckInput, type SamplingCounts } from "./samplingCovariateCheck";
