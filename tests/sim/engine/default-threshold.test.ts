/**
 * The default threshold (docs/metrics.md, "Threshold"): half-way between the
 * output's mean-field OFF steady state and the highest mean-field output under
 * constant ON input from OFF within the end time, and its warnings.
 *
 * The pulse generator is the incoherent type-1 feed-forward template: under ON
 * input its output peaks and falls back to a low steady state, so the old rule
 * (half the ON steady state) put the threshold within the OFF state's Poisson
 * noise and short noise pulses "passed". The expected levels are recomputed
 * here independently: the OFF steady state by integrating to rest, the peak
 * from the mean-field solution of a run whose single input pulse covers the
 * whole end time (sim/ode/solve-ode.ts on a 0.1-min grid).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { resolveThreshold, simulateChunk, solveOde, templates, runSetup } from "@/sim";
import { MIN_THRESHOLD_MOLECULES, thresholdWarnings } from "@/sim/engine/resolve-threshold";
import { odeStartState, odeSteadyState } from "@/sim/ode/solve-ode";
import { summarizeRun } from "@/sim/analysis";
import { assertCloseTo } from "@/tests/helpers/close-to";
import { feedbackTemplates, type FeedbackTemplateKey } from "@/sim/circuit/templates";

const pulseGenerator = (extra: Record<string, unknown> = {}) =>
  RunSpecSchema.parse({
    circuit: templates.i1ffl.circuit,
    inputSignal: templates.i1ffl.inputSignal,
    program: { kind: "pulses", pulses: Array.from({ length: 8 }, (_, i) => ({ start: 100 + 150 * i, duration: 1 })) },
    endTimeMinutes: 1300,
    gridStepMinutes: 5,
    replicates: 40,
    seed: "pulse-generator-threshold",
    start: "offSteadyState",
    ...extra,
  });

function independentLevels(spec: ReturnType<typeof pulseGenerator>) {
  const setup = runSetup(spec);
  const m = setup.model;
  const off = odeSteadyState(m, m.baseParams, odeStartState(setup.spec).y, Float64Array.from(m.signalOff))[
    m.outputIndex
  ];
  // ON for the whole end time, from the OFF steady state (start = offSteadyState burns in with the input off)
  const step = RunSpecSchema.parse({
    ...spec,
    program: { kind: "pulses", pulses: [{ start: 0, duration: spec.endTimeMinutes + 1 }] },
    gridStepMinutes: 0.1,
  });
  const ode = solveOde(step);
  const ng = ode.times.length;
  let peak = -Infinity;
  let atEnd = 0;
  for (let g = 0; g < ng; g++) peak = Math.max(peak, ode.values[m.outputIndex * ng + g]);
  atEnd = ode.values[m.outputIndex * ng + ng - 1];
  return { off, peak, atEnd };
}

describe("default threshold", () => {
  test("pulse generator: half-way between OFF and the peak of the ON response, well above OFF-state noise", () => {
    const spec = pulseGenerator();
    const t = resolveThreshold(spec);
    const { off, peak, atEnd } = independentLevels(spec);
    assert.ok(peak > 2 * atEnd, `the response peaks (${peak}) and falls back (${atEnd}): a pulse generator`);
    assertCloseTo(t.offSteadyState, off, { rel: 1e-6 });
    assertCloseTo(t.onMaximum, peak, { rel: 1e-4 }, "peak from 2000 samples refined by a parabola vs a 0.1-min grid");
    assertCloseTo(t.theta, off + (peak - off) / 2, { rel: 1e-4 });
    assert.equal(t.thresholdSource, "default");
    assert.match(t.rule, /a peak of [\d.]+ molecules at [\d.]+ min/);
    assert.deepEqual(t.warnings, []);

    // The old rule, half the ON steady state, sits within 3 Poisson SDs of the OFF level: warned as noise.
    const oldTheta = atEnd / 2;
    const warned = thresholdWarnings(oldTheta, { offSteadyState: off, onMaximum: peak, onMaximumAtMinutes: 1 }, true);
    assert.ok(
      warned.some((w) => /OFF-state noise alone crosses it/.test(w)),
      warned.join(" | "),
    );
  });

  test("pulse generator, SSA: 1-min spikes rarely pass the new default but mostly passed the old one (fixed seed)", () => {
    const spec = pulseGenerator();
    const t = resolveThreshold(spec);
    const { atEnd } = independentLevels(spec);
    const passOf = (s: ReturnType<typeof pulseGenerator>) => {
      const r = simulateChunk(s, 0, s.replicates);
      const th = resolveThreshold(s);
      const sum = summarizeRun({
        pulses: r.pulses,
        replicates: [],
        threshold: th,
        noiseDurationMinutes: 10,
        endTimeMinutes: s.endTimeMinutes,
      });
      return sum.counts.passed / sum.counts.evaluable;
    };
    const newPass = passOf(spec);
    const oldPass = passOf(pulseGenerator({ threshold: { value: atEnd / 2 } }));
    // 320 pulses each: a pass fraction's SE is at most sqrt(0.25/320) = 0.028, so the gap below is > 10 SE.
    assert.ok(newPass < 0.2, `new default: ${newPass} of 1-min spikes pass (threshold ${t.theta})`);
    assert.ok(oldPass > newPass + 0.3, `old default: ${oldPass} pass, new ${newPass}`);
  });

  test("filters keep half their ON level: simple regulation from OFF (closed form Z_on = 160)", () => {
    const spec = RunSpecSchema.parse({
      circuit: templates.simple.circuit,
      inputSignal: templates.simple.inputSignal,
      program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
      endTimeMinutes: 600,
      gridStepMinutes: 1,
      replicates: 10,
      seed: "tpl",
    });
    const t = resolveThreshold(spec);
    // ON steady state: X = 100, f = 100^2/(50^2+100^2) = 0.8, Z = 20 * 0.8 / 0.1 = 160 (closed form); OFF = 0
    assertCloseTo(t.onMaximum, 160, { rel: 1e-6 });
    assertCloseTo(t.theta, 80, { rel: 1e-6 });
    assert.doesNotMatch(t.rule, /peak/);
  });

  test("warnings: below a few molecules, and above anything the mean field reaches", () => {
    const low = resolveThreshold(pulseGenerator({ threshold: { value: 3 } }));
    assert.ok(
      low.warnings.some((w) => w.includes(`below ${MIN_THRESHOLD_MOLECULES}`)),
      low.warnings.join(" | "),
    );
    assert.ok(
      low.warnings.some((w) => /at or below the OFF steady state/.test(w)),
      low.warnings.join(" | "),
    );
    const high = resolveThreshold(pulseGenerator({ threshold: { value: 500 } }));
    assert.ok(
      high.warnings.some((w) => /above anything the mean-field output reaches/.test(w)),
      high.warnings.join(" | "),
    );
    assert.equal(high.thresholdSource, "set");
  });

  test("an output that does not rise under ON input is refused in words", () => {
    const c = structuredClone(templates.simple.circuit);
    // the sensor no longer responds to the signal: ON and OFF are the same
    for (const r of c.reactions) delete (r as { scaledBy?: string }).scaledBy;
    const spec = RunSpecSchema.parse({
      circuit: c,
      inputSignal: templates.simple.inputSignal,
      program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
      endTimeMinutes: 600,
      gridStepMinutes: 1,
      replicates: 10,
      seed: "flat",
    });
    assert.throws(() => resolveThreshold(spec), /does not rise above its OFF steady state .* set threshold\.value/);
  });
});

describe("default threshold of the feedback templates", () => {
  const spec = (key: FeedbackTemplateKey, extra: Record<string, unknown> = {}) =>
    RunSpecSchema.parse({
      circuit: feedbackTemplates[key].circuit,
      inputSignal: feedbackTemplates[key].inputSignal,
      program: {
        kind: "pulses",
        pulses: [
          { start: 100, duration: 20 },
          { start: 300, duration: 60 },
        ],
      },
      endTimeMinutes: 600,
      gridStepMinutes: 1,
      replicates: 4,
      seed: "feedback-threshold",
      ...extra,
    });

  for (const key of ["nar", "latch", "ring", "ring-extra"] as FeedbackTemplateKey[]) {
    test(`${key} launches with the default threshold (no threshold.value), above its OFF reference`, () => {
      const t = resolveThreshold(spec(key));
      assert.equal(t.thresholdSource, "default");
      assert.ok(Number.isFinite(t.theta) && t.theta > t.offSteadyState + 1, JSON.stringify(t));
      assert.ok(t.theta < t.onMaximum, JSON.stringify(t));
      // and a replicate simulates and scores its two pulses with it
      const chunk = simulateChunk(spec(key, { replicates: 1 }), 0, 1);
      assert.equal(chunk.pulses.length, 2);
    });
  }

  test("ring of three: the OFF state oscillates, so the OFF reference is the time average over the second half of the end time", () => {
    const s = spec("ring");
    const t = resolveThreshold(s);
    assert.match(t.rule, /does not settle with the input OFF/);
    assert.match(t.rule, /time average over the second half of the end time \(300-600 min\)/);
    assert.ok(
      t.warnings.some((w) => /oscillates with the input OFF/.test(w) && /without any input/.test(w)),
      t.warnings.join(" | "),
    );
    // Independent: the mean-field OFF path on a 0.1-min grid (no pulses), averaged over [300, 600] by the
    // trapezoid rule, and the ON path (one pulse over the whole end time) for the highest level.
    const m = runSetup(s).model;
    const offPath = solveOde(
      RunSpecSchema.parse({ ...s, program: undefined, inputSignal: undefined, gridStepMinutes: 0.1 }),
    );
    const ng = offPath.times.length;
    const out = (g: number) => offPath.values[m.outputIndex * ng + g];
    let sum = 0;
    let span = 0;
    let hi = -Infinity;
    for (let g = 1; g < ng; g++) {
      if (offPath.times[g - 1] < 300 - 1e-9) continue;
      const dt = offPath.times[g] - offPath.times[g - 1];
      sum += 0.5 * dt * (out(g - 1) + out(g));
      span += dt;
      hi = Math.max(hi, out(g));
    }
    assertCloseTo(span, 300, { rel: 1e-9 });
    assertCloseTo(t.offSteadyState, sum / span, { rel: 2e-3 });
    // it really oscillates: the OFF path spans far more than its own Poisson noise around the average
    assert.ok(hi - sum / span > 5 * Math.sqrt(sum / span), `max ${hi}, mean ${sum / span}`);
    const onPath = solveOde(
      RunSpecSchema.parse({
        ...s,
        program: { kind: "pulses", pulses: [{ start: 0, duration: 601 }] },
        gridStepMinutes: 0.1,
      }),
    );
    let peak = -Infinity;
    for (let g = 0; g < ng; g++) peak = Math.max(peak, onPath.values[m.outputIndex * ng + g]);
    assertCloseTo(t.onMaximum, peak, { rel: 2e-3 });
    assertCloseTo(t.theta, (t.offSteadyState + t.onMaximum) / 2, { rel: 1e-9 });
  });
});
