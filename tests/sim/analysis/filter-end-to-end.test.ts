/**
 * End to end: the C1-FFL AND template filters pulses of half its ON delay and
 * passes pulses of three times it, while its matched simple-regulation control
 * passes both; the pass-probability difference at the short duration is
 * significant at the replicate count used (Fisher's exact test, Holm-adjusted).
 *
 * ON delay T: the mean-field half-rise time of the circuit's output after a
 * step ON (the response delay at the default threshold, half the ON steady
 * state). "Filters" = the Wilson 95% upper bound of the pass probability is
 * below 0.2; "passes" = the lower bound is above 0.8 (our acceptance rule).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { templates, simulateChunk, resolveThreshold, solveOde, runSetup } from "@/sim";
import {
  halfRiseTime,
  makeMatchedControl,
  outputSteadyStates,
  summarizeRun,
  compareRuns,
  delaysOf,
  widthsOf,
  accelerationFigures,
} from "@/sim/analysis";
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import { AccelerationSchema } from "@/shared/schemas/analysis";
import { assertCloseTo } from "@/tests/helpers/close-to";

const REPLICATES = 12;
const REPEATS = 3;

function run(spec: RunSpec) {
  const r = simulateChunk(spec, 0, spec.replicates, { trajectoryReplicates: 0 });
  const summary = summarizeRun({
    pulses: r.pulses,
    replicates: r.replicates,
    threshold: resolveThreshold(spec),
    noiseDurationMinutes: 10,
  });
  return { pulses: r.pulses, summary };
}

describe("C1-FFL AND against its matched simple-regulation control", () => {
  const stepSpec = RunSpecSchema.parse({
    circuit: templates["c1ffl-and"].circuit,
    program: { kind: "pulses", pulses: [{ start: 0, duration: 100 }] },
    inputSignal: "Q",
    endTimeMinutes: 400,
    gridStepMinutes: 1,
    replicates: 1,
    seed: "filter-check",
  });
  const onDelay = halfRiseTime(stepSpec)!;
  const short = Math.round((onDelay / 2) * 10) / 10;
  const long = Math.round(3 * onDelay * 10) / 10;
  const spec = RunSpecSchema.parse({
    ...stepSpec,
    program: { kind: "ladder", start: 20, durations: [short, long], repeats: REPEATS, gap: 200 },
    endTimeMinutes: 20 + REPEATS * (short + long + 400),
    gridStepMinutes: 5,
    replicates: REPLICATES,
  });
  const control = makeMatchedControl(spec);

  test("the matched control has the circuit's ON steady state, lifetime, threshold, program and seed", () => {
    assertCloseTo(outputSteadyStates(control).onSteadyState, outputSteadyStates(spec).onSteadyState, { rel: 1e-6 });
    assert.deepEqual(control.program, spec.program);
    assert.equal(control.seed, spec.seed);
    assert.equal(control.replicates, spec.replicates);
    const a = resolveThreshold(spec);
    const b = resolveThreshold(control);
    assertCloseTo(b.theta, a.theta, { rel: 1e-12 });
    assert.equal(b.windowMinutes, a.windowMinutes);
    assert.equal(b.outputLifetimeMinutes, a.outputLifetimeMinutes);
    // simple regulation from zero: T1/2 = ln 2 / a (closed form of the linear ODE)
    assertCloseTo(halfRiseTime(control)!, Math.log(2) / 0.1, { rel: 1e-5 });
    // the ON delay is the mean-field crossing of half the ON steady state (ODE check on the run grid)
    const sol = solveOde(stepSpec);
    const out = runSetup(stepSpec).model.outputIndex * sol.times.length;
    const half = outputSteadyStates(stepSpec).onSteadyState / 2;
    const before = sol.values[out + Math.floor(onDelay)];
    const after = sol.values[out + Math.ceil(onDelay)];
    assert.ok(before < half && after >= half, `ODE output ${before} .. ${after} around ${half}`);
  });

  test(`filters ${short}-min pulses, passes ${long}-min pulses; the control passes both (${REPLICATES} replicates x ${REPEATS} pulses, fixed seed)`, () => {
    const circuit = run(spec);
    const ctl = run(control);
    const at = (s: typeof circuit.summary, d: number) => s.byDuration.find((e) => e.duration === d)!;
    assert.deepEqual(
      circuit.summary.byDuration.map((e) => e.duration),
      [short, long],
    );
    assert.equal(at(circuit.summary, short).pulses, REPLICATES * REPEATS);
    assert.ok(at(circuit.summary, short).ci![1] < 0.2, `circuit short: ${JSON.stringify(at(circuit.summary, short))}`);
    assert.ok(at(circuit.summary, long).ci![0] > 0.8, `circuit long: ${JSON.stringify(at(circuit.summary, long))}`);
    assert.ok(at(ctl.summary, short).ci![0] > 0.8, `control short: ${JSON.stringify(at(ctl.summary, short))}`);
    assert.ok(at(ctl.summary, long).ci![0] > 0.8, `control long: ${JSON.stringify(at(ctl.summary, long))}`);

    const cmp = compareRuns([
      {
        id: "ffl",
        name: "Tank sensor, hold",
        summary: circuit.summary,
        delays: delaysOf(circuit.pulses),
        widths: widthsOf(circuit.pulses),
      },
      { id: "ctl", name: "Control", summary: ctl.summary, delays: delaysOf(ctl.pulses), widths: widthsOf(ctl.pulses) },
    ]);
    const diffShort = cmp.pairs[0].passDifferences.find((d) => d.duration === short)!;
    assert.ok(diffShort.pHolm < 0.05 && !diffShort.withinNoise, `short-pulse difference p = ${diffShort.pHolm}`);
    assert.ok(diffShort.difference < -0.5);
    // the persistence detector pays for it in delay: later responses than the control
    assert.equal(cmp.pairs[0].delays.withinNoise, false);
    assert.ok(cmp.pairs[0].delays.mannWhitney!.rankBiserial > 0);

    const acc = AccelerationSchema.parse(
      accelerationFigures({
        circuitSpec: spec,
        circuitSummary: circuit.summary,
        controlSpec: control,
        controlSummary: ctl.summary,
      }),
    );
    assert.ok(acc.halfRiseRatio! < 1, "the C1-FFL AND responds more slowly than simple regulation");
    assert.ok(acc.longPulseDelayDifference! > 0);
  });
});
