/**
 * The settings block and the method label (docs/metrics.md, "Settings" and
 * "Method"): one object with threshold, window, hysteresis, end time, grid
 * step, method, seed and replicates; tau-leaping labelled approximate with the
 * step control that actually ran (Cao, Gillespie & Petzold 2006, J Chem Phys
 * 124:044109), the direct method exact (Gillespie 1977, J Phys Chem 81:2340).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { RunSettingsBlockSchema } from "@/shared/schemas/analysis";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { methodLabel, runSettingsBlock } from "@/sim/analysis";
import { resolveThreshold, templates } from "@/sim";
import { TAU_LEAP_STEP_CONTROL } from "@/sim/engine/tau-leap";

const spec = (extra: Record<string, unknown> = {}) =>
  RunSpecSchema.parse({
    circuit: templates.simple.circuit,
    inputSignal: templates.simple.inputSignal,
    program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
    endTimeMinutes: 600,
    gridStepMinutes: 2,
    replicates: 30,
    seed: "settings-1",
    ...extra,
  });

describe("method label", () => {
  test("tau-leaping is approximate and states its step control", () => {
    const m = methodLabel("tauLeap");
    assert.equal(m.exact, false);
    assert.equal(m.accuracy, "approximate");
    assert.match(m.label, /^Approximate: tau-leaping/);
    assert.match(m.reference, /Cao, Gillespie & Petzold 2006/);
    assert.equal(m.stepControl!.epsilon, TAU_LEAP_STEP_CONTROL.epsilon);
    assert.equal(m.stepControl!.criticalFirings, TAU_LEAP_STEP_CONTROL.criticalFirings);
    assert.match(m.stepControl!.description, new RegExp(`epsilon = ${TAU_LEAP_STEP_CONTROL.epsilon}`));
  });
  test("the direct method is exact and has no step control", () => {
    const m = methodLabel("direct");
    assert.equal(m.exact, true);
    assert.equal(m.accuracy, "exact");
    assert.equal(m.stepControl, null);
  });
});

describe("settings block", () => {
  test("carries every setting from the spec and the resolved threshold", () => {
    const s = spec({ method: "tauLeap", threshold: { value: 40, hysteresis: 0.1, windowMinutes: 25 } });
    const b = RunSettingsBlockSchema.parse(runSettingsBlock(s, resolveThreshold(s)));
    assert.equal(b.thresholdMolecules, 40);
    assert.equal(b.thresholdSource, "set");
    assert.equal(b.downThresholdMolecules, 36);
    assert.equal(b.hysteresis, 0.1);
    assert.equal(b.windowMinutes, 25);
    assert.equal(b.windowSource, "set");
    assert.equal(b.endTimeMinutes, 600);
    assert.equal(b.gridStepMinutes, 2);
    assert.equal(b.seed, "settings-1");
    assert.equal(b.replicates, 30);
    assert.equal(b.outputSpecies, "rptC");
    assert.equal(b.method.accuracy, "approximate");
  });
  test("a default threshold and window say so", () => {
    const s = spec();
    const b = runSettingsBlock(s, resolveThreshold(s));
    assert.equal(b.thresholdSource, "default");
    assert.equal(b.windowSource, "default");
    assert.equal(b.method.name, "direct");
  });
});
