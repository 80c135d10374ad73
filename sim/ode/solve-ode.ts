/**
 * Deterministic (mean-field) solution of a run's circuit on its output grid,
 * for overlay on the stochastic replicates. Dormand-Prince 5(4) with error
 * control (./dormand-prince.ts), switching to a Rosenbrock method with the
 * analytic Jacobian when the circuit is stiff (./auto-integrator.ts), stopping
 * exactly at every switch time of the input program, at every clock stop of
 * time-dependent expression rates and at every grid time (at equal times the
 * input switch first). Every solve runs under one step (and optionally
 * wall-time) budget for the whole call (./ode-budget.ts): past it,
 * OdeBudgetError names the fastest reaction. Same system size and start as the
 * stochastic run (start = offSteadyState: burn-in of burnInMinutes with the
 * input off, from the given counts); no extrinsic variation.
 *
 * Events (sim/engine/event-runner.ts, amounts not rounded): scheduled ones at
 * their clock stops; species conditions are checked every eighth of a grid
 * step and a rise is located by bisection to about 1e-12 of the time (a
 * condition that rises and falls again within one check is missed). Events do
 * not fire during the burn-in. The steady-state helpers below ignore events.
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import { AutoOdeIntegrator } from "./auto-integrator";
import { EventRunner } from "@/sim/engine/event-runner";
import { meanFieldRhs } from "./mean-field";
import { meanFieldJacobian } from "./mean-field-jacobian";
import { odeBudget, type OdeBudget } from "./ode-budget";
import { runSetup } from "@/sim/engine/run-setup";
import { applyRules, clockProbeAt, type CompiledModel } from "@/sim/circuit/compile-model";

export interface OdeSolveOptions {
  relTol?: number;
  absTol?: number;
  /** Parameter vector to use instead of the circuit's (same layout). */
  params?: Float64Array;
  /** Budget of the whole call (default: the ambient one of withOdeBudget, else DEFAULT_ODE_STEPS). */
  budget?: OdeBudget;
}

export interface OdeSolution {
  times: Float64Array;
  /** [species][grid] */
  values: Float64Array;
  /** Integral of the total mean-field rate over the run (after any burn-in), per replicate. */
  totalRateIntegral: number;
  /** Integral of the total rate during the burn-in (0 when start = given). */
  burnInRateIntegral: number;
}

function integrator(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  opts: OdeSolveOptions,
  budget: OdeBudget,
  span: { from: number; to: number },
  clock: { tq: number } = { tq: clockProbeAt(model, 0) },
) {
  budget.problem = { model, p, sig, ...span };
  return new AutoOdeIntegrator(
    model.nSpecies + 1,
    meanFieldRhs(model, p, sig, true, clock),
    meanFieldJacobian(model, p, sig, true, model.nSpecies + 1, clock),
    { relTol: opts.relTol ?? 1e-10, absTol: opts.absTol ?? 1e-10, budget },
  );
}

/** Mean-field state after the run's burn-in (or the given counts), from `init`. */
export function odeStartState(
  spec: RunSpec,
  opts: OdeSolveOptions = {},
): { y: Float64Array; burnInRateIntegral: number } {
  const setup = runSetup(spec);
  const { model } = setup;
  const p = opts.params ?? model.baseParams;
  const y = new Float64Array(model.nSpecies + 1);
  y.set(model.init);
  if (setup.spec.start === "offSteadyState" && setup.spec.burnInMinutes > 0) {
    const sig = Float64Array.from(model.signalOff);
    const span = { from: 0, to: setup.spec.burnInMinutes };
    integrator(model, p, sig, opts, odeBudget(opts.budget), span).integrate(y, 0, setup.spec.burnInMinutes);
  }
  const burnInRateIntegral = y[model.nSpecies];
  y[model.nSpecies] = 0;
  return { y, burnInRateIntegral };
}

