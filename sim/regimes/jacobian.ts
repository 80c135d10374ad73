/**
 * Jacobian of the mean-field rate equations at a state, by finite differences
 * (central where the state allows, forward next to zero because the rate
 * equations clamp counts at 0; step 1e-6 of the species' scale). Row-major
 * n x n: J[i*n + j] = d(dx_i/dt)/dx_j.
 *
 * Example: for dZ/dt = b - a Z, jacobian gives [-a].
 */
import type { OdeRhs } from "@/sim/ode/dormand-prince";

export function jacobian(rhs: OdeRhs, y: Float64Array, scale: number): Float64Array {
  const n = y.length;
  const J = new Float64Array(n * n);
  const yp = Float64Array.from(y);
  const f0 = new Float64Array(n);
  const fp = new Float64Array(n);
  const fm = new Float64Array(n);
  rhs(0, y, f0);
  for (let j = 0; j < n; j++) {
    const h = 1e-6 * Math.max(Math.abs(y[j]), scale, 1e-12);
    const central = y[j] - h >= 0;
    yp[j] = y[j] + h;
    rhs(0, yp, fp);
    if (central) {
      yp[j] = y[j] - h;
      rhs(0, yp, fm);
      for (let i = 0; i < n; i++) J[i * n + j] = (fp[i] - fm[i]) / (2 * h);
    } else {
      for (let i = 0; i < n; i++) J[i * n + j] = (fp[i] - f0[i]) / h;
    }
    yp[j] = y[j];
  }
  return J;
}
