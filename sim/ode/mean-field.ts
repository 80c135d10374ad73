/**
 * Mean-field (deterministic) rate equations of a compiled circuit:
 * dx_i/dt = sum_j v_ij * rate_j(x), with the mass-action rate of 2A -> ... equal
 * to k*A^2/2 (the ODE limit of the propensity k*A*(A-1)/2) and the other laws
 * as in the stochastic model. Optionally a last component accumulates the total
 * rate sum_j rate_j (the expected number of firings, for cost estimates).
 *
 * Time-dependent expression rates read `clock.tq`, the probe time of the
 * current clock interval, which the caller updates when it stops at a clock
 * stop (sim/ode/solve-ode.ts); without a clock the interval is found from t
 * (just after any stop at t). Assignment rules set their targets from the
 * clamped state before the rates are computed (a target's own derivative is 0).
 */
import { applyRules, clockProbeAt, reactionRate, type CompiledModel } from "@/sim/circuit/compile-model";
import type { OdeRhs } from "./dormand-prince";

export function meanFieldRhs(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  accumulateTotal = false,
  clock?: { tq: number },
): OdeRhs {
  const timed = model.clockStops.length > 0;
  const nS = model.nSpecies;
  const nR = model.nReactions;
  const clamped = new Float64Array(nS);
  return (t, y, dy) => {
    const tq = clock ? clock.tq : timed ? clockProbeAt(model, t) : undefined;
    for (let i = 0; i < nS; i++) {
      clamped[i] = y[i] > 0 ? y[i] : 0;
      dy[i] = 0;
    }
    if (model.rules.length > 0) applyRules(model, clamped, p, sig, false);
    let total = 0;
    for (let j = 0; j < nR; j++) {
      const a = reactionRate(model, p, clamped, sig, j, true, tq);
      total += a;
      for (const d of model.reactions[j].delta) dy[d.species] += d.change * a;
    }
    if (accumulateTotal) dy[nS] = total;
  };
}
