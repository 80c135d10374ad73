/**
 * The regime record of a run (regime.json, docs/regimes.md): the deterministic
 * label from the mean-field model at the run's system size and threshold, and
 * the stochastic label from a small direct-method ensemble seeded from the
 * run's seed; both use the run's pass curve when it has input pulses.
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { classifyDeterministic } from "./classify-deterministic";
import { classifyStochastic } from "./classify-stochastic";
import type { RegimeVerdict } from "./labels";
import type { PassCurvePoint } from "./pass-curve-rule";

export interface RunRegime {
  deterministic: RegimeVerdict;
  stochastic: RegimeVerdict;
}

export interface RunRegimeOptions {
  /** The run's seed (the ensemble's seeds derive from it). */
  seed: string;
  hysteresis?: number;
  outputLifetimeMinutes?: number;
  replicates?: number;
}

/** A threshold of Infinity (a run without input pulses and no value set) means none. */
export function runRegime(
  model: CompiledModel,
  thresholdMolecules: number,
  passCurve: PassCurvePoint[] | undefined,
  options: RunRegimeOptions,
): RunRegime {
  const thr = Number.isFinite(thresholdMolecules) ? thresholdMolecules : undefined;
  let stochastic: RegimeVerdict;
  try {
    stochastic = classifyStochastic({ model, thresholdMolecules: thr, passCurve, ...options });
  } catch (e) {
    stochastic = {
      label: "unclear",
      evidence: {},
      reason: `the ensemble could not be simulated: ${(e as Error).message}`,
    };
  }
  let deterministic: RegimeVerdict;
  try {
    deterministic = classifyDeterministic({ model, thresholdMolecules: thr, passCurve });
  } catch (e) {
    // e.g. the call's ODE budget is spent (sim/ode/ode-budget.ts): the message names the cause
    deterministic = {
      label: "unclear",
      evidence: {},
      reason: `the mean-field model could not be solved within the computing budget: ${(e as Error).message}`,
    };
  }
  return { deterministic, stochastic };
}
