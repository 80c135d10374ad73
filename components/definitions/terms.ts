/**
 * The definitions page's entries, one per figure or setting, each with a
 * stable anchor (`/definitions#d50`). Worded to match docs/metrics.md; the
 * methods keep their published names and sources.
 */
export type Term = {
  /** Anchor on the definitions page. */
  id: string;
  term: string;
  /** One or more short paragraphs. */
  body: string[];
  /** Where the method comes from, when it is a published one. */
  source?: string;
};

export const TERMS: Term[] = [
  {
    id: "threshold",
    term: "Threshold",
    body: [
      "The output level, in molecules, that counts as a response. The output crosses up when it reaches the threshold while below it.",
      "Unless you set it, Linger takes the level half-way between the output's OFF steady state and the highest output the deterministic (mean-field) model reaches under constant ON input from OFF within the run's end time, so it suits filters and pulse generators alike. The run page shows the value used, how it was found, and a warning when it is below a few molecules, within the OFF state's noise, or above anything the mean field reaches.",
    ],
  },
  {
    id: "hysteresis",
    term: "Hysteresis band",
    body: [
      "After crossing up, the output only counts as down again when it falls below threshold × (1 − h), with h = 20% unless you set it. Noise that wobbles inside the band never splits one output pulse into several.",
    ],
  },
  {
    id: "window",
    term: "Response window",
    body: [
      "The time after an input pulse starts during which a response counts: from the pulse's start to the earlier of its end plus the window and the start of the next pulse. The window defaults to 3 output lifetimes.",
    ],
  },
  {
    id: "output-lifetime",
    term: "Output lifetime",
    body: [
      "1 / (sum of the first-order removal rates of the output), in minutes; you set it when the output has no first-order removal.",
    ],
  },
  {
    id: "pass",
    term: "Pass",
    body: [
      "An input pulse is passed when the output crosses the threshold up inside its response window. A pulse that starts with the output already above the threshold is excluded from pass and delay figures and counted separately.",
    ],
  },
  {
    id: "pass-probability",
    term: "Pass probability",
    body: [
      "The fraction of evaluable pulses of one input duration that passed, over all replicates. Shown with its Wilson 95% interval.",
    ],
    source: "Wilson score interval without continuity correction: Wilson 1927, J Am Stat Assoc 22:209.",
  },
  {
    id: "filter-curve",
    term: "Filter curve",
    body: [
      "Pass probability against input pulse duration. Each tried duration is a point with its Wilson 95% interval; the dotted segment is the monotone estimate between tried durations, where there are no data. The logistic smooth is optional and is marked when it fits poorly.",
    ],
  },
  {
    id: "monotone-estimate",
    term: "Monotone estimate",
    body: [
      "The pass curve under the sole assumption that longer pulses do not pass less often: the isotonic regression of the pass fractions, weighted by the number of pulses, computed by pool-adjacent-violators.",
    ],
    source: "Ayer, Brunk, Ewing, Reid & Silverman 1955, Ann Math Stat 26:641.",
  },
  {
    id: "d50",
    term: "d50",
    body: [
      "The input pulse duration passed half the time, read from the monotone estimate by interpolating on log duration between the two tried durations that straddle 50%. Its 95% interval runs between tried durations, because between them the data say nothing.",
      "No number is given when the curve is not bracketed (every tried duration is on one side of 50%), when the durations around 50% are more than half a decade apart (not estimable), or when the curve is a plateau; the reason is shown in words instead.",
    ],
    source: "Isotonic regression: Ayer et al. 1955, Ann Math Stat 26:641.",
  },
  {
    id: "logistic-smooth",
    term: "Logistic smooth",
    body: [
      "A two-parameter logistic curve of pass probability against log duration, fitted by maximum likelihood. It is drawn as a smooth only; its fit is checked with Pearson's chi-square on (durations − 2) degrees of freedom, and when p < 0.05 the chart says not to read d50 from it.",
    ],
    source: "Agresti 2013, Categorical Data Analysis, section 4.5.",
  },
  {
    id: "false-pass-rate",
    term: "False-pass rate",
    body: [
      "The fraction of input pulses shorter than the noise duration (10 min unless set) that passed, pooled over those durations, with its Wilson 95% interval. It is how often a brief, spurious input leaks through.",
    ],
  },
  {
    id: "response-delay",
    term: "Response delay",
    body: [
      'From the start of an input pulse to the output\'s first up-crossing in its window. A pulse with no response is censored at its window length. Medians and quantiles are Kaplan-Meier estimates, with the Brookmeyer-Crowley 95% interval; "not reached" means fewer than half responded.',
    ],
    source: "Kaplan & Meier 1958, J Am Stat Assoc 53:457; Brookmeyer & Crowley 1982, Biometrics 38:29.",
  },
  {
    id: "delay-cost",
    term: "Delay paid for long pulses",
    body: [
      "The Kaplan-Meier median response delay over pulses at least 3 × the noise duration long (the longest duration when none is): the delay the filter costs for inputs it should pass.",
    ],
  },
  {
    id: "off-delay",
    term: "OFF delay",
    body: ["From the end of an input pulse to the output's first down-crossing after it, among passed pulses."],
  },
  {
    id: "pulse-width",
    term: "Output pulse width",
    body: [
      "From an up-crossing of the threshold to the next down-crossing of the lower edge of the hysteresis band, in minutes.",
    ],
  },
  {
    id: "fwhm",
    term: "FWHM, peak and time to peak",
    body: [
      "For pulse generators: the peak is the largest output in the window, the baseline is the output at the pulse's start, and the FWHM is the full width at half maximum above the baseline. Time to peak runs from the pulse's start.",
    ],
  },
  {
    id: "fano",
    term: "Fano factor",
    body: [
      "Variance of the output divided by its mean (molecules). 1 for a Poisson distribution; above 1 means burstier than Poisson. Linger uses the total variance over replicates (mean within-replicate variance plus variance of the replicate means). Under a pulse train it includes the pulses' own swings.",
    ],
  },
  {
    id: "cv",
    term: "Coefficient of variation",
    body: ["Standard deviation of the output divided by its mean."],
  },
  {
    id: "method",
    term: "Simulation method",
    body: [
      "Exact: Gillespie's direct method, a statistically exact sample of the chemical master equation. Approximate: tau-leaping, which fires many reactions per step with the step chosen by Cao, Gillespie & Petzold; figures that depend on rare, noise-driven events can shift.",
    ],
    source: "Gillespie 1977, J Phys Chem 81:2340; Cao, Gillespie & Petzold 2006, J Chem Phys 124:044109.",
  },
  {
    id: "match-distance",
    term: "Match distance",
    body: [
      "How far a simulated point is from uploaded traces: the weighted difference in pass rates over the durations both sides have, plus the Kolmogorov-Smirnov distance D between their response-delay distributions, plus D between their output pulse widths. 0 is identical, 3 is as far apart as possible.",
    ],
    source: "Two-sample Kolmogorov-Smirnov statistic: Smirnov 1948.",
  },
  {
    id: "acceleration",
    term: "Acceleration",
    body: [
      "The time to reach half the ON steady state (T1/2) of a matched simple-regulation control divided by the circuit's, in the deterministic model: above 1, the circuit responds faster.",
    ],
  },
  {
    id: "within-noise",
    term: "Within noise",
    body: [
      "In a comparison, a difference is within noise when its Holm-adjusted p-values are 0.05 or more (Kolmogorov-Smirnov and Mann-Whitney for delays and widths, Fisher's exact test for pass counts).",
    ],
    source: "Holm 1979, Scand J Stat 6:65.",
  },
];

export const TERM_IDS = new Set(TERMS.map((t) => t.id));
