/**
 * Deterministic-only regime maps and their adaptive refinement
 * (sim/regimes/deterministic-map.ts, refine-map.ts), in counts with system size 100.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { deterministicRegimeMap } from "@/sim/regimes/deterministic-map";
import { MAX_REFINEMENT_POINTS, isLogAxis, refinementPoints, refinementSeed } from "@/sim/regimes/refine-map";
import { assertCloseTo } from "@/tests/helpers/close-to";
import { goodwin, mutualRepression } from "./circuits";

test("a map over the Goodwin loop's Hill exponent at a = 100: sustained only at n = 9 of 2, 4, 8, 9 (secant condition: Tyson & Othmer 1978, Prog Theor Biol 5:1; Thron 1991, Bull Math Biol 53:383)", () => {
  const m = deterministicRegimeMap({
    circuit: goodwin(100, 2),
    systemSize: 100,
    axes: [{ parameter: "n(make_x,z)", values: [2, 4, 8, 9] }],
  });
  assert.deepEqual(
    m.labels.map((l) => l === "sustained oscillation"),
    [false, false, false, true],
  );
  assert.deepEqual(m.points[3], { "n(make_x,z)": 9 });
});

test("a two-parameter map of mutual repression: the symmetric points are bistable exactly for a > 2 (Cherry & Adler 2000, J Theor Biol 203:117)", () => {
  const m = deterministicRegimeMap({
    circuit: mutualRepression(1),
    systemSize: 100,
    axes: [
      { parameter: "rate(make_u)", values: [1, 4] },
      { parameter: "rate(make_v)", values: [1, 4] },
    ],
  });
  // point order i * columns + j: (1,1) (1,4) (4,1) (4,4)
  assert.notEqual(m.labels[0], "memory");
  assert.equal(m.labels[3], "memory");
});

test("refinement: midpoints between differing neighbours, geometric on a log axis, resumable and capped", () => {
  const axes = [
    { parameter: "a", values: [1, 10, 100] },
    { parameter: "b", values: [0, 1, 2] },
  ];
  assert.ok(isLogAxis(axes[0].values));
  assert.ok(!isLogAxis(axes[1].values));
  // labels by row (a): x x y / x y y / x y y
  const labels = ["x", "x", "y", "x", "y", "y", "x", "y", "y"];
  const pts = refinementPoints({ axes, labels });
  // right neighbours differ at (0,1)-(0,2), (1,0)-(1,1), (2,0)-(2,1); below at (0,1)-(1,1)
  assert.equal(pts.length, 4);
  assert.deepEqual(pts[0], { a: 1, b: 1.5 });
  const below = pts.find((p) => p.b === 1 && p.a !== 1)!;
  assertCloseTo(below.a, Math.sqrt(10), { rel: 1e-12 }, "geometric midpoint of 1 and 10");
  // resumable: the points already added are not proposed again
  assert.deepEqual(refinementPoints({ axes, labels, existing: pts }), []);
  assert.equal(refinementPoints({ axes, labels, existing: pts.slice(0, 1) }).length, 3);
  // capped
  assert.equal(refinementPoints({ axes, labels, cap: 2 }).length, 2);
  assert.equal(MAX_REFINEMENT_POINTS, 200);
  // the seed depends on the coordinates only
  assert.equal(refinementSeed("s", { a: 1, b: 1.5 }), refinementSeed("s", { a: 1, b: 1.5 }));
  assert.notEqual(refinementSeed("s", { a: 1, b: 1.5 }), refinementSeed("s", { a: 1, b: 1.6 }));
  assert.match(refinementSeed("s", { a: 1 }), /^s\.r[0-9a-f]{8}$/);
});
