/**
 * Per-replicate figures for design targets (sim/regimes/replicate-figures.ts)
 * and the fraction of cells meeting a target with its Wilson interval
 * (Wilson 1927, J Am Stat Assoc 22:209), on hand-built pulse records whose
 * answers are counted by hand.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { replicateFigures, replicateVerdicts } from "@/sim/regimes/replicate-figures";
import { fractionMeeting, MIN_REPLICATES_FOR_FRACTION } from "@/sim/regimes/design-target";
import { wilson } from "@/sim/stats/wilson-interval";

const pulse = (
  replicate: number,
  duration: number,
  passed: boolean,
  delay: number | null,
  excluded = false,
): PulseStat =>
  ({
    replicate,
    pulseIndex: 0,
    on: 0,
    off: duration,
    durationBin: duration,
    excluded,
    passed,
    delay,
    offDelay: null,
    widths: [],
  }) as unknown as PulseStat;

test("counts per replicate and duration, excluded pulses left out, long-pulse median with unanswered pulses counted as longest", () => {
  const pulses = [
    // replicate 0: short 5 min pulses pass 1 of 2; long 60 min pulses delays 10, 20, unanswered -> median 20
    pulse(0, 5, true, 3),
    pulse(0, 5, false, null),
    pulse(0, 60, true, 10),
    pulse(0, 60, true, 20),
    pulse(0, 60, false, null),
    // replicate 1: one excluded short pulse, long pulses unanswered twice of two -> median not reached
    pulse(1, 5, true, 1, true),
    pulse(1, 5, false, null),
    pulse(1, 60, false, null),
    pulse(1, 60, false, null),
    // round-off in the duration bin joins the 60 min class
    pulse(1, 59.99999999999999, true, 4),
  ];
  const f = replicateFigures(pulses, { longMinutes: 30 });
  assert.deepEqual(f.durations, [5, 60]);
  assert.deepEqual(f.replicates, [0, 1]);
  assert.deepEqual(f.counted, [
    [2, 3],
    [1, 3],
  ]);
  assert.deepEqual(f.passed, [
    [1, 2],
    [0, 1],
  ]);
  // replicate 1's long delays: 4, inf, inf -> median inf -> null
  assert.deepEqual(f.longDelay, [20, null]);
  const v = replicateVerdicts(f, { falsePass: { maxRate: 0.5, belowMinutes: 10 }, delayCost: { maxMinutes: 25 } });
  assert.deepEqual(
    v.map((x) => x.meets),
    [true, false],
  );
  assert.equal(v[0].limits.find((l) => l.limit === "delayCost")!.margin, 5);
  assert.equal(v[1].limits.find((l) => l.limit === "delayCost")!.reason, "no delay cost measured");
  // the cap keeps the first replicates only
  assert.deepEqual(replicateFigures(pulses, { longMinutes: 30, maxReplicates: 1 }).replicates, [0]);
});

test("fraction of cells meeting a target: k of n with the Wilson 95% interval, none below the documented minimum", () => {
  const pulses: PulseStat[] = [];
  // 30 replicates: the first 21 pass their one 60 min pulse
  for (let r = 0; r < 30; r++) pulses.push(pulse(r, 60, r < 21, r < 21 ? 5 : null));
  const f = replicateFigures(pulses, { longMinutes: 30 });
  const verdicts = replicateVerdicts(f, { pass: { minProbability: 0.9, atMinutes: 60 } });
  const frac = fractionMeeting(verdicts.map((x) => x.meets))!;
  assert.equal(frac.replicates, 30);
  assert.equal(frac.fraction, 0.7);
  const [lo, hi] = wilson(21, 30);
  assert.equal(frac.low, lo);
  assert.equal(frac.high, hi);
  // Wilson 95% interval of 21/30 (z = 1.96): 0.521 to 0.833, worked by hand from the closed form
  assert.ok(Math.abs(lo - 0.5212) < 5e-4 && Math.abs(hi - 0.8334) < 5e-4, `${lo} ${hi}`);
  assert.equal(MIN_REPLICATES_FOR_FRACTION, 20);
  assert.equal(fractionMeeting(verdicts.slice(0, 19).map((x) => x.meets)), null);
});