export function solveOde(spec: RunSpec, opts: OdeSolveOptions = {}): OdeSolution {
  const setup = runSetup(spec);
  const { model, grid } = setup;
  const program = setup.sharedProgram;
  const p = Float64Array.from(opts.params ?? model.baseParams);
  const sig = Float64Array.from(model.signalOff);
  const budget = odeBudget(opts.budget);
  const { y, burnInRateIntegral } = odeStartState(spec, { ...opts, budget });
  const clock = { tq: 0 };
  const cs = model.clockStops;
  let xi = 0;
  while (xi < cs.length && cs[xi] <= 0) xi++;
  clock.tq = model.clockProbe[xi];
  const ode = integrator(model, p, sig, opts, budget, { from: 0, to: grid[grid.length - 1] ?? 0 }, clock);
  const rules = model.rules.length > 0;
  if (rules) applyRules(model, y, p, sig, false);
  const runner = model.events.length > 0 ? new EventRunner(model, y, p, sig, false) : null;
  runner?.init();
  const watch = runner !== null && model.speciesTriggers.length > 0;
  const checkStep = (grid.length > 1 ? grid[1] - grid[0] : setup.spec.endTimeMinutes) / 8;
  const ya = new Float64Array(y.length);
  /** Integrates from t0 to t1, firing species-condition events where they rise. */
  const advance = (t0: number, t1: number) => {
    if (!watch) return ode.integrate(y, t0, t1);
    let a = t0;
    while (a < t1) {
      const b = t1 - a <= checkStep * 1.000001 ? t1 : a + checkStep;
      ya.set(y);
      ode.integrate(y, a, b);
      if (!runner!.rose()) {
        runner!.fire(b, -1); // conditions that fell re-arm
        a = b;
        continue;
      }
      let lo = a;
      let hi = b;
      for (let it = 0; it < 80 && hi - lo > 1e-12 * Math.max(1, Math.abs(hi)); it++) {
        const mid = 0.5 * (lo + hi);
        y.set(ya);
        ode.h = 0;
        ode.integrate(y, a, mid);
        if (runner!.rose()) hi = mid;
        else lo = mid;
      }
      y.set(ya);
      ode.h = 0;
      ode.integrate(y, a, hi);
      runner!.fire(hi, -1);
      ode.h = 0;
      a = hi;
    }
  };
  const nS = model.nSpecies;
  const ng = grid.length;
  const values = new Float64Array(nS * ng);
  const sw = program ? program.switchTimes : new Float64Array(0);
  const lv = program ? program.levels : new Float64Array(0);
  let si = 0;
  let t = 0;
  for (let g = 0; g < ng; g++) {
    const tg = grid[g];
    for (;;) {
      const tSw = si < sw.length ? sw[si] : Infinity;
      const tX = xi < cs.length ? cs[xi] : Infinity;
      const next = Math.min(tSw, tX);
      if (!(next <= tg)) break;
      advance(t, next);
      t = next;
      if (tSw <= tX) {
        if (setup.inputSignal >= 0) sig[setup.inputSignal] = lv[si];
        si++;
      } else {
        xi++;
        clock.tq = model.clockProbe[xi];
        if (runner && model.stopFire[xi - 1] === 1) runner.fire(t, xi - 1);
      }
      ode.h = 0; // restart step-size selection after a discontinuity
    }
    advance(t, tg);
    t = tg;
    if (rules) applyRules(model, y, p, sig, false);
    for (let i = 0; i < nS; i++) values[i * ng + g] = y[i];
  }
  return { times: grid.slice(), values, totalRateIntegral: y[nS], burnInRateIntegral };
}

/**
 * Mean-field steady state with the signals fixed at `sig`, from y0: integrates
 * in blocks until the relative change over a block is below 1e-9 (and the
 * derivative small), up to maxMinutes. Throws when the state does not settle
 * (for example an oscillator), and OdeBudgetError past the budget.
 */
export function odeSteadyState(
  model: CompiledModel,
  p: Float64Array,
  y0: Float64Array,
  sig: Float64Array,
  maxMinutes = 200_000,
  given?: OdeBudget,
): Float64Array {
  const n = model.nSpecies;
  // one spare component, as in the cost-estimate system (kept so the error norm is unchanged)
  const y = new Float64Array(n + 1);
  y.set(y0.subarray(0, n));
  const budget = odeBudget(given);
  budget.problem = { model, p, sig, from: 0, to: maxMinutes, hint: "the search for a steady state" };
  const ode = new AutoOdeIntegrator(
    n + 1,
    meanFieldRhs(model, p, sig, false),
    meanFieldJacobian(model, p, sig, false, n + 1),
    { relTol: 1e-10, absTol: 1e-10, budget },
  );
  const prev = new Float64Array(n + 1);
  let block = 10;
  let t = 0;
  while (t < maxMinutes) {
    prev.set(y);
    ode.integrate(y, t, t + block);
    t += block;
    let settled = true;
    for (let i = 0; i < n; i++) if (Math.abs(y[i] - prev[i]) > 1e-9 * Math.max(Math.abs(y[i]), 1e-6)) settled = false;
    if (settled) return y.slice(0, n);
    block = Math.min(block * 2, 5000);
  }
  throw new Error(`the mean-field model does not settle within ${maxMinutes} minutes`);
}
