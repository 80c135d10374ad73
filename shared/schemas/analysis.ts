/**
 * Noise-filter analysis results (definitions in docs/metrics.md). A RunSummary
 * is computed once per finished run by sim/analysis/summarize-run.ts and is
 * also what the CLI writes as analysis.json; a Comparison sets two to four
 * runs side by side (sim/analysis/compare-runs.ts). Times in minutes, amounts
 * in molecules, probabilities in [0, 1]; null where a figure is not defined.
 */
import { z } from "zod";

const num = z.number();
const nnum = z.number().nullable();
const count = z.number().int().min(0);
const interval = z.tuple([num, num]);
/** An interval whose ends may be "not reached" (null), e.g. a Kaplan-Meier median's. */
const openInterval = z.tuple([nnum, nnum]);

export const DescriptionSchema = z.object({
  n: count,
  mean: nnum,
  sd: nnum,
  cv: nnum,
  min: nnum,
  q10: nnum,
  q25: nnum,
  median: nnum,
  q75: nnum,
  q90: nnum,
  max: nnum,
});
export type DescriptionSummary = z.infer<typeof DescriptionSchema>;

export const HistogramSchema = z.object({
  /** Bin edges, ascending; bin k is [edges[k], edges[k+1]), the last bin closed. */
  edges: z.array(num),
  counts: z.array(count),
  below: count,
  above: count,
});

export const ThresholdUsedSchema = z.object({
  /** Up-crossing level theta, molecules. */
  theta: num,
  /** Down-crossing level theta*(1-h), molecules. */
  downTheta: num,
  hysteresis: num,
  windowMinutes: num,
  outputLifetimeMinutes: nnum,
});
export type ThresholdUsed = z.infer<typeof ThresholdUsedSchema>;

/**
 * The simulation method of a run in words and facts (docs/metrics.md, "Method"): exact methods sample
 * the chemical master equation's paths exactly; approximate ones trade accuracy for speed and say so.
 */
export const MethodLabelSchema = z.object({
  /** The run spec's method. */
  name: z.enum(["direct", "tauLeap"]),
  exact: z.boolean(),
  /** "exact" or "approximate": the word every page, export and bundle shows. */
  accuracy: z.enum(["exact", "approximate"]),
  /** One line for people, e.g. "Approximate: tau-leaping (Cao, Gillespie & Petzold 2006), eps = 0.03". */
  label: z.string(),
  /** The published source of the method. */
  reference: z.string(),
  /** Step control of an approximate method; null for an exact one. */
  stepControl: z
    .object({
      /** Error-control parameter epsilon of the leap selection (bound on the relative change of each propensity). */
      epsilon: num,
      /** Reactions with fewer firings than this left before a reactant runs out are critical (fired one at a time). */
      criticalFirings: z.number().int(),
      /** Exact direct-method steps taken instead when a leap would be shorter than `shortLeapFactor / a0`. */
      exactStepsWhenShort: z.number().int(),
      shortLeapFactor: num,
      /** Plain words. */
      description: z.string(),
    })
    .nullable(),
});
export type MethodLabel = z.infer<typeof MethodLabelSchema>;

/**
 * The one settings block of a run (docs/metrics.md, "Settings"): every choice that changes the figures,
 * with where the threshold and window came from. Shown on run and compare pages, written in
 * analysis.json, every export's data dictionary (datapackage.json) and bundles.
 */
export const RunSettingsBlockSchema = z.object({
  /** Up-crossing threshold theta, molecules of the output; null when never crossed (a run without input pulses). */
  thresholdMolecules: nnum,
  /** Down-crossing level theta*(1-h), molecules; null with thresholdMolecules. */
  downThresholdMolecules: nnum,
  /** "set" = given in the run spec; "default" = the rule in thresholdRule; "none" = no input pulses. */
  thresholdSource: z.enum(["set", "default", "none"]),
  /** How the threshold was found, in words with the numbers used. */
  thresholdRule: z.string(),
  /** Mean-field output at the OFF steady state, molecules; null when it could not be computed. */
  offSteadyStateMolecules: nnum,
  /** Highest mean-field output under constant ON input from the OFF steady state within the end time, molecules. */
  onMaximumMolecules: nnum,
  /** Hysteresis fraction h. */
  hysteresis: num,
  windowMinutes: num,
  windowSource: z.enum(["set", "default"]),
  outputLifetimeMinutes: nnum,
  /** Pulses shorter than this count as noise for the false-pass rate. */
  noiseDurationMinutes: num,
  endTimeMinutes: num,
  gridStepMinutes: num,
  method: MethodLabelSchema,
  seed: z.string(),
  replicates: count,
  /** Output species whose crossings are detected. */
  outputSpecies: z.string(),
  /** Warnings about the settings in plain words (threshold below a few molecules, above the ODE's reach...). */
  warnings: z.array(z.string()),
});
export type RunSettingsBlock = z.infer<typeof RunSettingsBlockSchema>;

