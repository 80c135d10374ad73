import { test, describe } from "node:test";
import assert from "node:assert/strict";
import * as ss from "simple-statistics";
import {
  kaplanMeier,
  kaplanMeierOfSortedTimes,
  kaplanMeierOfTimes,
  kmQuantile,
  kmQuantileInterval,
} from "@/sim/stats/kaplan-meier";
import { assertCloseTo } from "@/tests/helpers/close-to";

/**
 * Worked example: remission times (weeks) of the 6-MP arm of the leukaemia
 * trial of Freireich et al. 1963, as tabulated with its Kaplan-Meier estimate
 * and Greenwood standard errors in Klein & Moeschberger, Survival Analysis:
 * Techniques for Censored and Truncated Data, 2nd ed. 2003, Table 4.1A
 * (values from memory). "+" = censored.
 */
const SIX_MP = "6 6 6 6+ 7 9+ 10 10+ 11+ 13 16 17+ 19+ 20+ 22 23 25+ 32+ 32+ 34+ 35+"
  .split(" ")
  .map((s) => ({ time: parseFloat(s), event: !s.endsWith("+") }));

describe("Kaplan-Meier", () => {
  test("6-MP arm: survival and Greenwood standard errors (Klein & Moeschberger 2003, Table 4.1A; from memory)", () => {
    const km = kaplanMeier(SIX_MP);
    const expected: [number, number, number][] = [
      [6, 0.8571, 0.0764],
      [7, 0.8067, 0.0869],
      [10, 0.7529, 0.0963],
      [13, 0.6902, 0.1068],
      [16, 0.6275, 0.1141],
      [22, 0.5378, 0.1282],
      [23, 0.4482, 0.1346],
    ];
    for (const [t, s, se] of expected) {
      const step = km.steps.find((st) => st.time === t)!;
      assertCloseTo(step.survival, s, { abs: 1e-4 }, `S(${t})`);
      assertCloseTo(step.standardError, se, { abs: 1.5e-4 }, `se(${t})`);
    }
    assert.equal(km.n, 21);
    assert.equal(km.events, 9);
    assert.equal(km.censored, 12);
    // at t = 6: 21 at risk, 3 events, 1 censored (censored at a tied time stay at risk)
    assert.deepEqual([km.steps[0].atRisk, km.steps[0].events, km.steps[0].censored], [21, 3, 1]);
  });

  test("6-MP arm: median 23 weeks, 95% interval [16, not reached] (Brookmeyer & Crowley 1982 with the log band; from memory)", () => {
    const km = kaplanMeier(SIX_MP);
    assert.equal(kmQuantile(km, 0.5), 23);
    assert.deepEqual(kmQuantileInterval(km, 0.5), [16, null]);
    // 25th percentile: first time S <= 0.75; S(10) = 0.7529 is still above, S(13) = 0.6902 is not
    assert.equal(kmQuantile(km, 0.25), 13);
    // S never reaches 0.25: the 75th percentile is not reached
    assert.equal(kmQuantile(km, 0.75), null);
  });

  test("without censoring the median is the sample median (simple-statistics as an independent reference)", () => {
    for (const xs of [
      [5, 1, 3],
      [4, 1, 2, 3],
      [2, 2, 7, 9, 9, 9, 10, 11],
    ]) {
      const km = kaplanMeier(xs.map((time) => ({ time, event: true })));
      assert.equal(kmQuantile(km, 0.5), ss.median(xs));
    }
    // all censored: no median, no interval
    const none = kaplanMeier([
      { time: 3, event: false },
      { time: 4, event: false },
    ]);
    assert.equal(kmQuantile(none, 0.5), null);
    assert.deepEqual(kmQuantileInterval(none, 0.5), [null, null]);
  });

  test("times already sorted (merged per-duration samples): the same curve as sorting them, and unsorted input refused", () => {
    const events = Float64Array.from(SIX_MP.filter((o) => o.event).map((o) => o.time));
    const censored = Float64Array.from(SIX_MP.filter((o) => !o.event).map((o) => o.time));
    const sorted = kaplanMeierOfSortedTimes(events.slice().sort(), censored.slice().sort());
    const byObjects = kaplanMeier(SIX_MP);
    assert.deepEqual(sorted.steps, byObjects.steps);
    assert.deepEqual(sorted.steps, kaplanMeierOfTimes(events, censored).steps);
    // the columns hold the steps the objects show, the event steps apart
    assert.deepEqual(
      Array.from(sorted.columns.eventSteps, (k) => sorted.columns.time[k]),
      byObjects.steps.filter((st) => st.events > 0).map((st) => st.time),
    );
    assert.throws(() => kaplanMeierOfSortedTimes(Float64Array.of(2, 1), new Float64Array(0)), /ascending/);
    assert.throws(() => kaplanMeierOfSortedTimes(Float64Array.of(1, Infinity), new Float64Array(0)), /finite/);
  });
});
