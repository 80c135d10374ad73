/**
 * The mean-field integrator the engine uses: explicit Dormand-Prince 5(4)
 * (./dormand-prince.ts) while the problem is not stiff, switching for good to
 * the L-stable Rosenbrock method (./rosenbrock.ts, Shampine & Reichelt 1997)
 * with the analytic Jacobian once Dormand-Prince detects stiffness (Hairer &
 * Wanner's test, see DopriOptions.stopWhenStiff). Non-stiff circuits are
 * integrated exactly as before; a circuit with one reaction far faster than
 * the rest (say degradation at 1e4/min in a 1000-minute run) costs a few
 * hundred steps instead of millions. Every step of both methods counts against
 * one budget (./ode-budget.ts).
 *
 * Example:
 *   const ode = new AutoOdeIntegrator(n, meanFieldRhs(model, p, sig), meanFieldJacobian(model, p, sig), { relTol: 1e-10, absTol: 1e-10 });
 *   ode.integrate(y, 0, 100);
 */
import { DopriIntegrator, type OdeRhs } from "./dormand-prince";
import type { OdeJacobian } from "./mean-field-jacobian";
import { RosenbrockIntegrator } from "./rosenbrock";
import { odeBudget, type OdeBudget } from "./ode-budget";

export interface AutoOdeOptions {
  relTol: number;
  absTol: number;
  budget?: OdeBudget;
}

/** Tolerances below this gain little from a second-order method and cost many steps. */
const STIFF_TOLERANCE_FLOOR = 1e-8;

export class AutoOdeIntegrator {
  private readonly explicit: DopriIntegrator;
  private implicit: RosenbrockIntegrator | null = null;
  readonly budget: OdeBudget;

  constructor(
    readonly n: number,
    readonly f: OdeRhs,
    readonly jac: OdeJacobian,
    readonly options: AutoOdeOptions,
  ) {
    this.budget = odeBudget(options.budget);
    this.explicit = new DopriIntegrator(n, f, {
      relTol: options.relTol,
      absTol: options.absTol,
      maxSteps: Number.MAX_SAFE_INTEGER,
      budget: this.budget,
      stopWhenStiff: true,
    });
  }

  /** "explicit" until stiffness is detected, then "stiff". */
  get method(): "explicit" | "stiff" {
    return this.implicit ? "stiff" : "explicit";
  }

  get steps(): number {
    return this.explicit.steps + (this.implicit?.steps ?? 0);
  }

  /** Suggested next step (0 restarts step-size selection, e.g. after a switch of the input). */
  get h(): number {
    return this.implicit ? this.implicit.h : this.explicit.h;
  }
  set h(v: number) {
    if (this.implicit) this.implicit.h = v;
    else this.explicit.h = v;
  }

  /** Advances y (in place) from t0 to exactly t1. */
  integrate(y: Float64Array, t0: number, t1: number): void {
    let t = t0;
    if (!this.implicit) {
      t = this.explicit.integrate(y, t0, t1);
      if (t >= t1) return;
      this.implicit = new RosenbrockIntegrator(this.n, this.f, this.jac, {
        relTol: Math.max(this.options.relTol, STIFF_TOLERANCE_FLOOR),
        absTol: Math.max(this.options.absTol, STIFF_TOLERANCE_FLOOR),
        budget: this.budget,
      });
    }
    this.implicit.integrate(y, t, t1);
  }
}
