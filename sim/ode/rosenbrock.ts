/**
 * Stiff integrator: the L-stable Rosenbrock (modified Rosenbrock, W-) method
 * of order 2 with an order-3 error estimate of Shampine & Reichelt, "The
 * MATLAB ODE Suite", SIAM J Sci Comput 18(1):1-22 (1997), section 3 (the
 * method behind ode23s). For an autonomous system dy/dt = f(y) with Jacobian J,
 * per step of size h, with d = 1/(2 + sqrt 2) and e32 = 6 + sqrt 2:
 *
 *   W  = I - h d J
 *   k1 = W \ f(y)
 *   k2 = W \ (f(y + h k1 / 2) - k1) + k1
 *   y+ = y + h k2
 *   k3 = W \ (f(y+) - e32 (k2 - f(y + h k1/2)) - 2 (k1 - f(y)))
 *   error estimate = h/6 (k1 - 2 k2 + k3)
 *
 * One Jacobian and one LU factorisation per step, three right-hand sides; the
 * step is not limited by the fastest decay rate (L-stable), so a circuit
 * with a reaction at 1e4/min costs steps set by its slow parts. The right-hand
 * sides here do not depend on t between switch times (the callers stop at
 * every switch), so the df/dt terms of the method are zero.
 *
 * Example: new RosenbrockIntegrator(1, (t, y, dy) => { dy[0] = -1e4 * y[0]; },
 *   (t, y, J) => { J[0] = -1e4; }).integrate(y, 0, 1) leaves y[0] ~ 0.
 */
import type { OdeRhs } from "./dormand-prince";
import type { OdeJacobian } from "./mean-field-jacobian";
import { luFactor, luSolve } from "./lu";
import { odeBudget, type OdeBudget } from "./ode-budget";

export interface RosenbrockOptions {
  relTol: number;
  absTol: number;
  budget?: OdeBudget;
}

const D = 1 / (2 + Math.SQRT2);
const E32 = 6 + Math.SQRT2;

export class RosenbrockIntegrator {
  private readonly J: Float64Array;
  private readonly W: Float64Array;
  private readonly piv: Int32Array;
  private readonly f0: Float64Array;
  private readonly f1: Float64Array;
  private readonly f2: Float64Array;
  private readonly k1: Float64Array;
  private readonly k2: Float64Array;
  private readonly k3: Float64Array;
  private readonly yt: Float64Array;
  private readonly yn: Float64Array;
  private readonly budget: OdeBudget;
  /** Suggested next step size (0 = choose automatically). */
  h = 0;
  steps = 0;

  constructor(
    readonly n: number,
    readonly f: OdeRhs,
    readonly jac: OdeJacobian,
    readonly options: RosenbrockOptions = { relTol: 1e-8, absTol: 1e-8 },
  ) {
    this.J = new Float64Array(n * n);
    this.W = new Float64Array(n * n);
    this.piv = new Int32Array(n);
    this.f0 = new Float64Array(n);
    this.f1 = new Float64Array(n);
    this.f2 = new Float64Array(n);
    this.k1 = new Float64Array(n);
    this.k2 = new Float64Array(n);
    this.k3 = new Float64Array(n);
    this.yt = new Float64Array(n);
    this.yn = new Float64Array(n);
    this.budget = odeBudget(options.budget);
  }

  /** Advances y (in place) from t0 to exactly t1. */
  integrate(y: Float64Array, t0: number, t1: number): void {
    if (!(t1 > t0)) return;
    const { n, f, jac, J, W, piv, f0, f1, f2, k1, k2, k3, yt, yn, budget } = this;
    const { relTol, absTol } = this.options;
    let t = t0;
    f(t, y, f0);
    let h = this.h;
    if (!(h > 0)) {
      // initial step from the size of y and of its derivative (Hairer, Norsett & Wanner I, II.4)
      let d0 = 0;
      let d1 = 0;
      for (let i = 0; i < n; i++) {
        const sc = absTol + relTol * Math.abs(y[i]);
        d0 += (y[i] / sc) ** 2;
        d1 += (f0[i] / sc) ** 2;
      }
      d0 = Math.sqrt(d0 / n);
      d1 = Math.sqrt(d1 / n);
      h = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * (d0 / d1);
      h = Math.min(h, t1 - t0);
    }
    let jacobianAt = NaN;
    for (;;) {
      const last = t + h >= t1 - 1e-12 * Math.max(1, Math.abs(t1));
      if (last) h = t1 - t;
      budget.step(t, y);
      this.steps++;
      if (jacobianAt !== t) {
        jac(t, y, J);
        jacobianAt = t;
      }
      for (let i = 0; i < n * n; i++) W[i] = -h * D * J[i];
      for (let i = 0; i < n; i++) W[i * n + i] += 1;
      if (!luFactor(W, n, piv)) {
        if (!allFinite(J)) throw budget.nonFinite(t, y);
        h *= 0.25; // singular W (h d equal to 1 / an eigenvalue): change the step
        continue;
      }
      k1.set(f0);
      luSolve(W, n, piv, k1);
      for (let i = 0; i < n; i++) yt[i] = y[i] + 0.5 * h * k1[i];
      f(t + 0.5 * h, yt, f1);
      for (let i = 0; i < n; i++) k2[i] = f1[i] - k1[i];
      luSolve(W, n, piv, k2);
      for (let i = 0; i < n; i++) {
        k2[i] += k1[i];
        yn[i] = y[i] + h * k2[i];
      }
      f(t + h, yn, f2);
      for (let i = 0; i < n; i++) k3[i] = f2[i] - E32 * (k2[i] - f1[i]) - 2 * (k1[i] - f0[i]);
      luSolve(W, n, piv, k3);
      let err = 0;
      for (let i = 0; i < n; i++) {
        const e = (h / 6) * (k1[i] - 2 * k2[i] + k3[i]);
        const sc = absTol + relTol * Math.max(Math.abs(y[i]), Math.abs(yn[i]));
        err += (e / sc) ** 2;
      }
      err = Math.sqrt(err / n);
      if (!Number.isFinite(err)) {
        if (!allFinite(y) || !allFinite(f0) || !allFinite(J) || !(h > 1e-300)) throw budget.nonFinite(t, y);
        h *= 0.25;
        continue;
      }
      if (err <= 1 || h < 1e-12) {
        y.set(yn);
        f0.set(f2);
        t = last ? t1 : t + h;
        const fac = err === 0 ? 5 : Math.min(5, Math.max(0.2, 0.8 * Math.pow(err, -1 / 3)));
        if (last) {
          if (!(this.h > 0)) this.h = h * fac;
          return;
        }
        h *= fac;
        this.h = h;
      } else {
        h *= Math.max(0.2, 0.8 * Math.pow(err, -1 / 3));
      }
    }
  }
}

function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return false;
  return true;
}
