/**
 * Analytic Jacobian of the mean-field rate equations of a compiled circuit
 * (./mean-field.ts): J[i*n + s] = d(dx_i/dt)/dx_s = sum_j v_ij * d rate_j/dx_s,
 * from the rate laws of compile-model.ts by the product rule:
 * - mass action k * prod f(x) with f(x) = x (one molecule) or x^2/2 (two);
 * - regulated production k * (leak + (1 - leak) F), F = prod h_g (AND) or
 *   1 - prod(1 - h_g) (OR), with the Hill terms h = x^n/(K^n + x^n) (activator)
 *   or K^n/(K^n + x^n) (repressor), dh/dx = +-n x^(n-1) K^n / (K^n + x^n)^2;
 * - constant production: no dependence on the state.
 * Counts are clamped at 0 as in the rate equations (the derivative is taken
 * from the positive side). An expression rate is differentiated
 * symbolically (sim/circuit/expression-derivative.ts, one-sided at kinks) and
 * the derivative trees are compiled like the rates (treeFn); where a derivative
 * is not finite at the state (sqrt or ln at 0) that reaction falls back to
 * central differences of reactionRate, as does a law this file does not know,
 * so a new law is never silently wrong. With accumulateTotal the extra last row holds
 * the derivatives of the total rate (the cost-estimate component).
 *
 * Example: for dZ/dt = b - a Z the Jacobian is [-a].
 */
import {
  clockProbeAt,
  reactionRate,
  treeFn,
  type CompiledModel,
  type CompiledReaction,
  type TreeFn,
} from "@/sim/circuit/compile-model";
import { differentiate } from "@/sim/circuit/expression-derivative";
import type { ExprNode } from "@/sim/circuit/expression";
import { meanFieldRhs } from "./mean-field";

/** (y, J) => void: fills the row-major Jacobian at state y (length n = nSpecies, or nSpecies + 1 with the total). */
export type OdeJacobian = (t: number, y: Float64Array, J: Float64Array) => void;

export function meanFieldJacobian(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  accumulateTotal = false,
  /** Rows and columns of J (at least nSpecies; extra ones stay 0 unless they hold the total). */
  size = accumulateTotal ? model.nSpecies + 1 : model.nSpecies,
  /** The clock of time-dependent expression rates, as given to meanFieldRhs. */
  clock?: { tq: number },
): OdeJacobian {
  if (model.rules.length > 0) return rulesJacobian(model, p, sig, accumulateTotal, size, clock);
  const timed = model.clockStops.length > 0;
  const nS = model.nSpecies;
  const n = size;
  const x = new Float64Array(nS);
  /** d rate_j / d x_s for the current reaction. */
  const grad = new Float64Array(nS);
  return (t, y, J) => {
    const tq = clock ? clock.tq : timed ? clockProbeAt(model, t) : undefined;
    J.fill(0);
    for (let i = 0; i < nS; i++) x[i] = y[i] > 0 ? y[i] : 0;
    for (let j = 0; j < model.nReactions; j++) {
      const r = model.reactions[j];
      grad.fill(0);
      if (!rateGradient(model, p, sig, j, x, grad, tq)) numericGradient(model, p, sig, j, x, grad, tq);
      for (const s of r.readsSpecies) {
        const g = grad[s];
        if (g === 0) continue;
        for (const d of r.delta) J[d.species * n + s] += d.change * g;
        if (accumulateTotal) J[nS * n + s] += g;
      }
    }
  };
}

/**
 * With assignment rules a rate may read a rule target, which is a function of
 * other species: the whole Jacobian is taken by central differences of the
 * rate equations (which apply the rules), forward next to 0.
 */
function rulesJacobian(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  accumulateTotal: boolean,
  size: number,
  clock?: { tq: number },
): OdeJacobian {
  const rhs = meanFieldRhs(model, p, sig, accumulateTotal, clock);
  const m = accumulateTotal ? model.nSpecies + 1 : model.nSpecies;
  const yp = new Float64Array(m);
  const fp = new Float64Array(m);
  const fm = new Float64Array(m);
  return (t, y, J) => {
    J.fill(0);
    for (let s = 0; s < model.nSpecies; s++) {
      yp.set(y.subarray(0, m));
      const h = 1e-6 * Math.max(Math.abs(y[s]), 1);
      const central = y[s] - h >= 0;
      yp[s] = y[s] + h;
      rhs(t, yp, fp);
      yp[s] = central ? y[s] - h : y[s];
      rhs(t, yp, fm);
      const w = central ? 2 * h : h;
      for (let i = 0; i < m; i++) J[i * size + s] = (fp[i] - fm[i]) / w;
    }
  };
}

