import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { prepareCells, resolveScale, typicalFrameInterval, segmentsOf, movingAverage } from "@/sim/traces/preprocess";
import { assertCloseTo } from "@/tests/helpers/close-to";

const f = (xs: number[]) => Float64Array.from(xs);
const none = { background: { mode: "none" as const }, smoothing: { mode: "none" as const }, gapFactor: 1.5 };

describe("gaps", () => {
  test("typical frame interval is the median spacing over all cells", () => {
    assert.equal(
      typicalFrameInterval([
        { cell: "a", times: [0, 2, 4, 10], values: [0, 0, 0, 0] },
        { cell: "b", times: [1, 3], values: [0, 0] },
      ]),
      2,
    );
  });

  test("a spacing above gapFactor x frame interval gets a NaN marker, so it is never interpolated across", () => {
    const set = prepareCells([{ cell: "a", times: f([0, 1, 2, 5, 6, 7]), values: f([1, 2, 3, 4, 5, 6]) }], null, none);
    const c = set.cells[0];
    assert.equal(set.frameIntervalMinutes, 1);
    assert.equal(c.gaps, 1);
    assert.equal(c.points, 6);
    assert.deepEqual([...c.times], [0, 1, 2, 3.5, 5, 6, 7]);
    assert.ok(Number.isNaN(c.values[3]));
    assert.deepEqual(
      [...c.values].filter((v) => v === v),
      [1, 2, 3, 4, 5, 6],
    );
  });

  test("segments split at gaps", () => {
    assert.deepEqual(segmentsOf([0, 1, 2, 5, 6, 20], 1.5), [
      [0, 3],
      [3, 5],
      [5, 6],
    ]);
  });
});

describe("smoothing", () => {
  test("centred moving average, truncated at segment ends", () => {
    const out = new Float64Array(5);
    movingAverage([1, 2, 3, 4, 10], 0, 5, 3, out);
    assert.deepEqual([...out], [1.5, 2, 3, 17 / 3, 7]);
  });

  test("never averages across a gap", () => {
    const set = prepareCells([{ cell: "a", times: f([0, 1, 2, 10, 11, 12]), values: f([0, 0, 0, 90, 90, 90]) }], null, {
      ...none,
      smoothing: { mode: "movingAverage", widthFrames: 3 },
    });
    assert.deepEqual(
      [...set.cells[0].values].filter((v) => v === v),
      [0, 0, 0, 90, 90, 90],
    );
  });
});

describe("background", () => {
  test("preInput: per-cell median before the first pulse; a cell without such frames takes the median of the others", () => {
    const cells = [
      { cell: "a", times: f([0, 1, 2, 3, 4]), values: f([10, 12, 11, 50, 60]) },
      { cell: "b", times: f([0, 1, 2, 3, 4]), values: f([20, 22, 21, 50, 60]) },
      { cell: "c", times: f([5, 6, 7]), values: f([70, 70, 70]) },
    ];
    const set = prepareCells(cells, 3, { ...none, background: { mode: "preInput" } });
    assert.deepEqual(
      set.cells.map((c) => c.background),
      [11, 21, 16],
    );
  });

  test("entered value and none", () => {
    const cells = [{ cell: "a", times: f([0, 1, 2]), values: f([1, 2, 3]) }];
    assert.equal(prepareCells(cells, 1, { ...none, background: { mode: "value", value: 7 } }).cells[0].background, 7);
    assert.equal(prepareCells(cells, 1, none).cells[0].background, 0);
  });
});

describe("scale", () => {
  test("entered scale is used as given", () => {
    assert.equal(resolveScale({ mode: "entered", unitsPerMolecule: 3 }, [], []).unitsPerMolecule, 3);
  });

  test("fitPlateau: median plateau above background over the second half of long pulses / ON steady state", () => {
    // background 100, 2 units per molecule, ON steady state 50 molecules -> plateau 100 units; second half of [10, 50) is [30, 50)
    const times: number[] = [];
    const values: number[] = [];
    for (let t = 0; t <= 60; t++) {
      times.push(t);
      values.push(t < 10 ? 100 : t < 50 ? 100 + 100 * (1 - Math.exp(-(t - 10) / 2)) : 100);
    }
    const set = prepareCells([{ cell: "a", times: f(times), values: f(values) }], 10, {
      ...none,
      background: { mode: "value", value: 100 },
    });
    const s = resolveScale({ mode: "fitPlateau", onSteadyStateMolecules: 50, minPulseMinutes: 30 }, set.cells, [
      { on: 10, off: 50 },
    ]);
    // by t = 30 the rise is within e^-10 of its plateau
    assertCloseTo(s.unitsPerMolecule, 2, { rel: 1e-4 });
    assert.match(s.note, /fitted from the plateau of 1 pulse/);
  });

  test("fitPlateau refuses without a long enough pulse", () => {
    assert.throws(
      () =>
        resolveScale({ mode: "fitPlateau", onSteadyStateMolecules: 50, minPulseMinutes: 30 }, [], [{ on: 0, off: 5 }]),
      /at least 30 min/,
    );
  });
});
