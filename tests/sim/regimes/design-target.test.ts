/** Design to a target (sim/regimes/design-target.ts): limits, margins and the fraction of cells meeting them. */
import { test } from "node:test";
import assert from "node:assert/strict";
import { fractionMeeting, meetsTarget, MIN_REPLICATES_FOR_FRACTION } from "@/sim/regimes/design-target";
import { assertCloseTo } from "@/tests/helpers/close-to";

const byDuration = [
  { duration: 2, pulses: 100, passed: 0 },
  { duration: 4, pulses: 100, passed: 2 },
  { duration: 30, pulses: 100, passed: 97 },
];

test("false-pass, pass and delay-cost limits with their margins (Linger's definitions, docs/metrics.md)", () => {
  const r = meetsTarget(
    {
      falsePass: { maxRate: 0.01, belowMinutes: 5 },
      pass: { minProbability: 0.95, atMinutes: 30 },
      delayCost: { maxMinutes: 15 },
    },
    { byDuration, delayCostMinutes: 12 },
  );
  assert.equal(r.meets, true);
  // pooled false passes below 5 min: 2 of 200 = 0.01, exactly at the limit
  assertCloseTo(r.limits[0].margin!, 0, { abs: 1e-12 });
  assertCloseTo(r.limits[1].margin!, 0.02, { abs: 1e-12 });
  assert.equal(r.limits[2].margin, 3);
  const stricter = meetsTarget({ falsePass: { maxRate: 0.005, belowMinutes: 5 } }, { byDuration });
  assert.equal(stricter.meets, false);
  assert.ok(stricter.limits[0].margin! < 0);
  const untested = meetsTarget({ pass: { minProbability: 0.5, atMinutes: 60 } }, { byDuration });
  assert.equal(untested.meets, false);
  assert.match(untested.limits[0].reason ?? "", /no pulses of 60 min/);
});

test("a period window needs a sustained oscillation", () => {
  const osc = { oscillation: { minMinutes: 60, maxMinutes: 120 } };
  assert.equal(meetsTarget(osc, { label: "sustained oscillation", periodMinutes: 70 }).limits[0].margin, 10);
  assert.equal(meetsTarget(osc, { label: "sustained oscillation", periodMinutes: 130 }).meets, false);
  assert.equal(meetsTarget(osc, { label: "damped oscillation", periodMinutes: 70 }).meets, false);
});

test("fraction of cells meeting a target: Wilson 95% interval, 50 of 100 gives [0.4038, 0.5962] (Wilson 1927, J Am Stat Assoc 22:209)", () => {
  const f = fractionMeeting(Array.from({ length: 100 }, (_, i) => i % 2 === 0))!;
  assert.equal(f.fraction, 0.5);
  assertCloseTo(f.low, 0.4038, { abs: 1e-4 });
  assertCloseTo(f.high, 0.5962, { abs: 1e-4 });
  assert.equal(fractionMeeting(Array(MIN_REPLICATES_FOR_FRACTION - 1).fill(true)), null);
});
