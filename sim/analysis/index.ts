/** Noise-filter analysis of runs and comparisons (pure functions; docs/metrics.md). */
export { summarizeRun, MOST_REPLICATES, type SummarizeRunInput, type ReplicateTotals } from "./summarize-run";
export { summarizeDelays, medianStatus } from "./delay-summary";
export { methodLabel } from "./method-label";
export { runSettingsBlock } from "./run-settings";
export {
  completeFinalise,
  finaliseRun,
  prepareFinalise,
  type FinaliseRunInput,
  type FinalisedRun,
  type PreparedFinalise,
} from "./finalise-run";
export { evaluablePulses, delaysOf, widthsOf, windowEnds } from "./pulse-selection";
export { ks2, wasserstein1, wilson } from "@/sim/stats";
export { compareRuns, type RunToCompare } from "./compare-runs";
export {
  pulseStatsCsv,
  outputPulsesCsv,
  replicateStatsCsv,
  byDurationCsv,
  summaryCsv,
  headlineRows,
  HEADLINE_METRICS,
} from "./csv-export";
export {
  runDataPackage,
  tableResource,
  field,
  packageName,
  RUN_EXPORT_FILES,
  EXPORT_CONVENTIONS,
  type DataPackage,
  type TableField,
  type TableResource,
} from "./export-dictionary";
export { makeMatchedControl, outputSteadyStates, type MatchedControlLevels } from "./matched-control";
export { halfRiseTime, accelerationFigures } from "./acceleration";
export { normalizeDuration, durationNormalizer } from "./normalize-duration";
