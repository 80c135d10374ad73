/**
 * Newton's method with backtracking for a steady state f(y) = 0 of the
 * mean-field rate equations, kept in the non-negative orthant (Dennis &
 * Schnabel, Numerical Methods for Unconstrained Optimization, section 6.3).
 * Converged when the largest |f_i| is at most 1e-9 of the state's rate scale
 * (the largest |y| times the fastest turnover, at least 1e-12). Returns null
 * when it does not converge in 60 iterations.
 *
 * Example: for dZ/dt = 20 - 0.1 Z from Z = 150, newtonPolish returns [200].
 */
import type { OdeRhs } from "@/sim/ode/dormand-prince";
import { jacobian } from "./jacobian";
import { linearSolve } from "./linear-solve";

function maxAbs(v: Float64Array): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i]));
  return m;
}

export function newtonPolish(
  rhs: OdeRhs,
  y0: Float64Array,
  scale: number,
  ratePerMinute: number,
): { y: Float64Array; residual: number } | null {
  const n = y0.length;
  let y = Float64Array.from(y0);
  const f = new Float64Array(n);
  const ft = new Float64Array(n);
  rhs(0, y, f);
  let r = maxAbs(f);
  const tol = () => 1e-9 * Math.max(maxAbs(y), scale * 1e-6, 1e-12) * ratePerMinute;
  for (let it = 0; it < 60; it++) {
    if (r <= tol()) return { y, residual: r };
    const J = jacobian(rhs, y, scale);
    const neg = Float64Array.from(f, (v) => -v);
    const dy = linearSolve(J, neg, n);
    if (!dy) return null;
    let lambda = 1;
    let accepted = false;
    for (let k = 0; k < 30; k++) {
      const yt = Float64Array.from(y, (v, i) => Math.max(0, v + lambda * dy[i]));
      rhs(0, yt, ft);
      const rt = maxAbs(ft);
      if (rt < r || rt <= tol()) {
        y = yt;
        f.set(ft);
        r = rt;
        accepted = true;
        break;
      }
      lambda /= 2;
    }
    if (!accepted) return r <= tol() ? { y, residual: r } : null;
  }
  return r <= tol() ? { y, residual: r } : null;
}
