/**
 * Scheduled and triggered events in the direct method, tau-leaping and the
 * ODE: exact times, grid values after the event, rising edges, the firing
 * order at one instant, parameter assignments, burn-in, and the checks.
 */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { makeSpec } from "./spec-helpers";
import { simulateChunk, solveOde } from "@/sim";
import { validateCircuit } from "@/sim/circuit/validate-circuit";
import { risingTimes } from "@/sim/circuit/compile-events";
import { parseExpression } from "@/sim/circuit/expression";
import type { CircuitInput } from "@/shared/schemas/circuit";

const base = (events: CircuitInput["events"], over: Partial<CircuitInput> = {}): CircuitInput => ({
  name: "vat reporter",
  species: [{ name: "X", initialCount: 0 }],
  parameters: [{ name: "k", value: 10 }],
  reactions: [
    { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "k" } },
    { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
  ],
  outputSpecies: "X",
  events,
  ...over,
});

function moments(r: ReturnType<typeof simulateChunk>) {
  const ng = r.gridCount.length;
  return Array.from({ length: ng }, (_, g) => {
    const n = r.gridCount[g];
    const m = r.gridSum[g] / n;
    return { mean: m, variance: (r.gridSumSq[g] - n * m * m) / (n - 1) };
  });
}

/** Mean of X for k = 10, g = 0.1 from X(t0) = x0 (linear rate equation, exact). */
const relax = (x0: number, dt: number) => 100 + (x0 - 100) * Math.exp(-0.1 * dt);

describe("scheduled events", () => {
  const spec = makeSpec(base([{ name: "flush", at: [20], assign: [{ target: "X", value: "0" }] }]), {
    endTimeMinutes: 30,
    gridStepMinutes: 10,
    replicates: 1000,
    seed: "flush",
  });

  test("the grid value at the event time is the value after the event, in every replicate and in the ODE", () => {
    const m = moments(simulateChunk(spec, 0, 1000));
    assert.deepEqual([m[2].mean, m[2].variance], [0, 0]);
    assert.ok(m[1].mean > 50, "before the event the reporter has risen");
    const ode = solveOde(spec);
    assert.equal(ode.values[2], 0);
    // after the event the rate equation restarts from 0 (exact linear solution)
    assert.ok(Math.abs(ode.values[3] - relax(0, 10)) < 1e-6);
    assert.ok(Math.abs(ode.values[1] - relax(0, 10)) < 1e-6);
  });

  test("tau-leaping stops at the event too", () => {
    const m = moments(simulateChunk({ ...spec, method: "tauLeap" }, 0, 1000));
    assert.deepEqual([m[2].mean, m[2].variance], [0, 0]);
  });

  test("events at one instant fire in the circuit's order, each from the state its predecessors left", () => {
    const s = makeSpec(
      base(
        [
          { name: "fill", at: [5], assign: [{ target: "X", value: "5" }] },
          { name: "double", at: [5], assign: [{ target: "X", value: "X * 2" }] },
        ],
        { reactions: [{ name: "idle", products: [{ species: "X" }], rate: { kind: "constant", ratePerMinute: 0 } }] },
      ),
      { endTimeMinutes: 10, gridStepMinutes: 5, replicates: 3 },
    );
    assert.deepEqual(
      moments(simulateChunk(s, 0, 3)).map((q) => q.mean),
      [0, 10, 10],
    );
    assert.deepEqual(Array.from(solveOde(s).values), [0, 10, 10]);
  });

  test("a parameter assignment on a time condition: after t = 10 nothing is made, so X(20) is Poisson with mean X(10) e^-1 (Jahnke & Huisinga 2007, J Math Biol 54:1)", () => {
    const N = 2000;
    const s = makeSpec(base([{ name: "shutoff", when: "time >= 10", assign: [{ target: "k", value: "0" }] }]), {
      endTimeMinutes: 20,
      gridStepMinutes: 10,
      replicates: N,
      seed: "shutoff",
    });
    const mu = relax(0, 10) * Math.exp(-1);
    const m = moments(simulateChunk(s, 0, N));
    assert.ok(Math.abs(m[2].mean - mu) < 4.5 * Math.sqrt(mu / N), `mean ${m[2].mean} vs ${mu}`);
    assert.ok(Math.abs(m[2].variance - mu) < 4.5 * Math.sqrt((mu + 2 * mu * mu) / N), `variance ${m[2].variance}`);
    assert.ok(Math.abs(solveOde(s).values[2] - mu) < 1e-6);
  });

  test("time conditions become the times at which they rise", () => {
    const times = (text: string) => {
      const r = parseExpression(text, { species: new Set(), signals: new Set(), params: new Set() }, "bool");
      assert.ok(r.ok);
      return risingTimes(r.tree);
    };
    assert.deepEqual(times("time >= 15"), [15]);
    assert.deepEqual(times("time > 15"), [15]);
    assert.deepEqual(times("(time >= 10 and time < 20) or time >= 30"), [10, 30]);
    assert.deepEqual(times("time < 5"), [], "true from the start: never rises");
    assert.deepEqual(times("time >= 0"), [], "true at the start does not fire");
  });
});

