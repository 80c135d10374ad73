/**
 * Response delays that mean what they say (docs/metrics.md, "Response delay"):
 * Kaplan-Meier within each duration class (Kaplan & Meier 1958, JASA 53:457),
 * "not reached" when fewer than half of a class respond, and the pooled figure
 * only over the classes passed in more than half of their pulses, with the
 * coverage said in words. Pulse records are built by hand so every expected
 * value follows from counting.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { RunSummarySchema } from "@/shared/schemas/analysis";
import { accelerationFigures, summarizeRun } from "@/sim/analysis";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { templates } from "@/sim";
import { kaplanMeier, kmQuantile } from "@/sim/stats";

const threshold = { theta: 20, downTheta: 16, hysteresis: 0.2, windowMinutes: 30, outputLifetimeMinutes: 10 };
const replicates = Array.from({ length: 100 }, (_, r) => ({
  replicate: r,
  events: 100,
  capped: false,
  outputMean: 10,
  outputVar: 10,
}));

/**
 * 100 replicates, each with a 2-min pulse (responds in replicates 0..2 only, delay 1 min) and a
 * 60-min pulse (always responds, delay 5 + (r mod 10) min), and a 20-min pulse passed by 40 replicates.
 */
function records(): PulseStat[] {
  const out: PulseStat[] = [];
  for (let r = 0; r < 100; r++) {
    const rows: [number, number | null][] = [
      [2, r < 3 ? 1 : null],
      [20, r < 40 ? 12 : null],
      [60, 5 + (r % 10)],
    ];
    rows.forEach(([d, delay], i) => {
      const on = 100 + i * 300;
      out.push({
        replicate: r,
        pulseIndex: i,
        on,
        off: on + d,
        durationBin: d,
        excluded: false,
        passed: delay !== null,
        delay,
        offDelay: delay !== null ? 2 : null,
        widths: delay !== null ? [d] : [],
        peak: 30,
        timeToPeak: d,
        fwhm: null,
        baseline: 0,
      });
    });
  }
  return out;
}

describe("response delay per duration class", () => {
  const pulses = records();
  const s = summarizeRun({ pulses, replicates, threshold, noiseDurationMinutes: 10 });

  test("the summary satisfies its schema; a summary stored before these fields still parses, and says what it pooled", () => {
    RunSummarySchema.parse(s);
    const old = structuredClone(s) as Record<string, unknown> & typeof s;
    delete (old as Partial<typeof s>).delayCoverage;
    delete (old.delay as Partial<typeof s.delay>).medianStatus;
    for (const e of old.byDuration) delete (e as Partial<typeof e>).medianDelayStatus;
    const parsed = RunSummarySchema.parse(old);
    assert.match(parsed.delayCoverage.text, /^All evaluable pulses of every duration/);
  });

  test("Kaplan-Meier within a class; 'not reached' when fewer than half respond", () => {
    const [two, twenty, sixty] = s.byDuration;
    assert.equal(two.medianDelay, null);
    assert.equal(two.medianDelayStatus, "not-reached");
    assert.equal(twenty.medianDelayStatus, "not-reached", "40 of 100 responded");
    // 60-min pulses: delays 5..14, ten of each, none censored: the KM curve is exactly 1/2 from 9 to 10 min,
    // and the median is then the midpoint of that flat step (the usual convention, as for a sample median): 9.5
    assert.equal(sixty.medianDelay, 9.5);
    assert.equal(sixty.medianDelayStatus, "estimate");
    assert.equal(sixty.censored, 0);
  });

  test("the pooled delay covers only the durations passed in most pulses, and says so", () => {
    assert.deepEqual(s.delayCoverage.durations, [60]);
    assert.deepEqual(s.delayCoverage.leftOut, [2, 20]);
    assert.equal(s.delayCoverage.pulses, 100);
    assert.equal(s.delay.evaluable, 100);
    assert.equal(s.delay.median, 9.5);
    assert.equal(s.delay.medianStatus, "estimate");
    assert.match(s.delayCoverage.text, /^Pulses of 60 min \(1 of 3 durations, 100 pulses\)/);
    // Pooling every pulse would mix windows of 32 and 90 min: the KM median is then a different number
    // (censoring by duration is informative), which is exactly what the pooled figure must not report.
    const all = pulses.map((p) =>
      p.delay !== null ? { time: p.delay, event: true } : { time: p.off + 30 - p.on, event: false },
    );
    assert.notEqual(kmQuantile(kaplanMeier(all), 0.5), s.delay.median);
  });

  test("no duration passed in most pulses: no pooled median, the reason in words", () => {
    const few = records().filter((p) => p.durationBin !== 60);
    const t = summarizeRun({ pulses: few, replicates, threshold, noiseDurationMinutes: 10 });
    assert.deepEqual(t.delayCoverage.durations, []);
    assert.equal(t.delay.median, null);
    assert.equal(t.delay.medianStatus, "no-pulses");
    assert.match(
      t.delayCoverage.text,
      /No pulse duration passed in most replicates \(highest pass probability 40% at 20 min\)/,
    );
  });

  test("a class whose pulses were all excluded has no median and says no pulses", () => {
    const ex = records().map((p) => (p.durationBin === 2 ? { ...p, excluded: true, passed: false, delay: null } : p));
    const t = summarizeRun({ pulses: ex, replicates, threshold, noiseDurationMinutes: 10 });
    assert.equal(t.byDuration[0].pulses, 0);
    assert.equal(t.byDuration[0].medianDelayStatus, "no-pulses");
    assert.deepEqual(t.delayCoverage.leftOut, [2, 20]);
  });
});

describe("acceleration figures compare pooled delays of the same pulses only", () => {
  const spec = RunSpecSchema.parse({
    circuit: templates.simple.circuit,
    inputSignal: templates.simple.inputSignal,
    program: { kind: "periodic", start: 50, onDuration: 60, offDuration: 140 },
    endTimeMinutes: 600,
    gridStepMinutes: 2,
    replicates: 10,
    seed: "acc",
  });
  const all = summarizeRun({ pulses: records(), replicates, threshold, noiseDurationMinutes: 10 });
  // the same records with 20-min pulses all passing: the pooled delay then covers 20 and 60 min
  const more = summarizeRun({
    pulses: records().map((p) => (p.durationBin === 20 ? { ...p, passed: true, delay: 12 } : p)),
    replicates,
    threshold,
    noiseDurationMinutes: 10,
  });
  test("same durations pooled: the difference is given", () => {
    const a = accelerationFigures({ circuitSpec: spec, circuitSummary: all, controlSpec: spec, controlSummary: all });
    assert.equal(a.medianDelayDifference, 0);
  });
  test("different durations pooled: no difference, although both medians are shown", () => {
    assert.deepEqual(more.delayCoverage.durations, [20, 60]);
    const a = accelerationFigures({ circuitSpec: spec, circuitSummary: more, controlSpec: spec, controlSummary: all });
    assert.equal(a.medianDelayDifference, null);
    assert.notEqual(a.medianDelayCircuit, null);
    assert.notEqual(a.medianDelayControl, null);
  });
});
