/**
 * Resolves a run's threshold settings (docs/metrics.md, "Threshold"):
 * - theta: the user's value, else half-way between the output's mean-field OFF
 *   steady state (from the run's start state with the input off) and the
 *   highest mean-field output under constant ON input from that OFF state
 *   within the end time. A filter's highest level is its ON steady state (if
 *   reached in time); a pulse generator's is its peak, where half its steady
 *   state would sit in the OFF-state noise. The rule does not depend on the
 *   input program being tested;
 * - warnings: theta below MIN_THRESHOLD_MOLECULES, within the OFF state's
 *   Poisson noise, at or below the OFF steady state, or above anything the
 *   mean-field output reaches;
 * - downTheta = theta * (1 - hysteresis);
 * - output lifetime: the user's value, else 1 / (sum of the first-order
 *   removal rate constants of the output: mass-action reactions whose only
 *   reactant is one output molecule and that consume it);
 * - window: the user's value, else 3 output lifetimes.
 * Throws a clear error when a needed value cannot be determined. A run without
 * an input program and without a threshold value gets theta = Infinity (never
 * crossed; written as null in JSON).
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import { runSetup } from "./run-setup";
import { odeStartState, odeSteadyState } from "@/sim/ode/solve-ode";
import { DopriIntegrator } from "@/sim/ode/dormand-prince";
import { meanFieldRhs } from "@/sim/ode/mean-field";
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { formatNumber } from "@/shared/number-format";

export interface ResolvedThreshold {
  theta: number;
  downTheta: number;
  hysteresis: number;
  windowMinutes: number;
  outputLifetimeMinutes: number;
  /** Not computed here any more (NaN): sim/analysis/matched-control.ts solves for the ON steady state itself. */
  onSteadyState: number;
  /** "set" = threshold.value of the spec; "default" = the rule above; "none" = no input pulses (never crossed). */
  thresholdSource: "set" | "default" | "none";
  windowSource: "set" | "default";
  /** How theta was found, in words with the numbers used. */
  rule: string;
  /** Mean-field output at the OFF steady state, molecules (NaN when unknown). */
  offSteadyState: number;
  /** Highest mean-field output under constant ON input from OFF within the end time, molecules (NaN when unknown). */
  onMaximum: number;
  /** Plain-words warnings about the threshold. */
  warnings: string[];
}

/** Sum of first-order removal rate constants of the output species (per minute), 0 when none. */
export function outputRemovalRate(model: CompiledModel, p: Float64Array = model.baseParams): number {
  let sum = 0;
  const out = model.outputIndex;
  for (const r of model.reactions) {
    if (r.kind !== "massAction" || r.order !== 1) continue;
    if (r.reactants.length !== 1 || r.reactants[0].species !== out) continue;
    const d = r.delta.find((e) => e.species === out);
    if (d && d.change < 0) sum += p[r.rateSlot] * -d.change;
  }
  return sum;
}

const cache = new Map<string, ResolvedThreshold>();

