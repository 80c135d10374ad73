import { test, describe } from "node:test";
import assert from "node:assert/strict";
import {
  summarizeFigures,
  figureDistances,
  passDistance,
  matchPoints,
  acceptCount,
  type CandidatePoint,
} from "@/sim/traces/match";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { assertCloseTo } from "@/tests/helpers/close-to";

function rec(
  durationBin: number,
  passed: boolean,
  delay: number | null,
  widths: number[] = [],
  excluded = false,
): PulseStat {
  return {
    replicate: 0,
    pulseIndex: 0,
    on: 0,
    off: durationBin,
    durationBin,
    excluded,
    passed,
    delay,
    offDelay: null,
    widths,
    peak: 0,
    timeToPeak: 0,
    fwhm: null,
    baseline: 0,
  };
}

describe("distances", () => {
  test("pass distance: weighted by the observed share per shared duration bin; excluded pulses left out", () => {
    const obs = summarizeFigures([
      rec(10, true, 1),
      rec(10, false, null),
      rec(60, true, 2),
      rec(60, true, 2),
      rec(60, true, 3, [], true),
    ]);
    // obs: bin 10 -> 1/2, bin 60 -> 2/2 ; sim: bin 10 -> 0/2, bin 60.5 (same bin within 0.5 min) -> 1/2
    const sim = summarizeFigures([
      rec(10, false, null),
      rec(10, false, null),
      rec(60.5, true, 2),
      rec(60.5, false, null),
    ]);
    assert.equal(obs.pulses, 4);
    assertCloseTo(passDistance(obs, sim), (2 * 0.5 + 2 * 0.5) / 4, { abs: 1e-12 });
  });

  test("pass distance falls back to pooled rates when no bin is shared", () => {
    const obs = summarizeFigures([rec(10, true, 1), rec(10, false, null)]);
    const sim = summarizeFigures([rec(30, true, 1), rec(30, true, 1), rec(30, true, 1), rec(30, false, null)]);
    assertCloseTo(passDistance(obs, sim), 0.25, { abs: 1e-12 });
  });

  test("delays compared among passed pulses only; KS D and W1 from sim/stats; combined = pass + delay KS + width KS", () => {
    const obs = summarizeFigures([rec(10, true, 1, [5]), rec(10, true, 2, [6]), rec(10, false, null)]);
    const sim = summarizeFigures([rec(10, true, 3, [5]), rec(10, true, 4, [6]), rec(10, false, null)]);
    const d = figureDistances(obs, sim);
    assert.equal(d.pass, 0);
    assert.equal(d.delayKs, 1, "disjoint samples: D = 1");
    assert.equal(d.delayW1Minutes, 2, "shift by 2 min: W1 = 2");
    assert.equal(d.widthKs, 0);
    assert.equal(d.widthW1Minutes, 0);
    assert.equal(d.combined, 1);
  });

  test("an empty sample: KS 0 when both are empty, 1 when only one is; W1 null", () => {
    const none = summarizeFigures([rec(10, false, null)]);
    const some = summarizeFigures([rec(10, true, 2, [4])]);
    assert.equal(figureDistances(none, none).delayKs, 0);
    const d = figureDistances(none, some);
    assert.equal(d.delayKs, 1);
    assert.equal(d.widthKs, 1);
    assert.equal(d.delayW1Minutes, null);
    assert.equal(d.pass, 1);
  });
});

describe("ABC rejection", () => {
  const obs = summarizeFigures([rec(10, true, 5, [10]), rec(10, true, 6, [11])]);
  const point = (i: number, delayShift: number): CandidatePoint => ({
    runId: `r${i}`,
    sweepPoint: i,
    parameters: { k: i },
    figures: summarizeFigures([rec(10, true, 5 + delayShift, [10]), rec(10, true, 6 + delayShift, [11])]),
  });

  test("accept count: ceil(fraction x N), at least 1", () => {
    assert.equal(acceptCount(0.05, 40), 2);
    assert.equal(acceptCount(0.05, 20), 1);
    assert.equal(acceptCount(0.05, 10), 1);
    assert.equal(acceptCount(0.1, 30), 3);
  });

  test("ranks by combined distance, ties broken by W1 then point order; accepts the closest fraction; ranges", () => {
    // shifts 0.5 and -0.5 give the same KS D (0.5) but W1 0.5; shift 0 gives 0
    const cands = [point(0, 3), point(1, 0.5), point(2, 0), point(3, -0.5), point(4, 10)];
    const m = matchPoints(obs, cands, { kind: "fraction", fraction: 0.5 }, ["k"]);
    assert.deepEqual(
      m.points.map((p) => p.runId),
      ["r2", "r1", "r3", "r0", "r4"],
    );
    assert.equal(m.acceptedCount, 3);
    assert.deepEqual(
      m.points.map((p) => p.accepted),
      [true, true, true, false, false],
    );
    assert.deepEqual(m.ranges, [{ parameter: "k", acceptedMin: 1, acceptedMax: 3, sweptMin: 0, sweptMax: 4 }]);
    assert.equal(m.acceptDistance, m.points[2].distances.combined);
    assert.deepEqual(m.bestSimulated?.delays, [5, 6]);
  });

  test("distance tolerance accepts every point at or below it", () => {
    const m = matchPoints(obs, [point(0, 3), point(1, 0.5), point(2, 0)], { kind: "distance", distance: 0.5 });
    assert.deepEqual(
      m.points.filter((p) => p.accepted).map((p) => p.runId),
      ["r2", "r1"],
    );
    const none = matchPoints(obs, [], { kind: "fraction", fraction: 0.05 });
    assert.equal(none.acceptedCount, 0);
    assert.equal(none.acceptDistance, null);
  });
});
