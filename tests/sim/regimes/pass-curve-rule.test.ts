/**
 * The filter/follower rule on pass curves (docs/regimes.md): thresholds 0.2 and
 * 0.8 on the Wilson 95% interval (Wilson 1927, J Am Stat Assoc 22:209).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { passCurveVerdict } from "@/sim/regimes";

test("short pulses blocked, long ones passed: persistence filter", () => {
  const v = passCurveVerdict([
    { durationMinutes: 2, passed: 0, counted: 50 },
    { durationMinutes: 60, passed: 50, counted: 50 },
  ]);
  assert.equal(v?.label, "persistence filter");
  assert.equal(v?.evidence.blockedDurationMinutes, 2);
});

test("too few pulses to say 'rarely': 0 of 5 has Wilson upper bound 0.43 > 0.2, so no filter label", () => {
  const v = passCurveVerdict([
    { durationMinutes: 2, passed: 0, counted: 5 },
    { durationMinutes: 60, passed: 50, counted: 50 },
  ]);
  assert.equal(v, null);
});

test("all durations pass: follower; given intervals are used as they are", () => {
  assert.equal(
    passCurveVerdict([
      { durationMinutes: 2, passed: 48, counted: 50 },
      { durationMinutes: 60, passed: 50, counted: 50 },
    ])?.label,
    "follower",
  );
  // a caller's interval overrides the computed one
  assert.equal(
    passCurveVerdict([
      { durationMinutes: 2, passed: 48, counted: 50, low: 0.5, high: 0.99 },
      { durationMinutes: 60, passed: 50, counted: 50 },
    ]),
    null,
  );
});

test("a filter needs the long pulses after the short ones", () => {
  const v = passCurveVerdict([
    { durationMinutes: 2, passed: 50, counted: 50 },
    { durationMinutes: 60, passed: 0, counted: 50 },
  ]);
  assert.equal(v, null);
});
