/**
 * Stochastic behaviour label of a circuit at its parameters (rules and
 * thresholds in docs/regimes.md), from a small ensemble simulated with the
 * exact direct method (./ensemble.ts) and, when given, the run's own pass curve.
 *
 * Ensembles (each `replicates` strong, seeds `${seed}/regime/<part>/<i>`):
 *   off:     from the initial state, signals off, burn-in then a window (when the
 *            mean-field model has two or more stable states, the second half of
 *            the replicates starts from them in turn);
 *   on:      the same with the signals held on (circuits whose signals act);
 *   removal: from the end states of `on`, signals off (does the output stay on?);
 *   step:    from the end states of `off`, signals on (does the output peak and fall back?).
 * Measured:
 *   - the pooled autocorrelation of the output over each window, its first trough
 *     and the first peak after it (`acfFirstPeak`: how well a cycle is still
 *     correlated with itself one period later, the peak coherence), the period
 *     (lag of that peak), and the cycle-to-cycle spread of the amplitude
 *     (`amplitudeCv`). Noise-driven quasi-cycles around a stable focus are a
 *     narrow-band Gaussian process whose envelope is Rayleigh distributed
 *     (McKane & Newman 2005, Phys Rev Lett 94:218102; Rice 1944, Bell Syst Tech J
 *     23:282), amplitude CV sqrt(4/pi - 1) = 0.52 whatever the system size,
 *     while a limit cycle has a fixed amplitude whose spread shrinks as the
 *     system grows (a sine: 0; the ring of three at 1.5 times its Hopf point, as a
 *     mean-field cycle: see docs/regimes.md): the cut is at 0.4.
 *   - dwell times in the on and off states (hysteresis) in each condition.
 *
 * Order of the rules: unclear (ensemble stopped at its event budget) >
 * sustained oscillation > memory > silent > pulse generator > damped
 * oscillation > persistence filter / follower > steady.
 *
 * Example: classifyStochastic({ model: compileModel(repressorRing(5.67, 3), 100), seed: "s1" }).label
 *   === "sustained oscillation".
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { deriveParams } from "@/sim/circuit/compile-model";
import { outputRemovalRate } from "@/sim/engine/resolve-threshold";
import type { PassCurvePending, RegimeVerdict } from "./labels";
import { findSteadyStates, turnoverMinutes } from "./steady-states";
import { simulateEnsemble, type Ensemble } from "./ensemble";
import { acfRinging, amplitudeSpread, pooledAutocorrelation } from "./autocorrelation";
import { dwellTimes } from "./dwell-times";
import { settlePassCurve, type PassCurvePoint } from "./pass-curve-rule";
import { OdeBudgetError } from "@/sim/ode/ode-budget";

export interface StochasticInput {
  model: CompiledModel;
  /** Parameter vector (the model's base parameters when absent). */
  params?: Float64Array;
  seed: string;
  /** Output threshold in molecules (enables `silent`, the pulse-generator peak check and the memory level). */
  thresholdMolecules?: number;
  /** Hysteresis fraction for dwell times (default 0.2, as the run metrics). */
  hysteresis?: number;
  /** Output lifetime in minutes (default 1 / its first-order removal rate, else the slowest turnover). */
  outputLifetimeMinutes?: number;
  /** The run's pass curve from its replicates (enables follower / persistence filter). */
  passCurve?: PassCurvePoint[];
  /** Replicates per ensemble (default 8). */
  replicates?: number;
  /** Reaction firings allowed over all ensembles (default 40,000,000). */
  eventBudget?: number;
}

export const DEFAULT_REGIME_REPLICATES = 8;
/** Burn-in and window, in slowest turnover times (the window is at least 20 output lifetimes). */
export const BURN_IN_TURNOVERS = 20;
export const WINDOW_TURNOVERS = 200;
export const MIN_WINDOW_LIFETIMES = 20;
/** Samples: a tenth of a turnover, at most this many per window. */
export const MAX_SAMPLES = 4000;
/** Ringing: the autocorrelation dips to at most this... */
export const ACF_TROUGH_MAX = -0.1;
/** ...and comes back to at least this one period later (as the 5% peak ratio of the deterministic rule). */
export const ACF_PEAK_MIN = 0.05;
/** Limit cycle: amplitude CV at most this (Rayleigh envelope of noise-driven quasi-cycles: 0.52; a sine: 0). */
export const AMPLITUDE_CV_MAX = 0.4;

/** Memory: dwell in the on state and in the off state, under the same signals, of at least this many output lifetimes. */
export const MEMORY_DWELL_LIFETIMES = 10;
/** Pulse generator: the ensemble mean under a sustained input falls to at most this fraction of its peak. */
export const PULSE_FALLBACK_FRACTION = 0.5;

type Evidence = RegimeVerdict["evidence"];

interface Window {
  name: "off" | "on";
  series: Float64Array[];
}

export function classifyStochastic(input: StochasticInput): RegimeVerdict {
  return settlePassCurve(classifyStochasticBeforePassCurve(input), input.passCurve);
}

