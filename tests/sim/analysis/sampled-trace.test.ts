/**
 * The section-5 figures on sampled traces (sim/metrics/pulse-tracker.ts,
 * pulseStatsFromSampledTrace: linear interpolation between samples), on
 * synthetic traces whose answers are known in closed form.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { pulseStatsFromSampledTrace } from "@/sim/metrics/pulse-tracker";
import { assertCloseTo } from "@/tests/helpers/close-to";

const EPS = 1e-9;

function sample(f: (t: number) => number, t0: number, t1: number, step: number) {
  const n = Math.round((t1 - t0) / step) + 1;
  const times = Array.from({ length: n }, (_, i) => t0 + i * step);
  return { times, values: times.map(f) };
}

describe("sampled trace: known answers", () => {
  test("square (trapezoid) pulse: crossings, width, delay, OFF delay, peak, FWHM (by hand)", () => {
    // ramps 10->11 (0 to 100) and 30->31 (100 to 0); theta 50, down 40
    const times = [0, 10, 11, 30, 31, 60];
    const values = [0, 0, 100, 100, 0, 0];
    const [s] = pulseStatsFromSampledTrace(times, values, [{ on: 8, off: 28, durationBin: 20 }], {
      theta: 50,
      downTheta: 40,
      windowMinutes: 20,
    });
    assert.equal(s.excluded, false);
    assert.equal(s.passed, true);
    assertCloseTo(s.delay!, 2.5, { abs: EPS }, "up-crossing at 10.5");
    assertCloseTo(s.offDelay!, 2.6, { abs: EPS }, "down-crossing of 40 at 30.6");
    assert.equal(s.widths.length, 1);
    assertCloseTo(s.widths[0], 20.1, { abs: EPS });
    assert.equal(s.peak, 100);
    assertCloseTo(s.timeToPeak, 3, { abs: EPS }, "peak first reached at 11");
    assert.equal(s.baseline, 0);
    assertCloseTo(s.fwhm!, 20, { abs: EPS }, "half level 50 crossed at 10.5 and 30.5");
  });

  test("exponential rise: crossing at tau ln 2, error within the chord bound and equal to its second-order formula", () => {
    // x(t) = 100 (1 - exp(-(t - 5)/10)) after on = 5; theta = 50 -> crossing at 5 + 10 ln 2
    const tau = 10;
    const f = (t: number) => (t < 5 ? 0 : 100 * (1 - Math.exp(-(t - 5) / tau)));
    const exact = tau * Math.log(2);
    const errors: number[] = [];
    for (const h of [1, 0.1]) {
      const { times, values } = sample(f, 0, 200, h);
      const [s] = pulseStatsFromSampledTrace(times, values, [{ on: 5, off: 55, durationBin: 50 }], {
        theta: 50,
        downTheta: 40,
        windowMinutes: 30,
      });
      const err = s.delay! - exact;
      // concave rise: the chord lies below the curve, so the interpolated crossing is late, by at most
      // h^2 max|x''| / (8 x'(t*)) = h^2 * 1 / (8 * 5) (|x''| <= 100/tau^2 = 1 over the step, x' = 5 at t*)
      assert.ok(err >= -EPS && err <= (h * h) / 40 + EPS, `h = ${h}: error ${err}`);
      // leading order of the chord error at the crossing: (t* - ta)(tb - t*) |x''| / (2 x'), with x'' = -0.5, x' = 5
      const tStar = 5 + exact;
      const ta = Math.floor(tStar / h + EPS) * h;
      errors.push(err / (((tStar - ta) * (ta + h - tStar) * 0.5) / (2 * 5)));
      // OFF: x(55) = 100 (1 - e^-5), then decays with tau; down-crossing of 40 at 55 + tau ln(x(55)/40)
      const x55 = 100 * (1 - Math.exp(-5));
      const fOff = (t: number) => (t <= 55 ? f(t) : x55 * Math.exp(-(t - 55) / tau));
      const off = sample(fOff, 0, 200, h);
      const [so] = pulseStatsFromSampledTrace(off.times, off.values, [{ on: 5, off: 55, durationBin: 50 }], {
        theta: 50,
        downTheta: 40,
        windowMinutes: 30,
      });
      // convex decay: chord above the curve, interpolated crossing late by at most h^2 (|x''| <= x55/tau^2) / (8 * 40/tau)
      const offExact = tau * Math.log(x55 / 40);
      const offErr = so.offDelay! - offExact;
      assert.ok(offErr >= -EPS && offErr <= (h * h * (x55 / 100)) / (8 * 4) + EPS, `h = ${h}: OFF error ${offErr}`);
    }
    // the error matches the second-order chord formula (Taylor expansion) within 5% at both steps
    for (const ratio of errors) assertCloseTo(ratio, 1, { abs: 0.05 });
  });

  test("chattering around theta inside the hysteresis band is one output pulse; without hysteresis it splits", () => {
    // rises to 55 at t=10, then alternates 45 / 55 every minute until t=40, then falls to 0 at t=41
    const times: number[] = [0, 9, 10];
    const values: number[] = [0, 0, 55];
    for (let t = 11; t <= 40; t++) {
      times.push(t);
      values.push(t % 2 === 1 ? 45 : 55);
    }
    times.push(41, 80);
    values.push(0, 0);
    const pulse = [{ on: 5, off: 45, durationBin: 40 }];
    const [withBand] = pulseStatsFromSampledTrace(times, values, pulse, {
      theta: 50,
      downTheta: 40,
      windowMinutes: 30,
    });
    assert.equal(withBand.widths.length, 1);
    // up at 9 + 50/55 ; down (40) between 40 (55) and 41 (0): 40 + 15/55
    assertCloseTo(withBand.widths[0], 40 + 15 / 55 - (9 + 50 / 55), { abs: EPS });
    const [noBand] = pulseStatsFromSampledTrace(times, values, pulse, { theta: 50, downTheta: 50, windowMinutes: 30 });
    assert.ok(noBand.widths.length >= 10, `without hysteresis: ${noBand.widths.length} output pulses`);
  });

  test("censored: no response in the window gives delay null and no pass; the next pulse's start ends the window", () => {
    // output rises only at t = 62..63, after the first pulse's window (closed at the next pulse's on, 60)
    const times = [0, 62, 63, 100, 101, 150];
    const values = [0, 0, 100, 100, 0, 0];
    const stats = pulseStatsFromSampledTrace(
      times,
      values,
      [
        { on: 10, off: 20, durationBin: 10 },
        { on: 60, off: 70, durationBin: 10 },
      ],
      { theta: 50, downTheta: 40, windowMinutes: 100 },
    );
    assert.equal(stats.length, 2);
    assert.equal(stats[0].passed, false);
    assert.equal(stats[0].delay, null);
    assert.deepEqual(stats[0].widths, []);
    assert.equal(stats[1].passed, true);
    assertCloseTo(stats[1].delay!, 2.5, { abs: EPS });
  });

  test("a pulse that starts with the output above threshold is excluded", () => {
    const stats = pulseStatsFromSampledTrace([0, 50, 51, 100], [80, 80, 0, 0], [{ on: 10, off: 20, durationBin: 10 }], {
      theta: 50,
      downTheta: 40,
      windowMinutes: 30,
    });
    assert.equal(stats[0].excluded, true);
  });
});
