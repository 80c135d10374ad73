/**
 * Pulse tracker: hand-worked paths against Linger's own definitions
 * (docs/metrics.md; expected values computed by hand from those definitions).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { PulseTracker, pulseStatsFromSampledTrace } from "@/sim/metrics/pulse-tracker";
import { assertCloseTo } from "@/tests/helpers/close-to";

const thr = { theta: 10, downTheta: 8, windowMinutes: 5 };

describe("pulse tracker on a step (event) path", () => {
  test("delay, OFF delay, width, peak and FWHM", () => {
    const tr = new PulseTracker([{ on: 10, off: 20, durationBin: 10 }], thr, "step");
    tr.reset(3, 0, 0);
    tr.push(12, 10); // up-crossing at 12
    tr.push(15, 12); // peak
    tr.push(22, 5); // down-crossing (5 < 8) at 22
    const [s] = tr.finish(30);
    assert.equal(s.replicate, 3);
    assert.equal(s.excluded, false);
    assert.equal(s.passed, true);
    assert.equal(s.delay, 2);
    assert.equal(s.offDelay, 2);
    assert.deepEqual(s.widths, [10]);
    assert.equal(s.peak, 12);
    assert.equal(s.timeToPeak, 5);
    assert.equal(s.baseline, 0);
    // half level 6: reached at 12, left after the peak at 22
    assert.equal(s.fwhm, 10);
  });

  test("hysteresis: a dip between theta(1-h) and theta is not a down-crossing", () => {
    const tr = new PulseTracker([{ on: 0, off: 10, durationBin: 10 }], thr, "step");
    tr.reset(0, 0, 0);
    tr.push(1, 10);
    tr.push(2, 9);
    tr.push(3, 10);
    tr.push(4, 7);
    const [s] = tr.finish(20);
    assert.deepEqual(s.widths, [3]);
    assert.equal(s.offDelay, null); // the down-crossing was before off
  });

  test("a pulse starting above threshold is excluded; censored delay is null", () => {
    const tr = new PulseTracker(
      [
        { on: 5, off: 6, durationBin: 1 },
        { on: 50, off: 51, durationBin: 1 },
      ],
      thr,
      "step",
    );
    tr.reset(0, 0, 20);
    tr.push(30, 0); // falls before the second pulse
    const stats = tr.finish(100);
    assert.equal(stats.length, 2);
    assert.equal(stats[0].excluded, true);
    assert.equal(stats[1].excluded, false);
    assert.equal(stats[1].passed, false);
    assert.equal(stats[1].delay, null);
  });

  test("the window ends at the next pulse's on", () => {
    const tr = new PulseTracker(
      [
        { on: 0, off: 1, durationBin: 1 },
        { on: 3, off: 4, durationBin: 1 },
      ],
      thr,
      "step",
    );
    tr.reset(0, 0, 0);
    tr.push(3.5, 11); // after pulse 0's window (ends at 3), inside pulse 1's
    const stats = tr.finish(10);
    assert.equal(stats[0].passed, false);
    assert.equal(stats[1].passed, true);
    assertCloseTo(stats[1].delay!, 0.5, { abs: 1e-12 });
  });
});

describe("pulseStatsFromSampledTrace (linear interpolation)", () => {
  test("interpolated crossings and FWHM", () => {
    const stats = pulseStatsFromSampledTrace([0, 10, 20, 30], [0, 0, 20, 0], [{ on: 5, off: 15, durationBin: 10 }], {
      theta: 10,
      downTheta: 8,
      windowMinutes: 15,
    });
    const s = stats[0];
    assertCloseTo(s.delay!, 10, { abs: 1e-12 }); // crosses 10 at t = 15
    assertCloseTo(s.offDelay!, 11, { abs: 1e-12 }); // crosses 8 at t = 26
    assertCloseTo(s.widths[0], 11, { abs: 1e-12 });
    assert.equal(s.peak, 20);
    assert.equal(s.timeToPeak, 15);
    assertCloseTo(s.fwhm!, 10, { abs: 1e-12 }); // half level 10 at 15 and 25
  });

  test("no interpolation across a NaN gap", () => {
    const stats = pulseStatsFromSampledTrace([0, 10, 20, 30], [0, NaN, 20, 0], [{ on: 5, off: 15, durationBin: 10 }], {
      theta: 10,
      downTheta: 8,
      windowMinutes: 15,
    });
    assert.equal(stats[0].delay, 15); // step at the first valid sample after the gap (t = 20)
  });
});
