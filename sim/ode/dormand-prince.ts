/**
 * Dormand-Prince 5(4) embedded Runge-Kutta pair with local error control
 * (Dormand & Prince 1980, J Comput Appl Math 6:19; step-size control as in
 * Hairer, Norsett & Wanner, Solving ODEs I, section II.4). Integrates
 * dy/dt = f(t, y) from t0 to exactly t1 (the last step is shortened to land on
 * t1), so callers stop exactly at switch and grid times.
 *
 * Example: integrate((t, y, dy) => { dy[0] = -y[0]; }, y, 0, 1, state)
 * leaves y[0] ~ e^-1 * y0.
 */
import type { OdeBudget } from "./ode-budget";

export type OdeRhs = (t: number, y: Float64Array, dy: Float64Array) => void;

export interface DopriOptions {
  relTol: number;
  absTol: number;
  /** Steps per integrate call. */
  maxSteps: number;
  /** A budget shared by the whole computation (steps, wall time), see ./ode-budget.ts. */
  budget?: OdeBudget;
  /**
   * Stop early when the problem looks stiff: integrate then returns the time
   * reached, and `stiff` is true (the caller continues with a stiff method).
   * Detection as in Hairer & Wanner's DOPRI5 code (Solving ODEs II, section
   * IV.2): h * |lambda| estimated from the last two stages exceeds 3.25 (the
   * edge of the stability region) on 15 accepted steps without 6 in a row below it.
   */
  stopWhenStiff?: boolean;
}

const C2 = 1 / 5,
  C3 = 3 / 10,
  C4 = 4 / 5,
  C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40,
  A32 = 9 / 40;
const A41 = 44 / 45,
  A42 = -56 / 15,
  A43 = 32 / 9;
const A51 = 19372 / 6561,
  A52 = -25360 / 2187,
  A53 = 64448 / 6561,
  A54 = -212 / 729;
const A61 = 9017 / 3168,
  A62 = -355 / 33,
  A63 = 46732 / 5247,
  A64 = 49 / 176,
  A65 = -5103 / 18656;
const A71 = 35 / 384,
  A73 = 500 / 1113,
  A74 = 125 / 192,
  A75 = -2187 / 6784,
  A76 = 11 / 84;
const E1 = 71 / 57600,
  E3 = -71 / 16695,
  E4 = 71 / 1920,
  E5 = -17253 / 339200,
  E6 = 22 / 525,
  E7 = -1 / 40;

/** Reusable work space and the step size carried between calls. */
export class DopriIntegrator {
  private k1: Float64Array;
  private k2: Float64Array;
  private k3: Float64Array;
  private k4: Float64Array;
  private k5: Float64Array;
  private k6: Float64Array;
  private k7: Float64Array;
  private yt: Float64Array;
  private yn: Float64Array;
  /** Suggested next step size (0 = choose automatically). */
  h = 0;
  steps = 0;
  /** Set once stiffness was detected (with stopWhenStiff). */
  stiff = false;
  private stiffCount = 0;
  private nonStiffCount = 0;

  constructor(
    readonly n: number,
    readonly f: OdeRhs,
    readonly options: DopriOptions = { relTol: 1e-9, absTol: 1e-9, maxSteps: 1_000_000 },
  ) {
    this.k1 = new Float64Array(n);
    this.k2 = new Float64Array(n);
    this.k3 = new Float64Array(n);
    this.k4 = new Float64Array(n);
    this.k5 = new Float64Array(n);
    this.k6 = new Float64Array(n);
    this.k7 = new Float64Array(n);
    this.yt = new Float64Array(n);
    this.yn = new Float64Array(n);
  }

