/** Behaviour labels of a circuit at parameters (docs/regimes.md). */
export { REGIME_LABELS, type RegimeLabel, type RegimeVerdict } from "./labels";
export { classifyDeterministic, type DeterministicInput } from "./classify-deterministic";
export { classifyStochastic, type StochasticInput } from "./classify-stochastic";
export { passCurveVerdict, type PassCurvePoint } from "./pass-curve-rule";
export { eigenvalues, type Eigenvalue } from "./eigenvalues";
export { findSteadyStates, type SteadyState } from "./steady-states";
export {
  prepareRunRegime,
  runRegime,
  settleRunRegime,
  type PreparedRunRegime,
  type RunRegime,
  type RunRegimeOptions,
} from "./run-regime";