/** Every rule but the pass curve's and steady's (settlePassCurve adds those): the ensembles need no replicates. */
export function classifyStochasticBeforePassCurve(
  input: Omit<StochasticInput, "passCurve">,
): RegimeVerdict | PassCurvePending {
  const { model } = input;
  const p = Float64Array.from(input.params ?? model.baseParams);
  deriveParams(model, p);
  const off = Float64Array.from(model.signalOff);
  const on = Float64Array.from(model.signalOn);
  const hasOn = model.nSignals > 0 && on.some((v, i) => v !== off[i] && (model.signalDependents[i]?.length ?? 0) > 0);
  const tau = turnoverMinutes(model, p, off);
  const removal = outputRemovalRate(model, p);
  const lifetime = input.outputLifetimeMinutes ?? (removal > 0 ? 1 / removal : tau);
  const window = Math.max(WINDOW_TURNOVERS * tau, MIN_WINDOW_LIFETIMES * lifetime);
  const burn = BURN_IN_TURNOVERS * tau;
  const sample = Math.max(tau / 10, (window + burn) / MAX_SAMPLES);
  const R = input.replicates ?? DEFAULT_REGIME_REPLICATES;
  const budget = input.eventBudget ?? 40_000_000;
  const nEnsembles = hasOn ? 4 : 1;
  const cap = Math.max(1, Math.floor(budget / (R * nEnsembles)));
  const out = model.outputIndex;
  const ng = (ens: Ensemble) => ens.times.length;
  const outputOf = (ens: Ensemble, r: number, from = 0) =>
    ens.samples[r].subarray(out * ng(ens) + from, (out + 1) * ng(ens));
  const base: Evidence = {
    turnoverMinutes: tau,
    outputLifetimeMinutes: lifetime,
    replicates: R,
    windowMinutes: window,
    sampleMinutes: sample,
  };
  const run = (part: string, signals: Float64Array, starts: Float64Array[], minutes: number) =>
    simulateEnsemble({
      model,
      params: p,
      signals,
      starts,
      seeds: starts.map((_, i) => `${input.seed}/regime/${part}/${i}`),
      windowMinutes: minutes,
      sampleMinutes: sample,
      eventCapPerReplicate: cap,
    });
  const inits = Array.from({ length: R }, () => Float64Array.from(model.init));
  // when the mean-field model has several stable states with the signals off, the second half of the
  // off ensemble starts from them in turn: does each state hold under noise?
  const offStarts = inits.map((x) => Float64Array.from(x));
  let meanFieldStates = 0;
  try {
    const stable = findSteadyStates(model, p, off, 100 * tau, 1e-6 / tau).states.filter((st) => st.stable);
    meanFieldStates = stable.length;
    if (stable.length >= 2)
      for (let r = Math.ceil(R / 2), k = 0; r < R; r++, k++)
        offStarts[r] = Float64Array.from(stable[k % stable.length].state);
  } catch (e) {
    // Out of computing budget is not "no states": it goes to the caller (runRegime labels it unclear with
    // the budget's reason; a regime map refuses). Any other failure: every replicate starts from the initial state.
    if (e instanceof OdeBudgetError) throw e;
  }
  base.meanFieldStableStates = meanFieldStates;
  const skip = Math.round(burn / sample);
  const offRun = run("off", off, offStarts, burn + window);
  const onRun = hasOn ? run("on", on, inits, burn + window) : null;
  const removalRun = onRun ? run("removal", off, onRun.finalStates, window) : null;
  const stepRun = hasOn ? run("step", on, offRun.finalStates, window) : null;
  const all = [offRun, onRun, removalRun, stepRun].filter((e): e is Ensemble => e !== null);
  if (all.some((e) => e.capped))
    return {
      label: "unclear",
      evidence: { ...base, eventBudget: budget, events: all.reduce((a, e) => a + e.events, 0) },
      reason: `the classifier's ensemble stopped at its budget of ${budget} reaction firings; the circuit is too busy at this system size for a stochastic label`,
    };
  const windows: Window[] = [{ name: "off", series: offRun.samples.map((_, r) => outputOf(offRun, r, skip)) }];
  if (onRun) windows.push({ name: "on", series: onRun.samples.map((_, r) => outputOf(onRun, r, skip)) });

  // 1. oscillation: autocorrelation and amplitude spread per condition
  const cycles = windows.map((w) => {
    const acf = pooledAutocorrelation(w.series, Math.floor(w.series[0].length / 4));
    if (!acf) return null;
    const ring = acfRinging(acf);
    const ringing = ring.peakLag > 0 && ring.trough <= ACF_TROUGH_MAX && ring.peak >= ACF_PEAK_MIN;
    const amp = ringing
      ? amplitudeSpread(w.series, ring.peakLag, Math.max(1, Math.round(ring.peakLag / 10)))
      : { cv: NaN, mean: NaN, windows: 0 };
    return {
      condition: w.name,
      ringing,
      sustained: ringing && amp.cv <= AMPLITUDE_CV_MAX,
      evidence: {
        ringingCondition: w.name === "off" ? 0 : 1,
        acfTrough: Number.isFinite(ring.trough) ? ring.trough : null,
        acfFirstPeak: Number.isFinite(ring.peak) ? ring.peak : null,
        acfPeriodMinutes: ring.peakLag > 0 ? ring.peakLag * sample : null,
        amplitudeCv: Number.isFinite(amp.cv) ? amp.cv : null,
        meanAmplitude: Number.isFinite(amp.mean) ? amp.mean : null,
        amplitudeWindows: amp.windows,
      } as Evidence,
    };
  });
  const sustained = cycles.find((c) => c?.sustained);
  if (sustained) return { label: "sustained oscillation", evidence: { ...base, ...sustained.evidence } };

  // 2. memory: on and off dwell times of at least 10 output lifetimes under the same signals
  let highestMean = 0;
  for (const w of windows)
    for (const y of w.series) {
      let s = 0;
      for (let i = 0; i < y.length; i++) s += y[i];
      highestMean = Math.max(highestMean, s / y.length);
    }
  const thr = input.thresholdMolecules;
  const memoryLevel = thr !== undefined && Number.isFinite(thr) ? thr : highestMean / 2;
  const h = input.hysteresis ?? 0.2;
  const dwellStats = (series: Float64Array[]) => {
    let longestOn = 0,
      longestOff = 0,
      replicatesOn = 0;
    for (const y of series) {
      const d = dwellTimes(y, sample, memoryLevel, memoryLevel * (1 - h));
      for (const x of d.on) longestOn = Math.max(longestOn, x.minutes);
      for (const x of d.off) longestOff = Math.max(longestOff, x.minutes);
      if (y[y.length - 1] >= memoryLevel) replicatesOn++;
    }
    return { longestOn, longestOff, replicatesOn };
  };
  if (memoryLevel > 0) {
    const groups: { name: string; series: Float64Array[] }[] = [
      {
        name: "off",
        series: [
          ...windows[0].series,
          ...(removalRun ? removalRun.samples.map((_, r) => outputOf(removalRun, r)) : []),
        ],
      },
    ];
    if (windows[1]) groups.push({ name: "on", series: windows[1].series });
    for (const g of groups) {
      const d = dwellStats(g.series);
      const need = MEMORY_DWELL_LIFETIMES * lifetime;
      if (d.longestOn >= need && d.longestOff >= need)
        return {
          label: "memory",
          evidence: {
            ...base,
            memoryCondition: g.name === "off" ? 0 : 1,
            memoryLevel,
            longestOnDwellMinutes: d.longestOn,
            longestOffDwellMinutes: d.longestOff,
            onDwellOverLifetimes: d.longestOn / lifetime,
            replicatesEndingOn: d.replicatesOn,
            replicatesCounted: g.series.length,
          },
        };
    }
  }

  // 3. silent: no sample of any ensemble reaches the threshold
  let highest = 0;
  for (const e of all)
    for (let r = 0; r < e.samples.length; r++) {
      const y = outputOf(e, r);
      for (let i = 0; i < y.length; i++) if (y[i] > highest) highest = y[i];
    }
  const finiteThr = thr !== undefined && Number.isFinite(thr) ? thr : undefined;
  if (finiteThr !== undefined && highest < finiteThr)
    return { label: "silent", evidence: { ...base, thresholdMolecules: finiteThr, highestOutput: highest } };

  // 4. pulse generator: the ensemble mean under a sustained input peaks and falls back
  if (stepRun) {
    const n = stepRun.times.length;
    const mean = new Float64Array(n);
    for (let r = 0; r < R; r++) {
      const y = outputOf(stepRun, r);
      for (let i = 0; i < n; i++) mean[i] += y[i] / R;
    }
    let peak = mean[0],
      peakAt = 0;
    for (let i = 1; i < n; i++) if (mean[i] > peak) [peak, peakAt] = [mean[i], i];
    const tail = Math.max(1, Math.floor(n / 10));
    let final = 0;
    for (let i = n - tail; i < n; i++) final += mean[i] / tail;
    if (peak > mean[0] && (finiteThr === undefined || peak >= finiteThr) && final <= PULSE_FALLBACK_FRACTION * peak)
      return {
        label: "pulse generator",
        evidence: {
          ...base,
          stepStart: mean[0],
          stepPeak: peak,
          stepPeakMinutes: peakAt * sample,
          stepFinal: final,
          finalOverPeak: final / peak,
        },
      };
  }

  // 5. damped oscillation: ringing autocorrelation with a spread amplitude (noise-driven quasi-cycles)
  const quasi = cycles.find((c) => c?.ringing);
  if (quasi) return { label: "damped oscillation", evidence: { ...base, ...quasi.evidence, quasiCycles: 1 } };

  // 6. the pass curve (settlePassCurve), else steady
  const c0 = cycles[0];
  return {
    pendingPassCurve: true,
    passCurveBase: base,
    steady: {
      label: "steady",
      evidence: {
        ...base,
        highestOutput: highest,
        acfTrough: c0?.evidence.acfTrough ?? null,
        acfFirstPeak: c0?.evidence.acfFirstPeak ?? null,
      },
    },
  };
}