  /**
   * Advances y (in place) from t0 to exactly t1 and returns t1; with
   * stopWhenStiff it may stop earlier, returning the time reached.
   */
  integrate(y: Float64Array, t0: number, t1: number): number {
    if (!(t1 > t0)) return t1;
    const { n, f, k1, k2, k3, k4, k5, k6, k7, yt, yn } = this;
    const { relTol, absTol, maxSteps, budget, stopWhenStiff } = this.options;
    let t = t0;
    f(t, y, k1);
    let h = this.h;
    if (!(h > 0)) {
      let d0 = 0;
      let d1 = 0;
      for (let i = 0; i < n; i++) {
        const sc = absTol + relTol * Math.abs(y[i]);
        d0 += (y[i] / sc) ** 2;
        d1 += (k1[i] / sc) ** 2;
      }
      d0 = Math.sqrt(d0 / n);
      d1 = Math.sqrt(d1 / n);
      h = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * (d0 / d1);
      h = Math.min(h, t1 - t0);
    }
    let localSteps = 0;
    for (;;) {
      const last = t + h >= t1 - 1e-12 * Math.max(1, Math.abs(t1));
      if (last) h = t1 - t;
      for (let i = 0; i < n; i++) yt[i] = y[i] + h * A21 * k1[i];
      f(t + C2 * h, yt, k2);
      for (let i = 0; i < n; i++) yt[i] = y[i] + h * (A31 * k1[i] + A32 * k2[i]);
      f(t + C3 * h, yt, k3);
      for (let i = 0; i < n; i++) yt[i] = y[i] + h * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      f(t + C4 * h, yt, k4);
      for (let i = 0; i < n; i++) yt[i] = y[i] + h * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      f(t + C5 * h, yt, k5);
      for (let i = 0; i < n; i++)
        yt[i] = y[i] + h * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      f(t + h, yt, k6);
      for (let i = 0; i < n; i++)
        yn[i] = y[i] + h * (A71 * k1[i] + A73 * k3[i] + A74 * k4[i] + A75 * k5[i] + A76 * k6[i]);
      f(t + h, yn, k7);
      let err = 0;
      for (let i = 0; i < n; i++) {
        const e = h * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        const sc = absTol + relTol * Math.max(Math.abs(y[i]), Math.abs(yn[i]));
        err += (e / sc) ** 2;
      }
      err = Math.sqrt(err / n);
      this.steps++;
      if (budget) budget.step(t, y);
      if (++localSteps > maxSteps)
        throw new Error(`ODE solver: more than ${maxSteps} steps between t=${t0} and t=${t1}`);
      if (!Number.isFinite(err)) {
        // an overflowing state or rate: no step size helps once the derivative itself is not finite
        let finite = true;
        for (let i = 0; i < n; i++) if (!Number.isFinite(k1[i]) || !Number.isFinite(y[i])) finite = false;
        if (!finite || !(h > 1e-300)) {
          if (budget) throw budget.nonFinite(t, y);
          throw new Error(`ODE solver: the state or its derivative is not finite at t=${t}`);
        }
        h *= 0.2;
        continue;
      }
      if (err <= 1 || h < 1e-12) {
        let hLambda = 0;
        if (stopWhenStiff) {
          let num = 0;
          let den = 0;
          for (let i = 0; i < n; i++) {
            num += (k7[i] - k6[i]) ** 2;
            den += (yn[i] - yt[i]) ** 2;
          }
          hLambda = den > 0 ? h * Math.sqrt(num / den) : 0;
        }
        y.set(yn);
        k1.set(k7);
        t = last ? t1 : t + h;
        const fac = err === 0 ? 5 : Math.min(5, Math.max(0.2, 0.9 * Math.pow(err, -0.2)));
        if (stopWhenStiff) {
          if (hLambda > 3.25) {
            this.nonStiffCount = 0;
            if (++this.stiffCount >= 15) {
              this.stiff = true;
              this.h = h * fac;
              return t;
            }
          } else if (this.stiffCount > 0 && ++this.nonStiffCount >= 6) {
            this.stiffCount = 0;
            this.nonStiffCount = 0;
          }
        }
        if (last) {
          // keep the unshortened step size suggested earlier for the next call
          if (!(this.h > 0)) this.h = h * fac;
          return t1;
        }
        h *= fac;
        this.h = h;
      } else {
        h *= Math.max(0.2, 0.9 * Math.pow(err, -0.2));
      }
    }
  }
}
