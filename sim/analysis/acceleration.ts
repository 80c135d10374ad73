/**
 * Acceleration and delay of a circuit against its matched simple-regulation
 * control (Linger's own definitions, docs/metrics.md; response acceleration by
 * the incoherent feed-forward circuit: Mangan & Alon 2003, PNAS 100:11980).
 *
 * halfRiseTime: T1/2 of the mean-field step response: the input is switched
 * ON at t = 0 from the run's start state and held; T1/2 is the first time the
 * output reaches halfway from its start value to its ON steady state, by
 * linear interpolation on a fine grid (40 output lifetimes, 16000 steps; the
 * interpolation error is far below the grid step). For simple regulation from
 * zero this is ln 2 / a (closed form of the linear ODE).
 *
 * accelerationFigures: T1/2 ratio (control / circuit; above 1 = the circuit
 * is faster) and the stochastic delays of both runs: overall Kaplan-Meier
 * median delay and the delay cost for long pulses, with their differences
 * (circuit minus control; positive = the circuit is slower).
 *
 * @example accelerationFigures({ circuitSpec, circuitSummary, controlSpec, controlSummary }).halfRiseRatio
 */
import type { Acceleration, RunSummary } from "@/shared/schemas/analysis";
import { RUN_LIMITS, RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { resolveThreshold } from "@/sim/engine/resolve-threshold";
import { solveOde } from "@/sim/ode/solve-ode";
import { runSetup } from "@/sim/engine/run-setup";
import { outputSteadyStates } from "./matched-control";

export function halfRiseTime(specInput: RunSpec): number | null {
  const spec = runSetup(specInput).spec;
  const lifetime = resolveThreshold(spec).outputLifetimeMinutes;
  const horizon = Math.min(RUN_LIMITS.maxEndTimeMinutes, 40 * lifetime);
  const stepped = RunSpecSchema.parse({
    ...spec,
    program: { kind: "pulses", pulses: [{ start: 0, duration: horizon }] },
    endTimeMinutes: horizon,
    gridStepMinutes: horizon / 16000,
    extrinsic: [],
  });
  const { onSteadyState } = outputSteadyStates(stepped);
  const setup = runSetup(stepped);
  const sol = solveOde(stepped);
  const n = sol.times.length;
  const off = setup.model.outputIndex * n;
  const z0 = sol.values[off];
  if (!(onSteadyState > z0)) return null;
  const target = z0 + (onSteadyState - z0) / 2;
  for (let i = 1; i < n; i++) {
    const a = sol.values[off + i - 1];
    const b = sol.values[off + i];
    if (b >= target) {
      const t0 = sol.times[i - 1];
      const t1 = sol.times[i];
      return b === a ? t1 : t0 + ((target - a) / (b - a)) * (t1 - t0);
    }
  }
  return null;
}

const diff = (a: number | null, b: number | null) => (a !== null && b !== null ? a - b : null);
const sameDurations = (a: RunSummary, b: RunSummary) => {
  const x = a.delayCoverage?.durations ?? [];
  const y = b.delayCoverage?.durations ?? [];
  return x.length === y.length && x.every((d, i) => d === y[i]);
};

export function accelerationFigures(input: {
  circuitSpec: RunSpec;
  circuitSummary: RunSummary;
  controlSpec: RunSpec;
  controlSummary: RunSummary;
}): Acceleration {
  const hc = halfRiseTime(input.circuitSpec);
  const hk = halfRiseTime(input.controlSpec);
  const dc = input.circuitSummary.delay.median;
  const dk = input.controlSummary.delay.median;
  const lc = input.circuitSummary.delayCost?.medianDelay ?? null;
  const lk = input.controlSummary.delayCost?.medianDelay ?? null;
  return {
    halfRiseCircuitMinutes: hc,
    halfRiseControlMinutes: hk,
    halfRiseRatio: hc !== null && hk !== null && hc > 0 ? hk / hc : null,
    medianDelayCircuit: dc,
    medianDelayControl: dk,
    // Pooled delays compare only when both runs pooled the same durations (delayCoverage): else null.
    medianDelayDifference: sameDurations(input.circuitSummary, input.controlSummary) ? diff(dc, dk) : null,
    longPulseDelayCircuit: lc,
    longPulseDelayControl: lk,
    longPulseDelayDifference: diff(lc, lk),
  };
}
