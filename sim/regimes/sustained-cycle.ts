/**
 * Limit-cycle check by integration: from a state, integrate `windowMinutes`
 * sampled at `sampleMinutes` and measure, for the species with the largest
 * relative swing, the swing (max - min) / max(mean, 1e-9 scale) in each half
 * of the window, their ratio (late / early: 1 for a cycle, < 1 for a decaying
 * transient), and the period as the mean spacing of local maxima.
 */
import type { OdeRhs } from "@/sim/ode/dormand-prince";
import { integrator } from "./steady-states";

export interface CycleMeasure {
  relativeSwing: number;
  swingRatio: number;
  periodMinutes: number | null;
  species: number;
  /** Largest level of each species over the window. */
  maxima: Float64Array;
}

export function measureCycle(
  rhs: OdeRhs,
  y0: Float64Array,
  windowMinutes: number,
  sampleMinutes: number,
  scale: number,
): CycleMeasure {
  const n = y0.length;
  const steps = Math.max(20, Math.ceil(windowMinutes / sampleMinutes));
  const dt = windowMinutes / steps;
  const y = Float64Array.from(y0);
  const ode = integrator(n, rhs);
  const samples = new Float64Array(n * (steps + 1));
  for (let i = 0; i < n; i++) samples[i * (steps + 1)] = y[i];
  for (let k = 1; k <= steps; k++) {
    ode.integrate(y, (k - 1) * dt, k * dt);
    for (let i = 0; i < n; i++) samples[i * (steps + 1) + k] = y[i];
  }
  const half = Math.floor(steps / 2);
  const swing = (i: number, a: number, b: number) => {
    let lo = Infinity,
      hi = -Infinity,
      sum = 0;
    for (let k = a; k <= b; k++) {
      const v = samples[i * (steps + 1) + k];
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
      sum += v;
    }
    return (hi - lo) / Math.max(sum / (b - a + 1), 1e-9 * scale);
  };
  let best = 0,
    bestSwing = -1;
  const maxima = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const s = swing(i, 0, steps);
    if (s > bestSwing) [best, bestSwing] = [i, s];
    let m = 0;
    for (let k = 0; k <= steps; k++) m = Math.max(m, samples[i * (steps + 1) + k]);
    maxima[i] = m;
  }
  const early = swing(best, 0, half);
  const late = swing(best, half, steps);
  const peaks: number[] = [];
  const row = best * (steps + 1);
  for (let k = 1; k < steps; k++) {
    const v = samples[row + k];
    if (v > samples[row + k - 1] && v >= samples[row + k + 1]) peaks.push(k * dt);
  }
  const periodMinutes = peaks.length >= 3 ? (peaks[peaks.length - 1] - peaks[0]) / (peaks.length - 1) : null;
  return {
    relativeSwing: late,
    swingRatio: early > 0 ? late / early : 0,
    periodMinutes,
    species: best,
    maxima,
  };
}
