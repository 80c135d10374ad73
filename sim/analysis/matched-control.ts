/**
 * The matched simple-regulation control of a run (docs/metrics.md,
 * "Acceleration and delay against a matched control").
 *
 * Simple regulation (the linear one-step model, whose step response has the
 * closed form Z(t) = Z_st (1 - e^{-a t})) with the input signal in the X
 * role: 0 -> Z at a rate set by the input, Z -> 0 at a*Z. The control keeps:
 * - the output's name, initial count and lifetime 1/a (a = the circuit's
 *   first-order removal rate of the output, or 1/user lifetime);
 * - the same ON steady state of the output as the circuit's mean-field model
 *   (from the run's start state under constant ON input), and the same OFF
 *   steady state (input off), by two constant-rate productions:
 *     driven:  0 -> Z at bOn * s(t)   (scaled by the input signal s)
 *     basal:   0 -> Z at bOff
 *   with bOn = a (Zon - Zoff)/(sOn - sOff) and bOff = a Zoff - bOn sOff;
 * - the same input program, signal, end time, grid, replicates, seed, system
 *   size, start, method and event cap (so replicate i of both runs uses the
 *   same seed stream), and the circuit's resolved threshold, window and
 *   lifetime in molecules and minutes, so pass and delay mean the same.
 * Cell-to-cell variation entries are dropped (their parameters do not exist
 * in the control). The driven production is linear in the signal level, so
 * programs whose pulses use different levels drive the control in proportion.
 *
 * Throws an Error with a plain reason when no such control exists (the ON
 * steady state is not above the OFF one, or the mean-field model does not settle).
 *
 * @example makeMatchedControl(holdSensorSpec).circuit.reactions.map((r) => r.name) // ["driveZ", "basalZ", "decayZ"]
 */
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { runSetup } from "@/sim/engine/run-setup";
import { resolveThreshold } from "@/sim/engine/resolve-threshold";
import { odeStartState, odeSteadyState } from "@/sim/ode/solve-ode";

export interface MatchedControlLevels {
  /** Output ON / OFF steady states of the circuit's mean-field model, molecules. */
  onSteadyState: number;
  offSteadyState: number;
  /** Output removal rate a, per minute. */
  removalRatePerMinute: number;
}

/** ON and OFF mean-field steady states of the run's output and its removal rate. */
export function outputSteadyStates(spec: RunSpec): MatchedControlLevels {
  const setup = runSetup(spec);
  const { model } = setup;
  const th = resolveThreshold(spec);
  const y0 = odeStartState(setup.spec).y;
  const on = Float64Array.from(model.signalOff);
  on[setup.inputSignal] = setup.onLevel;
  const off = Float64Array.from(model.signalOff);
  const onSteadyState = Number.isFinite(th.onSteadyState)
    ? th.onSteadyState
    : odeSteadyState(model, model.baseParams, y0, on)[model.outputIndex];
  const offSteadyState = odeSteadyState(model, model.baseParams, y0, off)[model.outputIndex];
  return { onSteadyState, offSteadyState, removalRatePerMinute: 1 / th.outputLifetimeMinutes };
}

export function makeMatchedControl(specInput: RunSpec): RunSpec {
  const setup = runSetup(specInput);
  const spec = setup.spec;
  const th = resolveThreshold(spec);
  const { onSteadyState, offSteadyState, removalRatePerMinute: a } = outputSteadyStates(spec);
  const omega = spec.systemSize;
  const signal = spec.circuit.signals.find((s) => s.name === spec.inputSignal)!;
  const sOn = setup.onLevel;
  const sOff = signal.offLevel;
  if (!(sOn > sOff)) throw new Error(`the input signal's ON level (${sOn}) is not above its OFF level (${sOff})`);
  if (!(onSteadyState > offSteadyState)) {
    throw new Error(
      `the output's ON steady state (${onSteadyState.toPrecision(4)}) is not above its OFF steady state (${offSteadyState.toPrecision(4)}), so no simple regulation driven by the input matches it`,
    );
  }
  // circuit amounts are per concentration unit: the compiled model multiplies zero-order rates by Omega
  const zOn = onSteadyState / omega;
  const zOff = Math.max(0, offSteadyState / omega);
  const bOn = (a * (zOn - zOff)) / (sOn - sOff);
  const bOff = Math.max(0, a * zOff - bOn * sOff);
  const out = spec.circuit.species.find((s) => s.name === spec.circuit.outputSpecies)!;
  const z = out.name;
  const reactions: Circuit["reactions"] = [
    {
      name: "driveZ",
      reactants: [],
      products: [{ species: z, count: 1 }],
      modifiers: [],
      rate: { kind: "constant", ratePerMinute: bOn },
      scaledBy: spec.inputSignal,
      description: "production driven by the input (simple regulation)",
    },
    {
      name: "decayZ",
      reactants: [{ species: z, count: 1 }],
      products: [],
      modifiers: [],
      rate: { kind: "massAction", ratePerMinute: a },
      description: "first-order removal (same lifetime as the circuit's output)",
    },
  ];
  if (bOff > 0) {
    reactions.splice(1, 0, {
      name: "basalZ",
      reactants: [],
      products: [{ species: z, count: 1 }],
      modifiers: [],
      rate: { kind: "constant", ratePerMinute: bOff },
      description: "basal production (same OFF steady state as the circuit)",
    });
  }
  const baseName = `Simple-regulation control of ${spec.circuit.name}`;
  const circuit = CircuitSchema.parse({
    name: baseName.length > 120 ? baseName.slice(0, 119) + "…" : baseName,
    description:
      `Simple regulation matched to "${spec.circuit.name}": same output ON steady state ` +
      `(${onSteadyState.toPrecision(4)} molecules), OFF steady state (${offSteadyState.toPrecision(4)}) and lifetime ` +
      `(${(1 / a).toPrecision(4)} min).`,
    species: [{ ...out }],
    signals: [{ ...signal }],
    reactions,
    outputSpecies: z,
  });
  return RunSpecSchema.parse({
    ...spec,
    circuit,
    extrinsic: [],
    threshold: {
      ...spec.threshold,
      value: th.theta,
      windowMinutes: th.windowMinutes,
      outputLifetimeMinutes: th.outputLifetimeMinutes,
    },
  });
}