describe("triggered events (species conditions)", () => {
  const spec = makeSpec(base([{ name: "harvest", when: "X >= 50", assign: [{ target: "X", value: "0" }] }]), {
    endTimeMinutes: 30,
    gridStepMinutes: 1,
    replicates: 300,
    seed: "harvest",
  });

  test("the condition is checked after every firing: X never shows 50 or more on the grid", () => {
    const r = simulateChunk(spec, 0, 300, { keepAllGrid: true });
    const all = r.trajectories.flatMap((t) => Array.from(t.values));
    assert.equal(Math.max(...all), 49);
    assert.ok(all.filter((v) => v < 10).length > all.length / 10, "resets happen");
  });

  test("the ODE locates the crossing: X reaches 50 at t* = 10 ln 2 and restarts from 0 (exact linear solution)", () => {
    const ode = solveOde(spec);
    const tStar = 10 * Math.log(2);
    for (const t of [3, 6, 10, 13, 20]) {
      const phase = t % tStar; // the cycle repeats every t*
      assert.ok(Math.abs(ode.values[t] - relax(0, phase)) < 1e-5, `t = ${t}: ${ode.values[t]} vs ${relax(0, phase)}`);
    }
  });

  test("a condition already true at the start fires only after it falls and rises again; none fire during a burn-in", () => {
    const s = makeSpec(
      base([{ name: "mark", when: "X >= 5", assign: [{ target: "k", value: "k + 1" }] }], {
        species: [{ name: "X", initialCount: 100 }],
      }),
      {
        endTimeMinutes: 5,
        gridStepMinutes: 5,
        replicates: 50,
        seed: "start",
        start: "offSteadyState",
        burnInMinutes: 50,
      },
    );
    // X stays near 100 (far above 5): k is never raised, so the mean stays at k/g = 100
    const m = moments(simulateChunk(s, 0, 50));
    assert.ok(Math.abs(m[1].mean - 100) < 4.5 * Math.sqrt(100 / 50), `mean ${m[1].mean}`);
  });

  test("an assignment that would make an amount negative stops the run with the event, value and time", () => {
    const s = makeSpec(base([{ name: "drain", at: [1], assign: [{ target: "X", value: "X - 1000" }] }]), {
      endTimeMinutes: 5,
    });
    assert.throws(() => simulateChunk(s, 0, 1), /replicate 0: event "drain" at t = 1 min: X would be -\d+/);
  });
});

describe("event checks", () => {
  test("errors name the event and the field", () => {
    const c = base([
      { name: "e1", at: [5], assign: [{ target: "S", value: "1" }] },
      { name: "e1", when: "X > 3 and time > 4", assign: [{ target: "X", value: "time" }] },
      { name: "e3", when: "S > 1", assign: [{ target: "Q", value: "X +" }] },
    ] as any);
    (c as any).signals = [{ name: "S" }];
    const r = validateCircuit(c);
    assert.equal(r.ok, false);
    const msgs = r.ok ? "" : r.errors.map((e) => `${e.path}: ${e.message}`).join("\n");
    assert.match(
      msgs,
      /events\[0\]\.assign\[0\]\.target: events\[0\] "e1": assignment target "S" is not a species or parameter \(signals are set by the input program\)/,
    );
    assert.match(msgs, /events\[1\] "e1": duplicate event name/);
    assert.match(msgs, /events\[1\]\.when: .*mixes time with species/);
    assert.match(msgs, /events\[1\]\.assign\[0\]\.value: .*value of X at position 1: time is not allowed here/);
    assert.match(msgs, /events\[2\]\.when: .*reads signal "S"/);
    assert.match(msgs, /events\[2\]\.assign\[0\]\.target: .*"Q" is not a species or parameter/);
    const both = validateCircuit(base([{ name: "e", at: [1], when: "X > 1", assign: [{ target: "X", value: "0" }] }]));
    assert.equal(both.ok, false);
    assert.match(both.ok ? "" : both.errors[0].message, /either at \(times\) or when/);
  });
});

describe("assignment rules", () => {
  test("a rule target follows its value after every firing, in the direct method, tau-leaping and the ODE", () => {
    const c = base([], {
      species: [
        { name: "X", initialCount: 0 },
        { name: "twice", initialCount: 0 },
      ],
      rules: [{ target: "twice", value: "2 * X + 1" }],
    });
    delete (c as { events?: unknown }).events;
    const s = makeSpec(c, { endTimeMinutes: 20, gridStepMinutes: 1, replicates: 50, seed: "rule" });
    for (const method of ["direct", "tauLeap"] as const) {
      const r = simulateChunk({ ...s, method }, 0, 50, { keepAllGrid: true });
      const ng = r.gridCount.length;
      for (const tr of r.trajectories)
        for (let g = 0; g < ng; g++) assert.equal(tr.values[ng + g], 2 * tr.values[g] + 1, `${method} grid ${g}`);
    }
    const ode = solveOde(s);
    const ng = ode.times.length;
    for (let g = 0; g < ng; g++) assert.ok(Math.abs(ode.values[ng + g] - (2 * ode.values[g] + 1)) < 1e-9);
    assert.ok(Math.abs(ode.values[ng - 1] - relax(0, 20)) < 1e-6, "the rule does not disturb the dynamics");
  });

  test("rule checks: a target changed by a reaction, or read before its rule, is refused", () => {
    const c = base([], {
      species: [
        { name: "X", initialCount: 0 },
        { name: "Y", initialCount: 0 },
      ],
      rules: [
        { target: "X", value: "1" },
        { target: "Y", value: "Y + 1" },
      ],
    });
    const r = validateCircuit(c);
    const msgs = r.ok ? "" : r.errors.map((e) => e.message).join("\n");
    assert.match(msgs, /rules\[0\] "X": "X" is changed by a reaction/);
    assert.match(msgs, /rules\[1\] "Y": value reads "Y", its own target/);
  });
});
