/**
 * The regime record of a run (regime.json, docs/regimes.md): the deterministic
 * label from the mean-field model at the run's system size and threshold, and
 * the stochastic label from a small direct-method ensemble seeded from the
 * run's seed; both use the run's pass curve when it has input pulses.
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { classifyDeterministicBeforePassCurve } from "./classify-deterministic";
import { classifyStochasticBeforePassCurve } from "./classify-stochastic";
import type { PassCurvePending, RegimeVerdict } from "./labels";
import { settlePassCurve, type PassCurvePoint } from "./pass-curve-rule";
import { OdeBudgetError } from "@/sim/ode/ode-budget";

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
  return settleRunRegime(prepareRunRegime(model, thresholdMolecules, options), passCurve);
}

/** Both labels but for their pass-curve rule: what runRegime computes before the run's pass curve is known. */
export interface PreparedRunRegime {
  deterministic: RegimeVerdict | PassCurvePending;
  stochastic: RegimeVerdict | PassCurvePending;
}

/** The ensembles and the mean-field work of runRegime (all of its cost), in its order; needs no replicates. */
export function prepareRunRegime(
  model: CompiledModel,
  thresholdMolecules: number,
  options: RunRegimeOptions,
): PreparedRunRegime {
  const thr = Number.isFinite(thresholdMolecules) ? thresholdMolecules : undefined;
  let stochastic: RegimeVerdict | PassCurvePending;
  try {
    stochastic = classifyStochasticBeforePassCurve({ model, thresholdMolecules: thr, ...options });
  } catch (e) {
    stochastic = { label: "unclear", evidence: {}, reason: ensembleFailed(e) };
  }
  let deterministic: RegimeVerdict | PassCurvePending;
  try {
    deterministic = classifyDeterministicBeforePassCurve({ model, thresholdMolecules: thr });
  } catch (e) {
    // e.g. the call's ODE budget is spent (sim/ode/ode-budget.ts): the message names the cause
    deterministic = { label: "unclear", evidence: {}, reason: meanFieldFailed(e) };
  }
  return { deterministic, stochastic };
}

/** runRegime's labels from its prepared part and the run's pass curve. */
export function settleRunRegime(prepared: PreparedRunRegime, passCurve: PassCurvePoint[] | undefined): RunRegime {
  let stochastic: RegimeVerdict;
  try {
    stochastic = settlePassCurve(prepared.stochastic, passCurve);
  } catch (e) {
    stochastic = { label: "unclear", evidence: {}, reason: ensembleFailed(e) };
  }
  let deterministic: RegimeVerdict;
  try {
    deterministic = settlePassCurve(prepared.deterministic, passCurve);
  } catch (e) {
    deterministic = { label: "unclear", evidence: {}, reason: meanFieldFailed(e) };
  }
  return { deterministic, stochastic };
}

const ensembleFailed = (e: unknown) =>
  e instanceof OdeBudgetError
    ? `the mean-field steady states the ensemble starts from could not be found within the computing budget: ${e.message}`
    : `the ensemble could not be simulated: ${(e as Error).message}`;
const meanFieldFailed = (e: unknown) =>
  `the mean-field model could not be solved within the computing budget: ${(e as Error).message}`;
