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
  {
    id: "regime-map",
    term: "Regime map",
    body: [
      "A grid over one or two parameters, each cell marked by what the circuit does there (silent, steady, follower, persistence filter, pulse generator, memory, damped or sustained oscillation, unclear), by fill and by symbol. Thick edges are boundaries between behaviours. The rules behind each label are in docs/regimes.md.",
      "A mean-field map labels every point from the deterministic model alone: no stochastic simulation, so it is quick, but it cannot show what noise does (noise-driven cycles, switching between states). A sweep's map shows the mean-field and the stochastic labels side by side.",
    ],
  },
  {
    id: "boundary-refinement",
    term: "Boundary refinement",
    body: [
      "After a coarse grid, one new point half-way between every two neighbouring cells whose labels differ (the geometric middle on a log-spaced axis), drawn as a small marker on the boundary between them, coloured and marked by its own label. At most 200 points are added to one map or sweep in all; asking again adds only the boundaries not yet refined. A refined sweep point's seed is fixed by the sweep's seed and its own coordinates, so the same point always gets the same seed.",
    ],
  },
  {
    id: "design-target",
    term: "Design target",
    body: [
      "Limits you state for a point: a false-pass rate at most X for pulses shorter than D min (pulses of those durations that passed, out of those counted), a pass probability at least P at a tested duration, a delay cost at most M min (the Kaplan-Meier median delay of long pulses), or a sustained oscillation with its period between A and B min (the stochastic label and its autocorrelation period in a sweep, the mean-field label and period in a mean-field map).",
      "A point meets the target when it meets every limit. The margin is how far inside a limit the point is, in the limit's own unit (negative: outside it). These are point estimates from the point's own figures, not guarantees: look at their intervals on the run page before relying on a point near a limit.",
    ],
  },
  {
    id: "fraction-of-cells",
    term: "Fraction of cells meeting a target",
    body: [
      "With cell-to-cell variation set, each replicate draws its own parameters, like one cell. Each replicate is judged against the target on its own pulses (its own pass fraction per duration, the plain median delay of its own long pulses), and the fraction of replicates that meet it is given with a Wilson 95% interval.",
      "It needs at least 20 replicates at the point; the first 1,000 replicates of a point are kept for it. The oscillation limit is a property of the ensemble, so no fraction is given for it. With few pulses per replicate the per-replicate figures are coarse: a replicate with 3 short pulses has a false-pass rate of 0, 1/3, 2/3 or 1.",
    ],
    source: "Wilson 1927, J Am Stat Assoc 22:209.",
  },
];

export const TERM_IDS = new Set(TERMS.map((t) => t.id));
