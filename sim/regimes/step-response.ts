/**
 * Response of the output to a sustained input: from a state, integrate with
 * the signals at their on levels for `minutes`, sampled at `sampleMinutes`;
 * reports the start, peak and final output levels and the time of the peak.
 */
import type { OdeRhs } from "@/sim/ode/dormand-prince";
import { integrator } from "./steady-states";

export interface StepResponse {
  startLevel: number;
  peakLevel: number;
  peakMinutes: number;
  finalLevel: number;
}

export function stepResponse(
  rhs: OdeRhs,
  y0: Float64Array,
  output: number,
  minutes: number,
  sampleMinutes: number,
): StepResponse {
  const y = Float64Array.from(y0);
  const ode = integrator(y.length, rhs);
  const steps = Math.max(20, Math.ceil(minutes / sampleMinutes));
  const dt = minutes / steps;
  let peakLevel = y[output],
    peakMinutes = 0;
  for (let k = 1; k <= steps; k++) {
    ode.integrate(y, (k - 1) * dt, k * dt);
    if (y[output] > peakLevel) [peakLevel, peakMinutes] = [y[output], k * dt];
  }
  return { startLevel: y0[output], peakLevel, peakMinutes, finalLevel: y[output] };
}