/**
 * Which pulses a pooled delay figure covers: the duration classes that respond in most replicates
 * (pass probability above 0.5), where censoring at the window end is rare and says little about duration.
 */
export const DelayCoverageSchema = z.object({
  /** Durations pooled, minutes, ascending. */
  durations: z.array(num),
  /** Durations left out (pass probability at most 0.5, or no evaluable pulse), minutes. */
  leftOut: z.array(num),
  /** Evaluable pulses pooled. */
  pulses: count,
  /** "Pulses of 20 to 80 min (3 of 7 durations; 1,200 pulses), the durations passed in most replicates", or why none. */
  text: z.string(),
});
export type DelayCoverage = z.infer<typeof DelayCoverageSchema>;

/** What a summary stored before the pooled delay was restricted says about its coverage (it pooled every pulse). */
const LEGACY_DELAY_COVERAGE = {
  durations: [],
  leftOut: [],
  pulses: 0,
  text: "All evaluable pulses of every duration (a summary stored before the pooled delay was restricted to the durations passed in most pulses): read the delay per duration instead.",
};

/**
 * A median read from a Kaplan-Meier curve (optional: absent in summaries stored before it existed; null median
 * with pulses then means not reached): a number, "not reached" (fewer than half responded), or no pulses. */
export const MedianStatusSchema = z.enum(["estimate", "not-reached", "no-pulses"]);

export const ByDurationEntrySchema = z.object({
  /** Input pulse duration (the pulse records' durationBin), minutes. */
  duration: num,
  /** Evaluable (replicate, input pulse) pairs of this duration (excluded pulses not counted). */
  pulses: count,
  passed: count,
  /** passed / pulses; null when pulses = 0. */
  passProbability: nnum,
  /** Wilson score 95% interval without continuity correction; null when pulses = 0. */
  ci: interval.nullable(),
  /** Kaplan-Meier median response delay (censoring respected); null when fewer than half responded. */
  medianDelay: nnum,
  medianDelayCi: openInterval,
  /** Whether medianDelay is a number, "not reached" or undefined (no pulses). */
  medianDelayStatus: MedianStatusSchema.optional(),
  /** Evaluable pulses with no response in their window. */
  censored: count,
  /** Pulses that started with the output already above threshold. */
  excluded: count,
  /** Median output pulse width over the widths starting in these pulses' windows. */
  medianWidth: nnum,
  /** Median peak output in the window. */
  medianPeak: nnum,
  /** Median OFF delay among pulses with a down-crossing after off in the window. */
  medianOffDelay: nnum,
});
export type ByDurationEntry = z.infer<typeof ByDurationEntrySchema>;

export const SurvivalPointSchema = z.object({
  time: num,
  /** Fraction not yet responded. */
  survival: num,
  lower: num,
  upper: num,
  atRisk: count,
});

export const DelaySummarySchema = z.object({
  evaluable: count,
  responded: count,
  censored: count,
  /** Kaplan-Meier median with a Brookmeyer-Crowley 95% interval; null = not reached (see medianStatus). */
  median: nnum,
  medianCi: openInterval,
  medianStatus: MedianStatusSchema.optional(),
  /** Kaplan-Meier quantiles of the delay; null = not reached. */
  quantiles: z.object({ q10: nnum, q25: nnum, q50: nnum, q75: nnum, q90: nnum }),
  /** Plain description of the observed (uncensored) delays only. */
  observed: DescriptionSchema,
  /** Histogram of the observed delays; censored pulses are counted in `censored`. */
  histogram: HistogramSchema,
  /** Kaplan-Meier curve at event times, thinned to steps of at least 0.005 in survival. */
  survival: z.array(SurvivalPointSchema),
});
export type DelaySummary = z.infer<typeof DelaySummarySchema>;

/**
 * d50 read from the observed pass curve without a shape (sim/analysis/pass-curve-d50.ts): either an
 * estimate with its 95% interval, or the reason in words why no number is given.
 */
export const PassCurveD50Schema = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("estimate"),
    /** Minutes, interpolated on log duration between the two tried durations whose monotone estimates straddle 50%. */
    d50: num,
    /** 95% interval ends, minutes; tried durations (the data say nothing between them). */
    low: num,
    high: num,
    method: z.string(),
  }),
  z.object({
    kind: z.literal("not-bracketed"),
    side: z.enum(["below-shortest", "above-longest"]),
    /** The shortest (below) or longest (above) tried duration, minutes. */
    bound: num,
    reason: z.string(),
  }),
  z.object({
    kind: z.literal("not-estimable"),
    /** The tried durations on either side of 50%, minutes. */
    between: interval,
    reason: z.string(),
  }),
  z.object({ kind: z.literal("plateau"), reason: z.string() }),
]);
export type PassCurveD50 = z.infer<typeof PassCurveD50Schema>;