/** Compiled derivatives of an expression rate, one per species it reads (r.readsSpecies order). */
const derivativeFns = new WeakMap<ExprNode, TreeFn[]>();

/** The derivative functions of an expression reaction (built once per compiled tree). */
export function expressionDerivativeFns(model: CompiledModel, r: CompiledReaction): TreeFn[] {
  let fns = derivativeFns.get(r.expr!);
  if (!fns) {
    fns = r.readsSpecies.map((s) => treeFn(model, differentiate(r.expr!, model.speciesNames[s])));
    derivativeFns.set(r.expr!, fns);
  }
  return fns;
}

/** Fills grad with d rate_j / dx; false for a rate law without an analytic form here. */
function rateGradient(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  j: number,
  x: Float64Array,
  grad: Float64Array,
  tq?: number,
): boolean {
  const r = model.reactions[j];
  const scale = r.scaledBy >= 0 ? sig[r.scaledBy] : 1;
  if (r.expr !== null) {
    const fns = expressionDerivativeFns(model, r);
    const probe = tq ?? clockProbeAt(model, 0);
    for (let e = 0; e < fns.length; e++) {
      const g = fns[e](x, sig, p, probe) * scale;
      if (!Number.isFinite(g)) return false;
      grad[r.readsSpecies[e]] = g;
    }
    return true;
  }
  const k = p[r.rateSlot] * scale;
  if (r.kind === "constant") return true;
  if (r.kind === "massAction") {
    const m = r.reactants.length;
    for (let e = 0; e < m; e++) {
      const re = r.reactants[e];
      const v = x[re.species];
      let d = re.count === 1 ? 1 : v; // d/dx of x or x^2/2
      for (let o = 0; o < m; o++) {
        if (o === e) continue;
        const w = x[r.reactants[o].species];
        d *= r.reactants[o].count === 1 ? w : (w * w) / 2;
      }
      grad[re.species] += k * d;
    }
    return true;
  }
  if (r.kind === "regulated") {
    const leak = p[r.leakSlot];
    const m = r.regulators.length;
    const h = new Float64Array(m);
    const dh = new Float64Array(m);
    for (let g = 0; g < m; g++) {
      const reg = r.regulators[g];
      const nH = p[reg.nSlot];
      const kn = p[reg.knSlot];
      const v = reg.isSignal ? sig[reg.source] : x[reg.source];
      const xn = v > 0 ? Math.pow(v, nH) : 0;
      h[g] = reg.activates ? (xn === 0 ? 0 : xn / (kn + xn)) : kn / (kn + xn);
      if (reg.isSignal) continue;
      // n x^(n-1) K^n / (K^n + x^n)^2, taken just above 0 when n < 1 (infinite slope at 0)
      const at = v > 0 ? v : nH < 1 ? 1e-9 * Math.pow(kn, 1 / nH) : 0;
      const an = at > 0 ? Math.pow(at, nH) : 0;
      const slope = at > 0 ? (nH * (an / at) * kn) / ((kn + an) * (kn + an)) : nH === 1 ? 1 / kn : 0;
      dh[g] = reg.activates ? slope : -slope;
    }
    for (let g = 0; g < m; g++) {
      const reg = r.regulators[g];
      if (reg.isSignal || dh[g] === 0) continue;
      // dF/dh_g: product of the other terms (AND) or of the others' (1 - h) (OR)
      let others = 1;
      for (let o = 0; o < m; o++) if (o !== g) others *= r.logic === "and" ? h[o] : 1 - h[o];
      grad[reg.source] += k * (1 - leak) * others * dh[g];
    }
    return true;
  }
  return false;
}

function numericGradient(
  model: CompiledModel,
  p: Float64Array,
  sig: Float64Array,
  j: number,
  x: Float64Array,
  grad: Float64Array,
  tq: number | undefined,
): void {
  for (const s of model.reactions[j].readsSpecies) {
    const v = x[s];
    const step = 1e-6 * Math.max(Math.abs(v), 1);
    const lo = Math.max(0, v - step);
    x[s] = v + step;
    const up = reactionRate(model, p, x, sig, j, true, tq);
    x[s] = lo;
    const down = reactionRate(model, p, x, sig, j, true, tq);
    x[s] = v;
    grad[s] = (up - down) / (v + step - lo);
  }
}
