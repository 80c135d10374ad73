/**
 * Resolves a run's threshold settings (domain notes section 5):
 * - theta: the user's value, else half the steady state the mean-field model
 *   reaches from the run's initial state under constant ON input;
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
import type { CompiledModel } from "@/sim/circuit/compile-model";

export interface ResolvedThreshold {
  theta: number;
  downTheta: number;
  hysteresis: number;
  windowMinutes: number;
  outputLifetimeMinutes: number;
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
  let onSteadyState = NaN;
  let theta = s.value;
  const needOde = theta === undefined;
  if (needOde) {
    const sig = Float64Array.from(model.signalOff);
    sig[setup.inputSignal] = setup.onLevel;
    let ss: Float64Array;
    try {
      ss = odeSteadyState(model, model.baseParams, odeStartState(setup.spec).y, sig);
    } catch (e) {
      throw new Error(
        `cannot determine the default threshold: ${(e as Error).message} under constant ON input; set threshold.value`,
      );
    }
    onSteadyState = ss[model.outputIndex];
    theta = onSteadyState / 2;
    if (!(theta > 0))
      throw new Error(
        `cannot determine the default threshold: the ON steady state of "${output}" is 0; set threshold.value`,
      );
  } else {
    try {
      const sig = Float64Array.from(model.signalOff);
      sig[setup.inputSignal] = setup.onLevel;
      onSteadyState = odeSteadyState(model, model.baseParams, odeStartState(setup.spec).y, sig)[model.outputIndex];
    } catch {
      onSteadyState = NaN;
    }
  }
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
    onSteadyState,
    thresholdSource: needOde ? "default" : "set",
    windowSource: s.windowMinutes !== undefined ? "set" : "default",
    rule: needOde ? `Half the mean-field ON steady state (${onSteadyState} molecules).` : "Set in the run.",
    offSteadyState: NaN,
    onMaximum: onSteadyState,
    warnings: [],
  };
  if (cache.size > 32) cache.clear();
  cache.set(setup.key, resolved);
  return resolved;
}