export function resolveThreshold(spec: RunSpec): ResolvedThreshold {
  const setup = runSetup(spec);
  const hit = cache.get(setup.key);
  if (hit) return hit;
  const { model } = setup;
  const s = setup.spec.threshold;
  const output = model.speciesNames[model.outputIndex];
  if (setup.spec.program === undefined && s.value === undefined) {
    // A run without input pulses has no response to detect: the threshold is never crossed.
    const removal = outputRemovalRate(model);
    const lifetime = s.outputLifetimeMinutes ?? (removal > 0 ? 1 / removal : setup.spec.endTimeMinutes);
    return {
      theta: Infinity,
      downTheta: Infinity,
      hysteresis: s.hysteresis,
      windowMinutes: s.windowMinutes ?? 3 * lifetime,
      outputLifetimeMinutes: lifetime,
      onSteadyState: NaN,
      thresholdSource: "none",
      windowSource: s.windowMinutes !== undefined ? "set" : "default",
      rule: "No input pulses: nothing to detect, the threshold is never crossed.",
      offSteadyState: NaN,
      onMaximum: NaN,
      warnings: [],
    };
  }
  const reach = (): OnReach => onReachFromOff(setup);
  let theta = s.value;
  let rule = "Set in the run.";
  let levels: OnReach | null = null;
  if (theta === undefined) {
    try {
      levels = reach();
    } catch (e) {
      throw new Error(`cannot determine the default threshold: ${(e as Error).message}; set threshold.value`);
    }
    const rise = levels.onMaximum - levels.offSteadyState;
    // a rise of rounding size (an output the input does not reach) is no rise
    if (!(rise > 1e-6 * Math.max(1, Math.abs(levels.offSteadyState))))
      throw new Error(
        `cannot determine the default threshold: "${output}" does not rise above its OFF steady state (${fmt(levels.offSteadyState)} molecules) under constant ON input within the end time; set threshold.value`,
      );
    theta = levels.offSteadyState + rise / 2;
    const m = levels.offMoves;
    rule =
      (m
        ? `The mean-field output does not settle with the input OFF (it still moves after ${fmt(m.horizonMinutes)} min), so its OFF reference is its time average over the second half of the end time (${fmt(m.fromMinutes)}-${fmt(setup.spec.endTimeMinutes)} min): ${fmt(levels.offSteadyState)} molecules (it ranges ${fmt(m.min)}-${fmt(m.max)} there). Half-way between that and the highest mean-field level under constant ON input from the start state within the end time (`
        : `Half-way between the OFF steady state (${fmt(levels.offSteadyState)} molecules) and the highest mean-field level under constant ON input from OFF within the end time (`) +
      `${levels.onMaximumAtMinutes === null ? `${fmt(levels.onMaximum)} molecules` : `a peak of ${fmt(levels.onMaximum)} molecules at ${fmt(levels.onMaximumAtMinutes)} min`}): ${fmt(theta)} molecules.`;
  } else if (setup.spec.program !== undefined) {
    // (without input pulses there is no ON response to judge a set threshold by)
    try {
      levels = reach();
    } catch {
      levels = null; // the warnings below need the mean-field levels; without them there are none to give
    }
  }
  const warnings = thresholdWarnings(theta, levels, s.value !== undefined);
  const removal = outputRemovalRate(model);
  let lifetime = s.outputLifetimeMinutes ?? (removal > 0 ? 1 / removal : undefined);
  let window = s.windowMinutes;
  if (window === undefined) {
    if (lifetime === undefined)
      throw new Error(
        `cannot determine the response window: "${output}" has no first-order removal; set threshold.outputLifetimeMinutes or threshold.windowMinutes`,
      );
    window = 3 * lifetime;
  }
  if (lifetime === undefined) lifetime = window / 3;
  const resolved: ResolvedThreshold = {
    theta: theta!,
    downTheta: theta! * (1 - s.hysteresis),
    hysteresis: s.hysteresis,
    windowMinutes: window,
    outputLifetimeMinutes: lifetime,
    onSteadyState: NaN,
    thresholdSource: s.value === undefined ? "default" : "set",
    windowSource: s.windowMinutes !== undefined ? "set" : "default",
    rule,
    offSteadyState: levels ? levels.offSteadyState : NaN,
    onMaximum: levels ? levels.onMaximum : NaN,
    warnings,
  };
  if (cache.size > 32) cache.clear();
  cache.set(setup.key, resolved);
  return resolved;
}

/** Below this many molecules a threshold is crossed by a handful of production events (common practice). */
export const MIN_THRESHOLD_MOLECULES = 5;
/** A threshold closer than this many Poisson standard deviations sqrt(OFF) above the OFF level is crossed by OFF-state noise (common practice). */
export const OFF_NOISE_SDS = 3;
/** The OFF steady-state search stops after this many end times of mean-field time (and at least OFF_SETTLE_MIN_MINUTES). */
export const OFF_SETTLE_END_TIMES = 20;
export const OFF_SETTLE_MIN_MINUTES = 10_000;
/** Samples of the ON response over the end time when looking for its highest level. */
const REACH_SAMPLES = 2000;

interface OnReach {
  offSteadyState: number;
  onMaximum: number;
  /** Time of the peak when the response peaks and falls back; null when it rises to a level. */
  onMaximumAtMinutes: number | null;
  /**
   * Set when the OFF state does not settle (an oscillator): offSteadyState is then the time average of the
   * OFF trajectory from fromMinutes to the end time, where it ranges from min to max molecules.
   */
  offMoves?: { horizonMinutes: number; min: number; max: number; fromMinutes: number } | null;
}

/**
 * The output's OFF reference and the highest output under constant ON input over [0, end time], sampled
 * at REACH_SAMPLES points (a parabola through the best sample and its neighbours refines the peak).
 * OFF reference: the mean-field OFF steady state from the run's start state, when it settles; otherwise
 * (an oscillator's OFF state does not settle) the time average of the OFF trajectory from the start state
 * over the second half of the end time, and the ON response then starts from the start state too.
 */
