import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { analyseTraces, chartCells } from "@/sim/traces/trace-metrics";
import { pulseStatsFromSampledTrace } from "@/sim/metrics/pulse-tracker";
import { TraceSettingsSchema } from "@/shared/schemas/api-traces";
import { assertCloseTo } from "@/tests/helpers/close-to";

/** Piecewise-linear test trace: flat at `low`, rises 4 units/min from `on`, holds `high`, falls 4 units/min from `off`. */
function ramp(times: number[], on: number, off: number, low: number, high: number): number[] {
  return times.map((t) => {
    if (t <= on) return low;
    const up = Math.min(high, low + 4 * (t - on));
    if (t <= off) return up;
    return Math.max(low, up - 4 * (t - off));
  });
}
const range = (a: number, b: number, step = 1) =>
  Array.from({ length: Math.floor((b - a) / step) + 1 }, (_, i) => a + i * step);

const settings = TraceSettingsSchema.parse({
  background: { mode: "value", value: 100 },
  scale: { mode: "entered", unitsPerMolecule: 2 },
  thresholdMolecules: 10,
  hysteresis: 0.2,
  windowMinutes: 20,
});

describe("analyseTraces", () => {
  test("threshold in trace units is background + scale x theta; delay and width by linear interpolation", () => {
    const t = range(0, 100);
    const values = ramp(t, 20, 40, 100, 160);
    const { analysis } = analyseTraces([{ cell: "a", times: t, values }], [{ on: 20, off: 40 }], settings);
    const c = analysis.cells[0];
    assert.equal(c.thresholdTraceUnits, 120);
    assert.equal(c.pulses.length, 1);
    const p = c.pulses[0];
    // up at 120: 100 + 4 (t - 20) = 120 -> t = 25; down at 100 + 2*10*0.8 = 116: 160 - 4 (t - 40) = 116 -> t = 51
    assert.equal(p.passed, true);
    assertCloseTo(p.delay!, 5, { abs: 1e-9 });
    assertCloseTo(p.offDelay!, 11, { abs: 1e-9 });
    assert.deepEqual(
      p.widths.map((w) => Math.round(w * 1e9) / 1e9),
      [26],
    );
    assert.equal(p.peak, 160);
    assert.equal(analysis.summary.analysis.counts.passed, 1);
  });

  test("the same crossings as the tracker on the trace in molecules (the same function the simulations use)", () => {
    const t = range(0, 300, 2);
    const molecules = t.map((x) => 10 + 8 * Math.sin(x / 9) + (x > 100 && x < 160 ? 6 : 0));
    const pulses = [
      { on: 30, off: 40 },
      { on: 100, off: 160 },
      { on: 200, off: 205 },
    ];
    const direct = pulseStatsFromSampledTrace(
      t,
      molecules,
      pulses.map((p) => ({ ...p, durationBin: p.off - p.on })),
      { theta: 10, downTheta: 8, windowMinutes: 20 },
    );
    const traceUnits = molecules.map((m) => 100 + 2 * m);
    const { analysis } = analyseTraces([{ cell: "a", times: t, values: traceUnits }], pulses, settings);
    const got = analysis.cells[0].pulses;
    assert.equal(got.length, direct.length);
    got.forEach((p, i) => {
      assert.equal(p.passed, direct[i].passed);
      assert.equal(p.excluded, direct[i].excluded);
      assert.equal(p.delay === null, direct[i].delay === null);
      if (p.delay !== null) assertCloseTo(p.delay, direct[i].delay!, { abs: 1e-9 });
      assert.equal(p.widths.length, direct[i].widths.length);
    });
  });

  test("cells are scored only on pulses they watched whole (late start, early end)", () => {
    const t = range(0, 200);
    const pulses = [
      { on: 20, off: 40 },
      { on: 100, off: 120 },
    ];
    const late = t.filter((x) => x >= 50);
    const early = t.filter((x) => x <= 130);
    const { analysis } = analyseTraces(
      [
        { cell: "late", times: late, values: late.map(() => 100) },
        { cell: "early", times: early, values: early.map(() => 100) },
      ],
      pulses,
      settings,
    );
    const [a, b] = analysis.cells;
    assert.deepEqual(
      a.pulses.map((p) => p.pulseIndex),
      [1],
    );
    assert.deepEqual(a.skipped, [{ pulseIndex: 0, reason: "notCovered" }]);
    // window of pulse 1 ends at 120 + 20 = 140 > 130
    assert.deepEqual(
      b.pulses.map((p) => p.pulseIndex),
      [0],
    );
    assert.deepEqual(b.skipped, [{ pulseIndex: 1, reason: "notCovered" }]);
    assert.equal(analysis.summary.skippedNotCovered, 2);
    assert.equal(analysis.summary.pulsesAnalysed, 2);
  });

  test("a crossing inside a gap is dated at the first frame after it; the gap is reported and can drop the pulse", () => {
    const full = range(0, 100);
    const values = ramp(full, 20, 60, 100, 160);
    // frames 22..29 missing: the crossing at 25 falls in the gap
    const keep = full.map((x, i) => [x, values[i]] as const).filter(([x]) => x < 22 || x > 29);
    const cells = [{ cell: "a", times: keep.map((k) => k[0]), values: keep.map((k) => k[1]) }];
    const { analysis } = analyseTraces(cells, [{ on: 20, off: 60 }], settings);
    const p = analysis.cells[0].pulses[0];
    assert.equal(analysis.cells[0].gaps, 1);
    assert.equal(p.longestGapMinutes, 9);
    assert.equal(p.delay, 10, "first frame after the gap is t = 30");
    const dropped = analyseTraces(cells, [{ on: 20, off: 60 }], { ...settings, maxGapMinutes: 5 }).analysis;
    assert.deepEqual(dropped.cells[0].skipped, [{ pulseIndex: 0, reason: "gap" }]);
    assert.equal(dropped.summary.skippedGap, 1);
  });

  test("chart cells are downsampled but keep every gap marker as null", () => {
    const t = range(0, 999).filter((x) => x < 500 || x > 510);
    const { prepared } = analyseTraces([{ cell: "a", times: t, values: t.map(() => 100) }], [], settings);
    const [c] = chartCells(prepared, 100);
    assert.ok(c.times.length <= 102);
    assert.equal(c.values.filter((v) => v === null).length, 1);
    assert.equal(c.times[c.times.length - 1], 999);
  });
});
