/**
 * Reproducibility and safety properties (fast-check): counts never go negative,
 * and how replicates are split into chunks (hence threads) never changes any
 * replicate's results. Plus the event cap, extrinsic variation, burn-in and
 * event recording.
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import * as fc from "fast-check";
import { simulateChunk, reduceChunks, chunkLayout, templates, compileModel } from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { makeSpec, meanVar } from "./spec-helpers";

/** A random small circuit over species A, B, C with first- and second-order reactions. */
const circuitArb = fc
  .record({
    k: fc.array(fc.double({ min: 0.01, max: 5, noNaN: true }), { minLength: 7, maxLength: 7 }),
    init: fc.array(fc.integer({ min: 0, max: 30 }), { minLength: 3, maxLength: 3 }),
    K: fc.double({ min: 1, max: 40, noNaN: true }),
    n: fc.double({ min: 0.5, max: 4, noNaN: true }),
  })
  .map(({ k, init, K, n }) => ({
    name: "random",
    species: [
      { name: "A", initialCount: init[0] },
      { name: "B", initialCount: init[1] },
      { name: "C", initialCount: init[2] },
    ],
    signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
    reactions: [
      {
        name: "makeA",
        products: [{ species: "A" }],
        rate: { kind: "constant" as const, ratePerMinute: 5 * k[0] },
        scaledBy: "S",
      },
      {
        name: "dimer",
        reactants: [{ species: "A", count: 2 }],
        products: [{ species: "B" }],
        rate: { kind: "massAction" as const, ratePerMinute: 0.05 * k[1] },
      },
      {
        name: "bind",
        reactants: [{ species: "A" }, { species: "B" }],
        products: [{ species: "C" }],
        rate: { kind: "massAction" as const, ratePerMinute: 0.05 * k[2] },
      },
      {
        name: "split",
        reactants: [{ species: "C" }],
        products: [{ species: "A" }, { species: "B" }],
        rate: { kind: "massAction" as const, ratePerMinute: k[3] },
      },
      { name: "degB", reactants: [{ species: "B" }], rate: { kind: "massAction" as const, ratePerMinute: 0.2 * k[4] } },
      {
        name: "makeC",
        products: [{ species: "C", count: 2 }],
        rate: {
          kind: "regulated" as const,
          maxRatePerMinute: k[5],
          regulators: [{ source: "B", effect: "represses" as const, halfMax: K, hill: n }],
        },
      },
      { name: "degC", reactants: [{ species: "C" }], rate: { kind: "massAction" as const, ratePerMinute: 0.3 * k[6] } },
    ],
    outputSpecies: "C",
  }));

describe("properties", () => {
  test("counts never go negative (replaying every recorded event)", () => {
    fc.assert(
      fc.property(
        circuitArb,
        fc.string({ minLength: 1, maxLength: 8 }).filter((s) => /^[A-Za-z0-9]+$/.test(s)),
        (circuit, seed) => {
          const spec = makeSpec(circuit, {
            program: { kind: "periodic", start: 2, onDuration: 3, offDuration: 4 },
            endTimeMinutes: 20,
            gridStepMinutes: 0.5,
            replicates: 3,
            seed,
            recordEventsFor: 3,
          });
          const r = simulateChunk(spec, 0, 3);
          const model = compileModel(spec.circuit);
          for (const rec of r.recordedEvents!) {
            const x = Float64Array.from(rec.initial);
            for (let e = 0; e < rec.reactions.length; e++) {
              for (const d of model.reactions[rec.reactions[e]].delta) x[d.species] += d.change;
              for (let i = 0; i < x.length; i++) if (x[i] < 0) return false;
            }
          }
          for (const t of r.trajectories) for (const v of t.values) if (!(v >= 0)) return false;
          return true;
        },
      ),
      { numRuns: 40, seed: 7 },
    );
  });

  test("splitting replicates into chunks never changes results (so thread count cannot)", () => {
    fc.assert(
      fc.property(circuitArb, fc.integer({ min: 1, max: 7 }), (circuit, split) => {
        const spec = makeSpec(circuit, {
          program: { kind: "periodic", start: 2, onDuration: 3, offDuration: 4 },
          endTimeMinutes: 15,
          gridStepMinutes: 1,
          replicates: 8,
          seed: "split",
          extrinsic: [{ parameter: "rate(makeA)", cv: 0.3 }],
        });
        const whole = simulateChunk(spec, 0, 8, { keepAllGrid: true });
        const a = simulateChunk(spec, 0, split, { keepAllGrid: true });
        const b = simulateChunk(spec, split, 8 - split, { keepAllGrid: true });
        assert.deepEqual([...a.replicates, ...b.replicates], whole.replicates);
        assert.deepEqual([...a.pulses, ...b.pulses], whole.pulses);
        assert.deepEqual([...a.trajectories, ...b.trajectories], whole.trajectories);
        return true;
      }),
      { numRuns: 15, seed: 11 },
    );
  });
});