function onReachFromOff(setup: ReturnType<typeof runSetup>): OnReach {
  const { model } = setup;
  const out = model.outputIndex;
  const n = model.nSpecies;
  const off = Float64Array.from(model.signalOff);
  const end = setup.spec.endTimeMinutes;
  const start = odeStartState(setup.spec).y;
  let from: Float64Array;
  let offLevel: number;
  let offMoves: OnReach["offMoves"] = null;
  // An OFF state that has not settled after OFF_SETTLE_END_TIMES end times (at least OFF_SETTLE_MIN_MINUTES)
  // is not a steady state: the OFF trajectory's time average over the second half of the end time stands in.
  const horizon = Math.max(OFF_SETTLE_MIN_MINUTES, OFF_SETTLE_END_TIMES * end);
  try {
    from = odeSteadyState(model, model.baseParams, start, off, horizon);
    offLevel = from[out];
  } catch (e) {
    const msg = (e as Error).message;
    if (!/does not settle/.test(msg)) throw new Error(`${msg} with the input OFF`);
    const traj = sampleOutput(model, off, start, end);
    const half = Math.floor(REACH_SAMPLES / 2);
    let sum = 0;
    let lo = Infinity;
    let hi = -Infinity;
    for (let k = half; k <= REACH_SAMPLES; k++) {
      const w = k === half || k === REACH_SAMPLES ? 0.5 : 1; // trapezoid rule on the sample grid
      sum += w * traj[k];
      lo = Math.min(lo, traj[k]);
      hi = Math.max(hi, traj[k]);
    }
    offLevel = sum / (REACH_SAMPLES - half);
    offMoves = { horizonMinutes: horizon, min: lo, max: hi, fromMinutes: (half * end) / REACH_SAMPLES };
    from = start.slice(0, n);
  }
  const on = Float64Array.from(model.signalOff);
  on[setup.inputSignal] = setup.onLevel;
  const values = sampleOutput(model, on, from, end);
  const dt = end / REACH_SAMPLES;
  let best = 0;
  for (let k = 1; k <= REACH_SAMPLES; k++) if (values[k] > values[best]) best = k;
  let maximum = values[best];
  let at = best * dt;
  if (best > 0 && best < REACH_SAMPLES) {
    const [a, b, c] = [values[best - 1], values[best], values[best + 1]];
    const curv = a - 2 * b + c;
    if (curv < 0) {
      const shift = (0.5 * (a - c)) / curv;
      maximum = b - 0.25 * (a - c) * shift;
      at = (best + shift) * dt;
    }
  }
  // A peak (a pulse generator's) is named with its time; a rise that levels off is named as a level.
  const peaked = maximum > values[REACH_SAMPLES] * (1 + 1e-3) + 1e-9;
  return { offSteadyState: offLevel, onMaximum: maximum, onMaximumAtMinutes: peaked ? at : null, offMoves };
}

/** The mean-field output at REACH_SAMPLES + 1 evenly spaced times over [0, end], from state y0 under signals sig. */
function sampleOutput(model: CompiledModel, sig: Float64Array, y0: Float64Array, end: number): Float64Array {
  const n = model.nSpecies;
  const y = new Float64Array(n + 1);
  y.set(y0.subarray(0, n));
  const ode = new DopriIntegrator(n + 1, meanFieldRhs(model, model.baseParams, sig, false), {
    relTol: 1e-10,
    absTol: 1e-10,
    maxSteps: 5_000_000,
  });
  const dt = end / REACH_SAMPLES;
  const values = new Float64Array(REACH_SAMPLES + 1);
  values[0] = y[model.outputIndex];
  for (let k = 1; k <= REACH_SAMPLES; k++) {
    ode.integrate(y, (k - 1) * dt, k * dt);
    values[k] = y[model.outputIndex];
  }
  return values;
}

/** Warnings about a threshold in plain words, with the numbers and the reason. */
export function thresholdWarnings(theta: number, levels: OnReach | null, userSet: boolean): string[] {
  const w: string[] = [];
  if (theta < MIN_THRESHOLD_MOLECULES)
    w.push(
      `The threshold is ${fmt(theta)} molecules, below ${MIN_THRESHOLD_MOLECULES}: a few stray production events cross it, so passes and delays may be noise (common practice). Raise threshold.value or the system size.`,
    );
  if (!levels) return w;
  const off = levels.offSteadyState;
  const m = levels.offMoves;
  if (m)
    w.push(
      m.max >= theta
        ? `The output oscillates with the input OFF (mean field ${fmt(m.min)}-${fmt(m.max)} molecules over the second half of the end time) and reaches the threshold (${fmt(theta)} molecules) without any input: a pass may be the oscillation, not a response to the pulse. Compare with a run without pulses, or set threshold.value above ${fmt(m.max)} molecules.`
        : `The output oscillates with the input OFF (mean field ${fmt(m.min)}-${fmt(m.max)} molecules over the second half of the end time): the OFF reference is its time average there, ${fmt(off)} molecules, not a steady state.`,
    );
  if (userSet && theta <= off)
    w.push(
      `The threshold (${fmt(theta)} molecules) is at or below the OFF steady state (${fmt(off)} molecules): the output starts above it, so most pulses are excluded.`,
    );
  else if (off > 0 && theta - off < OFF_NOISE_SDS * Math.sqrt(off))
    w.push(
      `The threshold (${fmt(theta)} molecules) is less than ${OFF_NOISE_SDS} Poisson standard deviations (sqrt(${fmt(off)}) = ${fmt(Math.sqrt(off))}) above the OFF steady state (${fmt(off)} molecules): OFF-state noise alone crosses it (common practice).`,
    );
  if (userSet && theta > levels.onMaximum)
    w.push(
      `The threshold (${fmt(theta)} molecules) is above anything the mean-field output reaches under constant ON input within the end time (${fmt(levels.onMaximum)} molecules): only noise can cross it.`,
    );
  return w;
}

/** Figures in the rule and warnings, in the app's one number format at 4 significant figures (docs/metrics.md). */
function fmt(x: number): string {
  return formatNumber(x, 4);
}
