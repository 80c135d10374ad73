/**
 * Steady states of a compiled circuit's mean-field rate equations with the
 * signals held at fixed levels. Starts: the circuit's initial state, all zero,
 * each species alone at a high level (twice the largest level reached from the
 * initial state, at least the system size), and all species high. From each
 * start it integrates for `settleMinutes` (Dormand-Prince 5(4)), then polishes
 * the end point with Newton's method; distinct roots (relative distance above
 * 1e-5) are kept with their Jacobian eigenvalues. A start whose trajectory has
 * not reached a root (its end point is more than 1% of the scale away) is
 * reported as unsettled, for the limit-cycle check.
 *
 * Every integration here (and in the step response and cycle check, which use
 * `integrator`) counts against the ambient ODE budget (sim/ode/ode-budget.ts),
 * so the behaviour labels share the whole-call budget of the run's
 * finalisation; exceeding it throws OdeBudgetError, which the classifiers turn
 * into "unclear" with the budget's reason.
 */
import type { CompiledModel } from "@/sim/circuit/compile-model";
import { DopriIntegrator, type OdeRhs } from "@/sim/ode/dormand-prince";
import { meanFieldRhs } from "@/sim/ode/mean-field";
import { odeBudget, type OdeBudget } from "@/sim/ode/ode-budget";
import { jacobian } from "./jacobian";
import { eigenvalues, type Eigenvalue } from "./eigenvalues";
import { newtonPolish } from "./newton-polish";

export interface SteadyState {
  state: Float64Array;
  eigenvalues: Eigenvalue[];
  /** Largest real part of the eigenvalues, per minute (< 0: stable). */
  dominantReal: number;
  /** |imaginary part| of the dominant eigenvalue (0 when real), radians per minute. */
  dominantImag: number;
  stable: boolean;
}

export interface SteadyStateSearch {
  states: SteadyState[];
  /** End points of trajectories that had not settled on a root. */
  unsettled: Float64Array[];
  rhs: OdeRhs;
  /** Where the trajectory from the initial state had got to after settleMinutes. */
  fromInitial: Float64Array;
  /** Species scale used for the starts and tolerances (molecules). */
  scale: number;
}

/** Slowest turnover time of the circuit (minutes): 1 / the smallest positive -J_ii at the initial state. */
export function turnoverMinutes(model: CompiledModel, p: Float64Array, sig: Float64Array): number {
  const rhs = meanFieldRhs(model, p, sig, false);
  const y = Float64Array.from(model.init);
  const J = jacobian(rhs, y, Math.max(1, model.systemSize));
  let slowest = Infinity;
  for (let i = 0; i < model.nSpecies; i++) {
    const d = -J[i * model.nSpecies + i];
    if (d > 1e-12) slowest = Math.min(slowest, d);
  }
  return Number.isFinite(slowest) ? 1 / slowest : 1;
}

/** The classifiers' integrator, counting its steps against `budget` (default: the ambient one). */
export function integrator(n: number, rhs: OdeRhs, budget: OdeBudget = odeBudget()): DopriIntegrator {
  return new DopriIntegrator(n, rhs, { relTol: 1e-8, absTol: 1e-8, maxSteps: 2_000_000, budget });
}

function maxAbs(v: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i]));
  return m;
}

export function findSteadyStates(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  settleMinutes: number,
  stabilityMargin: number,
): SteadyStateSearch {
  const n = model.nSpecies;
  const rhs = meanFieldRhs(model, p, sig, false);
  const rate = 1 / Math.max(settleMinutes / 100, 1e-9);
  const fromInit = Float64Array.from(model.init);
  const budget = odeBudget();
  // for the budget's message: each start integrates over [0, settleMinutes]
  budget.problem = {
    model,
    p,
    sig,
    from: 0,
    to: settleMinutes,
    hint: "the steady-state search of the behaviour labels",
  };
  integrator(n, rhs, budget).integrate(fromInit, 0, settleMinutes);
  const scale = Math.max(2 * maxAbs(fromInit), model.systemSize, 1);
  const starts: Float64Array[] = [Float64Array.from(model.init), new Float64Array(n)];
  for (let i = 0; i < n; i++) {
    const s = new Float64Array(n);
    s[i] = scale;
    starts.push(s);
  }
  starts.push(new Float64Array(n).fill(scale));
  const states: SteadyState[] = [];
  const unsettled: Float64Array[] = [];
  const same = (a: Float64Array, b: Float64Array) => {
    for (let i = 0; i < n; i++)
      if (Math.abs(a[i] - b[i]) > 1e-5 * Math.max(Math.abs(a[i]), Math.abs(b[i]), scale * 1e-3)) return false;
    return true;
  };
  const addRoot = (y: Float64Array) => {
    if (states.some((s) => same(s.state, y))) return;
    const ev = eigenvalues(jacobian(rhs, y, scale), n);
    const dom = ev[0];
    states.push({
      state: y,
      eigenvalues: ev,
      dominantReal: dom.re,
      dominantImag: Math.abs(dom.im),
      stable: dom.re < -stabilityMargin,
    });
  };
  for (let s = 0; s < starts.length; s++) {
    const y = Float64Array.from(s === 0 ? fromInit : starts[s]);
    if (s !== 0) integrator(n, rhs, budget).integrate(y, 0, settleMinutes);
    const root = newtonPolish(rhs, y, scale, rate);
    if (root) addRoot(root.y);
    let dist = Infinity;
    if (root) {
      dist = 0;
      for (let i = 0; i < n; i++) dist = Math.max(dist, Math.abs(root.y[i] - y[i]));
    }
    if (!root || dist > 0.01 * scale) unsettled.push(y);
  }
  // the start points themselves (Newton straight from the start can reach unstable roots)
  for (const s of starts) {
    const root = newtonPolish(rhs, s, scale, rate);
    if (root) addRoot(root.y);
  }
  states.sort((a, b) => a.state[model.outputIndex] - b.state[model.outputIndex]);
  return { states, unsettled, rhs, fromInitial: fromInit, scale };
}