describe("run mechanics", () => {
  const tpl = templates["c1ffl-and"];
  const spec = (extra: Record<string, unknown> = {}) =>
    RunSpecSchema.parse({
      circuit: tpl.circuit,
      inputSignal: tpl.inputSignal,
      program: { kind: "periodic", start: 20, onDuration: 40, offDuration: 60 },
      endTimeMinutes: 300,
      gridStepMinutes: 1,
      replicates: 30,
      seed: "mech",
      ...extra,
    });

  test("same seed, same numbers; another seed, other numbers", () => {
    const a = simulateChunk(spec(), 0, 5);
    const b = simulateChunk(spec(), 0, 5);
    assert.deepEqual(a.replicates, b.replicates);
    assert.deepEqual(a.gridSum, b.gridSum);
    const c = simulateChunk(spec({ seed: "other" }), 0, 5);
    assert.notDeepEqual(a.gridSum, c.gridSum);
  });

  test("chunk layout depends only on the spec and reduceChunks matches a single-chunk reduction", () => {
    const s = spec({ replicates: 250 });
    const layout = chunkLayout(s);
    assert.deepEqual(
      layout.chunks.map((c) => c.count),
      [100, 100, 50],
    );
    const s2 = spec({ replicates: 12, endTimeMinutes: 50 });
    const parts = [simulateChunk(s2, 0, 5), simulateChunk(s2, 5, 7)];
    const one = simulateChunk(s2, 0, 12);
    const r = reduceChunks(s2, parts);
    const r1 = reduceChunks(s2, [one]);
    for (let i = 0; i < r.mean.length; i++) {
      assert.ok(Math.abs(r.mean[i] - r1.mean[i]) <= 1e-12 * Math.max(1, Math.abs(r1.mean[i])));
    }
  });

  test("event cap: stopped at cap, never finished; NaN grid after the stop", () => {
    const r = simulateChunk(spec({ eventCapPerReplicate: 500 }), 0, 2, { trajectoryReplicates: 2 });
    assert.equal(r.replicates.length, 2);
    for (const rep of r.replicates) {
      assert.equal(rep.capped, true);
      assert.equal(rep.events, 500);
      assert.ok(rep.endTime < 300);
    }
    const v = r.trajectories[0].values;
    assert.ok(Number.isNaN(v[300]));
    assert.ok(r.gridCount[300] === 0 && r.gridCount[0] === 2);
  });

  test("checkpoint returning false aborts the chunk", () => {
    let calls = 0;
    const r = simulateChunk(spec({ replicates: 30, endTimeMinutes: 20000 }), 0, 30, {
      checkpoint: () => ++calls < 2,
    });
    assert.equal(r.aborted, true);
    assert.ok(r.replicates.length < 30);
  });

  test("extrinsic factors: lognormal with mean 1 and the given CV (moments within 4 SE)", () => {
    // a set threshold: over a 1-minute run the output barely moves, so there is no default to derive
    const s = spec({
      replicates: 400,
      endTimeMinutes: 1,
      threshold: { value: 10 },
      extrinsic: [{ parameter: "rate(makeZ)", cv: 0.25 }],
    });
    const f = Float64Array.from(simulateChunk(s, 0, 400).replicates.map((r) => r.factors["rate(makeZ)"]));
    const m = meanVar(f);
    assert.ok(Math.abs(m.mean - 1) < (4 * 0.25) / Math.sqrt(400), `mean ${m.mean}`);
    const seVar = Math.sqrt((m.m4 - m.variance ** 2) / 400);
    assert.ok(Math.abs(m.variance - 0.0625) < 4 * seVar, `variance ${m.variance}`);
  });

  test("start from the OFF steady state: burn-in from the given counts with the input off", () => {
    const c = structuredClone(tpl.circuit);
    c.species[0].initialCount = 500;
    const s = spec({ circuit: c, start: "offSteadyState", burnInMinutes: 200, replicates: 3, endTimeMinutes: 10 });
    const r = simulateChunk(s, 0, 3);
    // X decays at 0.1/min with no production while off: after 200 min the expected count is 500 e^-20 ~ 1e-6
    for (const t of r.trajectories) assert.equal(t.values[0], 0);
  });

  test("recorded events replay to the grid values", () => {
    const s = spec({ replicates: 1, recordEventsFor: 1, endTimeMinutes: 100 });
    const r = simulateChunk(s, 0, 1);
    const rec = r.recordedEvents![0];
    assert.equal(rec.times.length, r.events);
    const model = compileModel(s.circuit);
    const x = Float64Array.from(rec.initial);
    for (let e = 0; e < rec.reactions.length; e++)
      for (const d of model.reactions[rec.reactions[e]].delta) x[d.species] += d.change;
    const ng = 101;
    for (let i = 0; i < 3; i++) assert.equal(x[i], r.trajectories[0].values[i * ng + ng - 1]);
  });

  test("random program: one shared realisation by default, one per replicate on request (chunk-independent)", () => {
    const program = {
      kind: "random",
      start: 0,
      meanInterval: 20,
      durations: { dist: "exponential", mean: 3 },
      seed: "spikes",
    };
    const shared = simulateChunk(spec({ program, replicates: 3 }), 0, 3);
    const ons = (r: typeof shared, rep: number) => r.pulses.filter((p) => p.replicate === rep).map((p) => p.on);
    assert.deepEqual(ons(shared, 0), ons(shared, 2));
    const per = spec({ program: { ...program, perReplicate: true }, replicates: 3 });
    const all = simulateChunk(per, 0, 3);
    assert.notDeepEqual(ons(all, 0), ons(all, 2));
    assert.deepEqual(ons(simulateChunk(per, 2, 1), 2), ons(all, 2));
  });
});
