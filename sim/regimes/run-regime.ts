/**
 * The regime record of a run (regime.json, docs/regimes.md): the deterministic
 * label from the mean-field model at the run's system size and threshold, with
 * the run's pass curve when it has input pulses, and the stochastic label, which
 * is not computed yet and says so.
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { classifyDeterministic } from "./classify-deterministic";
import type { RegimeVerdict } from "./labels";
import type { PassCurvePoint } from "./pass-curve-rule";

export interface RunRegime {
  deterministic: RegimeVerdict;
  stochastic: RegimeVerdict;
}

export const STOCHASTIC_NOT_YET =
  "no stochastic classifier yet: the ensemble's autocorrelation, peak coherence and dwell times are not measured";

export function runRegime(model: CompiledModel, thresholdMolecules: number, passCurve?: PassCurvePoint[]): RunRegime {
  return {
    deterministic: classifyDeterministic({ model, thresholdMolecules, passCurve }),
    stochastic: { label: "unclear", evidence: {}, reason: STOCHASTIC_NOT_YET },
  };
}