export const LogisticGoodnessOfFitSchema = z.object({
  /** Pearson chi-square of the fitted against the observed counts. */
  chiSquare: num,
  /** Distinct durations minus the two fitted parameters. */
  df: z.number().int().min(1),
  pValue: num,
  /** pValue < 0.05: the logistic shape does not describe the data; do not quote its d50. */
  poorFit: z.boolean(),
});

export const LogisticSummarySchema = z.object({
  intercept: nnum,
  slopePerLogMinute: nnum,
  slopeAtD50PerMinute: nnum,
  d50Ci: interval.nullable(),
  converged: z.boolean(),
  fitted: z.array(z.object({ duration: num, passProbability: num })),
  /** d50 of the logistic smooth (not the headline d50); null when no fit. */
  d50: nnum,
  /** Pearson goodness of fit on k-2 df; null with fewer than three durations or no fit. */
  goodnessOfFit: LogisticGoodnessOfFitSchema.nullable(),
});

export const FalsePassSchema = z.object({
  noiseDurationMinutes: num,
  /** Durations that counted as noise (shorter than noiseDurationMinutes). */
  durations: z.array(num),
  pulses: count,
  passed: count,
  rate: num,
  ci: interval,
});

export const DelayCostSchema = z.object({
  /** Pulses at least this long count as long (default 3 x the noise duration; the longest duration when none is). */
  minDurationMinutes: num,
  durations: z.array(num),
  pulses: count,
  responded: count,
  medianDelay: nnum,
  medianDelayCi: openInterval,
  medianDelayStatus: MedianStatusSchema.optional(),
  meanObservedDelay: nnum,
});
export type DelayCost = z.infer<typeof DelayCostSchema>;

export const PulseGenerationSummarySchema = z.object({
  pulses: count,
  peak: DescriptionSchema,
  peakAboveBaseline: DescriptionSchema,
  timeToPeak: DescriptionSchema,
  fwhm: DescriptionSchema,
  fwhmNotMeasurable: count,
});
export type PulseGenerationSummary = z.infer<typeof PulseGenerationSummarySchema>;

export const NoiseSummarySchema = z.object({
  replicates: count,
  /** Mean output over replicates of each replicate's mean. */
  meanOutput: nnum,
  /** Total variance: mean of within-replicate variances + variance of replicate means. */
  variance: nnum,
  cv: nnum,
  fano: nnum,
  perReplicateMean: DescriptionSchema,
  perReplicateFano: DescriptionSchema,
});
export type NoiseSummary = z.infer<typeof NoiseSummarySchema>;

export const RunSummarySchema = z.object({
  schemaVersion: z.literal(1),
  threshold: ThresholdUsedSchema,
  /** The run's settings block and method label; absent for uploaded traces and for summaries stored before it existed. */
  settings: RunSettingsBlockSchema.optional(),
  noiseDurationMinutes: num,
  counts: z.object({
    replicates: count,
    cappedReplicates: count,
    events: z.object({ total: num, meanPerReplicate: nnum }),
    /** Pulse records (replicate x input pulse whose window opened). */
    pulses: count,
    evaluable: count,
    excluded: count,
    passed: count,
  }),
  /** One entry per distinct input pulse duration, ascending. */
  byDuration: z.array(ByDurationEntrySchema),
  /** Duration passed half the time, from the monotone pass curve (passCurveD50); null with d50Note when no number is given. */
  d50: nnum,
  /** 95% interval of d50 (passCurveD50's low/high); null when d50 is null. */
  d50Ci: interval.nullable(),
  d50Note: z.string().nullable(),
  passCurveD50: PassCurveD50Schema,
  logistic: LogisticSummarySchema,
  /** Pass fraction of pulses shorter than the noise duration; null when there are none. */
  falsePassRate: nnum,
  falsePass: FalsePassSchema.nullable(),
  /**
   * Response delay pooled over the durations that respond in most replicates only (delayCoverage says which);
   * the delay of every duration class is in byDuration (Kaplan-Meier within the class).
   */
  delay: DelaySummarySchema,
  delayCoverage: DelayCoverageSchema.default(LEGACY_DELAY_COVERAGE),
  offDelay: DelaySummarySchema,
  delayCost: DelayCostSchema.nullable(),
  widths: z.object({ summary: DescriptionSchema, histogram: HistogramSchema }),
  pulseGeneration: PulseGenerationSummarySchema,
  noise: NoiseSummarySchema,
  /** Plain-words remarks (capped replicates, excluded pulses, ...). */
  notes: z.array(z.string()),
});
export type RunSummary = z.infer<typeof RunSummarySchema>;

