/**
 * A chunk simulated in parts and merged (sim/engine/chunk-parts.ts) equals the chunk simulated whole, bit for
 * bit: replicate summaries, pulse records, grid sums, squares and counts, trajectories, recorded events, the
 * event cap and an abort. Checked on the benchmark circuit, a circuit with a rule, an event and extrinsic
 * variation, and every split of a chunk the dispatch can choose, plus uneven ones; and a circuit whose sums
 * of squares round (so their grouping matters) is refused by the merge, never merged wrongly.
 */
import { describe, test } from "node:test";
import assert from "node:assert/strict";
import { simulateChunk, templates, type ChunkResult } from "@/sim";
import {
  chunkParts,
  concatPackedPulses,
  gridExactBound,
  mergeChunkParts,
  partsPerChunk,
} from "@/sim/engine/chunk-parts";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import { RunSpecSchema, type RunSpec, type RunSpecInput } from "@/shared/schemas/run-spec";
import type { CircuitInput } from "@/shared/schemas/circuit";
import { benchmark, digest } from "@/tests/helpers/kernel-cases";

const spec = (over: Partial<RunSpecInput>): RunSpec => RunSpecSchema.parse({ ...benchmark, ...over });

/**
 * Grid sums that round: "big" holds about 2^25 molecules, so its squares (about 2^50, odd ones with every bit set) summed over a few
 * replicates pass 2^53 and the additions round, making the sums depend on their order (species counts are
 * whole numbers, so smaller sums are exact in any order). Also a rule and an event with a rounded amount.
 */
const circuitWith = (big: boolean): CircuitInput => ({
  name: "large-counts",
  outputSpecies: "R",
  species: [
    { name: "X", initialCount: 0 },
    { name: "R", initialCount: 0 },
    { name: "half", initialCount: 0 },
    ...(big ? [{ name: "big", initialCount: 33_554_431 }] : []),
  ],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  parameters: [{ name: "k", value: 10 }],
  reactions: [
    { name: "make", products: [{ species: "X" }], rate: { kind: "expression", formula: "k * (0.1 + S)" } },
    { name: "deg", reactants: [{ species: "X" }], rate: { kind: "massAction", ratePerMinute: 0.1 } },
    { name: "report", products: [{ species: "R" }], rate: { kind: "expression", formula: "0.3 * X" } },
    { name: "degR", reactants: [{ species: "R" }], rate: { kind: "massAction", ratePerMinute: 0.07 } },
    ...(big
      ? [
          {
            name: "loseBig",
            reactants: [{ species: "big" }],
            rate: { kind: "massAction" as const, ratePerMinute: 1e-9 },
          },
        ]
      : []),
  ],
  rules: [{ target: "half", value: "R / 2 + 1 / 3" }],
  events: [{ name: "dilute", at: [90], assign: [{ target: "X", value: "X * 0.37" }] }],
});

const vatSpec = (big: boolean, over: Partial<RunSpecInput> = {}) =>
  spec({
    circuit: circuitWith(big),
    inputSignal: "S",
    program: { kind: "periodic", start: 20, onDuration: 30, offDuration: 40 },
    endTimeMinutes: 200,
    gridStepMinutes: 1,
    threshold: { value: 20, windowMinutes: 20 },
    replicates: 1000,
    seed: "parts-2",
    extrinsic: [{ parameter: "param(k)", cv: 0.3 }],
    recordEventsFor: 3,
    ...over,
  });

function inParts(s: RunSpec, start: number, counts: number[], opts: Parameters<typeof simulateChunk>[3] = {}) {
  const parts: ChunkResult[] = [];
  let at = start;
  for (const c of counts) {
    parts.push(simulateChunk(s, at, c, { ...opts, gridExactBound: gridExactBound(counts.length) }));
    at += c;
  }
  return parts;
}

