/** Statistics used by Linger's noise-filter analysis (pure functions). */
export { erfc, normalCdf, normalUpperTail, normalTwoSidedP, Z_95 } from "./normal-distribution";
export { wilson } from "./wilson-interval";
export { kolmogorovUpperTail, kolmogorovQuantile } from "./kolmogorov-distribution";
export { ks2, ksCritical05, type KsResult } from "./ks-two-sample";
export { mannWhitney, type MannWhitneyResult } from "./mann-whitney";
export { holm } from "./holm";
export { fisherExact } from "./fisher-exact";
export {
  kaplanMeier,
  kmQuantile,
  kmQuantileInterval,
  type SurvivalObservation,
  type SurvivalStep,
  type KaplanMeierResult,
} from "./kaplan-meier";
export { fitLogisticPass, type PassCount, type LogisticPassFit } from "./logistic-fit";
export { quantileSorted } from "./quantile";
export { describe, mean, sampleVariance, type Description } from "./describe";
export { histogram, sturgesBinCount, type Histogram } from "./histogram";
export { wasserstein1 } from "./wasserstein-1";
export { sortedCopy } from "./sorted-copy";