// ---------- comparison ----------

export const TwoSampleSchema = z.object({
  nA: count,
  nB: count,
  medianA: nnum,
  medianB: nnum,
  ks: z.object({ d: num, pValue: num, pHolm: num, critical05: num }).nullable(),
  mannWhitney: z
    .object({ u: num, z: num, pValue: num, pHolm: num, rankBiserial: num, probabilityAGreater: num })
    .nullable(),
  /** Wasserstein-1 distance between the observed (finite) values, minutes. */
  wasserstein1: nnum,
  /** Both Holm-adjusted p-values >= 0.05: no difference beyond noise. null when not testable. */
  withinNoise: z.boolean().nullable(),
});
export type TwoSample = z.infer<typeof TwoSampleSchema>;

export const PassDifferenceSchema = z.object({
  duration: num,
  passProbabilityA: num,
  passProbabilityB: num,
  /** A minus B. */
  difference: num,
  /** Fisher's exact test, two-sided, and Holm-adjusted across every (pair, duration). */
  pValue: num,
  pHolm: num,
  withinNoise: z.boolean(),
});

export const ComparisonPairSchema = z.object({
  a: z.string(),
  b: z.string(),
  delays: TwoSampleSchema,
  widths: TwoSampleSchema,
  passDifferences: z.array(PassDifferenceSchema),
  flags: z.array(z.string()),
});
export type ComparisonPair = z.infer<typeof ComparisonPairSchema>;

export const ComparisonRunSchema = z.object({
  id: z.string(),
  name: z.string(),
  /** The run's settings block (threshold, window, method, end time, replicates...); null when it cannot be resolved. */
  settings: RunSettingsBlockSchema.nullable().optional(),
  headline: z.object({
    evaluable: count,
    passed: count,
    d50: nnum,
    d50Ci: interval.nullable(),
    d50Note: z.string().nullable(),
    falsePassRate: nnum,
    medianDelay: nnum,
    medianDelayCi: openInterval,
    delayCostMedian: nnum,
    medianWidth: nnum,
    medianPeak: nnum,
    medianTimeToPeak: nnum,
    medianFwhm: nnum,
    cv: nnum,
    fano: nnum,
  }),
});

export const ComparisonSchema = z.object({
  runs: z.array(ComparisonRunSchema).min(2).max(4),
  /** Union of the runs' durations, ascending. */
  durations: z.array(num),
  /** Filter curves side by side: for each duration, each run's entry (null when it has none). */
  filterCurves: z.array(
    z.object({
      duration: num,
      runs: z.array(
        z
          .object({ pulses: count, passed: count, passProbability: nnum, ci: interval.nullable(), fitted: nnum })
          .nullable(),
      ),
    }),
  ),
  /** Overlaid histograms on shared bins; censored delays counted apart. */
  distributions: z.object({
    delays: z.object({ edges: z.array(num), runs: z.array(z.object({ counts: z.array(count), censored: count })) }),
    widths: z.object({ edges: z.array(num), runs: z.array(z.object({ counts: z.array(count) })) }),
  }),
  pairs: z.array(ComparisonPairSchema),
  /** Every pair's flags together (the page shows them per pair). */
  flags: z.array(z.string()),
  /** One sentence per setting in which the runs differ (threshold, hysteresis, window, method, end time, replicates). */
  settingsWarnings: z.array(z.string()).default([]),
  /** How the tests were done, in plain words. */
  method: z.string(),
});
export type Comparison = z.infer<typeof ComparisonSchema>;

// ---------- against the matched control ----------

export const AccelerationSchema = z.object({
  /** Mean-field T1/2 of the step response, minutes; null when the output does not rise. */
  halfRiseCircuitMinutes: nnum,
  halfRiseControlMinutes: nnum,
  /** Control T1/2 / circuit T1/2: above 1 = the circuit responds faster (acceleration). */
  halfRiseRatio: nnum,
  /** Kaplan-Meier median response delays pooled over the durations passed in most pulses (delayCoverage), and circuit minus control. */
  medianDelayCircuit: nnum,
  medianDelayControl: nnum,
  /** null unless both runs pooled the same durations (their delayCoverage), so the two medians describe the same pulses. */
  medianDelayDifference: nnum,
  /** Median delays for long pulses (the delay cost), and circuit minus control. */
  longPulseDelayCircuit: nnum,
  longPulseDelayControl: nnum,
  longPulseDelayDifference: nnum,
});
export type Acceleration = z.infer<typeof AccelerationSchema>;