describe("chunk parts", () => {
  const cases: [string, RunSpec, Parameters<typeof simulateChunk>[3]][] = [
    ["benchmark circuit", spec({ replicates: 1000, seed: "parts-1" }), {}],
    ["a rule, an event, extrinsic variation, recorded events", vatSpec(false), { trajectoryReplicates: 14 }],
    ["event cap", spec({ replicates: 1000, seed: "parts-3", eventCapPerReplicate: 20_000 }), { keepAllGrid: true }],
  ];
  for (const [name, s, opts] of cases)
    test(`${name}: merged parts equal the whole chunk`, () => {
      const whole = simulateChunk(s, 0, 40, opts);
      assert.equal(whole.gridExact, undefined);
      for (const counts of [[40], [20, 20], [14, 13, 13], [10, 10, 10, 10], [1, 38, 1], [39, 1]]) {
        const merged = mergeChunkParts(inParts(s, 0, counts, opts));
        assert.ok(merged, `split ${counts.join("+")}: exact`);
        assert.deepEqual(merged, whole, `split ${counts.join("+")}`);
        assert.equal(digest(merged), digest(whole));
      }
    });

  test("sums that round are refused, never merged: adding the parts' sums would differ from the whole chunk", () => {
    const s = vatSpec(true);
    const whole = simulateChunk(s, 0, 40);
    let differs = false;
    for (const counts of [
      [20, 20],
      [14, 13, 13],
      [10, 10, 10, 10],
    ]) {
      const parts = inParts(s, 0, counts);
      assert.ok(parts.some((p) => p.gridExact === false));
      assert.equal(mergeChunkParts(parts), null);
      const naive = new Float64Array(whole.gridSumSq.length);
      for (const p of parts) for (let i = 0; i < naive.length; i++) naive[i] += p.gridSumSq[i];
      for (let i = 0; i < naive.length; i++) if (!Object.is(naive[i], whole.gridSumSq[i])) differs = true;
    }
    assert.ok(differs, "this case must exercise grouping-dependent rounding, or it proves nothing");
    // the refusal comes from the bound: the same whole numbers under a bound above their sums are exact
    assert.equal(simulateChunk(s, 0, 2, { gridExactBound: 2 ** 60 }).gridExact, true);
  });

  test("an aborted part ends the merged chunk there, as simulateChunk stops at the aborted replicate", () => {
    // long replicates, so the checkpoint (every 65,536 events) is reached
    const tpl = templates["c1ffl-and"];
    const s = spec({
      circuit: tpl.circuit,
      inputSignal: tpl.inputSignal,
      program: { kind: "periodic", start: 20, onDuration: 30, offDuration: 60 },
      replicates: 100,
      seed: "parts-4",
      endTimeMinutes: 100_000,
      gridStepMinutes: 1000,
    });
    const parts = inParts(s, 0, [2, 2, 2]);
    let calls = 0;
    const aborted = simulateChunk(s, 2, 2, { gridExactBound: gridExactBound(3), checkpoint: () => ++calls < 3 });
    assert.equal(aborted.aborted, true);
    const merged = mergeChunkParts([parts[0], aborted, parts[2]])!;
    assert.equal(merged.aborted, true);
    assert.deepEqual(
      merged.replicates.map((r) => r.replicate),
      [...parts[0].replicates, ...aborted.replicates].map((r) => r.replicate),
    );
    assert.equal(merged.events, parts[0].events + aborted.events);
  });

  test("packed pulse columns concatenate to the whole chunk's packing", () => {
    const s = spec({ replicates: 100, seed: "parts-5" });
    const parts = inParts(s, 0, [7, 8, 9]);
    assert.deepEqual(
      concatPackedPulses(parts.map((p) => packPulseStats(p.pulses))),
      packPulseStats(simulateChunk(s, 0, 24).pulses),
    );
  });

  test("splits cover the chunk, contiguous, sizes within one", () => {
    for (const [count, parts] of [
      [100, 1],
      [100, 3],
      [7, 4],
      [3, 5],
      [1, 2],
    ]) {
      const p = chunkParts(300, count, parts);
      assert.equal(p[0].replicateStart, 300);
      for (let i = 1; i < p.length; i++) assert.equal(p[i].replicateStart, p[i - 1].replicateStart + p[i - 1].count);
      assert.equal(
        p.reduce((s, x) => s + x.count, 0),
        count,
      );
      assert.ok(Math.max(...p.map((x) => x.count)) - Math.min(...p.map((x) => x.count)) <= 1);
      assert.ok(p.every((x) => x.count > 0));
    }
  });

  test("parts only for small runs on several threads", () => {
    assert.equal(partsPerChunk(1000, 100, 1), 1);
    assert.equal(partsPerChunk(1000, 100, 2), 2);
    assert.equal(partsPerChunk(500, 100, 2), 4);
    assert.equal(partsPerChunk(10_000, 100, 2), 1);
    assert.equal(partsPerChunk(230, 30, 2), 3);
    assert.equal(partsPerChunk(15, 15, 2), 1);
  });
});
