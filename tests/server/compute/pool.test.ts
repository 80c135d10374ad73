/** The piscina pool gives the same chunk results as the engine in-process, for 1 and 2 threads, and enforces the wall-time cap. */
import { test, describe, after } from "node:test";
import assert from "node:assert/strict";
import { createSimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { reduceChunks, simulateChunk, templates, type ChunkResult } from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";

const tpl = templates["c1ffl-and"];
const spec = RunSpecSchema.parse({
  circuit: tpl.circuit,
  inputSignal: tpl.inputSignal,
  program: { kind: "periodic", start: 20, onDuration: 30, offDuration: 60 },
  endTimeMinutes: 400,
  gridStepMinutes: 2,
  replicates: 230,
  seed: "pool",
});

describe("sim pool", () => {
  const pools = [createSimPool({ threads: 1 }), createSimPool({ threads: 2 })];
  after(async () => {
    for (const p of pools) await p.destroy();
  });

  test("results do not depend on the thread count (reduced in chunk order)", async () => {
    const collect = async (pool: (typeof pools)[number] | null) => {
      const chunks: ChunkResult[] = [];
      await runAllChunks(spec, { pool, onChunk: (c) => void chunks.push(c) });
      return chunks;
    };
    const inProcess = await collect(null);
    for (const pool of pools) {
      const got = await collect(pool);
      assert.equal(got.length, 3);
      assert.deepEqual(
        got.map((c) => c.replicates),
        inProcess.map((c) => c.replicates),
      );
      assert.deepEqual(
        got.map((c) => c.pulses),
        inProcess.map((c) => c.pulses),
      );
      // on 2 threads this small run's chunks go out in parts (pool.ts), merged exactly
      assert.deepEqual(
        got.map((c) => [c.gridSum, c.gridSumSq, c.gridCount, c.trajectories, c.events]),
        inProcess.map((c) => [c.gridSum, c.gridSumSq, c.gridCount, c.trajectories, c.events]),
      );
      const a = reduceChunks(spec, got);
      const b = reduceChunks(spec, inProcess);
      assert.deepEqual(a.mean, b.mean);
      assert.deepEqual(a.sd, b.sd);
    }
  });

  test("on 2 threads a small run's chunk runs in parts on both threads and merges into the whole chunk", async () => {
    const r = await pools[1].runChunk({ spec, replicateStart: 0, count: 100, trace: true });
    assert.ok((r.trace ?? []).length > 1, "the chunk went out in parts");
    const { trace, ...rest } = r;
    void trace;
    assert.deepEqual(rest, simulateChunk(spec, 0, 100));
    const one = await pools[0].runChunk({ spec, replicateStart: 0, count: 100, trace: true });
    assert.equal(one.trace?.length, 1, "one thread: no parts");
  });

  test("a chunk whose grid sums would round in parts runs whole, with the whole chunk's result", async () => {
    // about 2^25 molecules: sums of squares pass 2^53, so the parts cannot be merged exactly (chunk-parts.ts)
    const big = RunSpecSchema.parse({
      ...spec,
      circuit: {
        ...tpl.circuit,
        species: [...tpl.circuit.species, { name: "big", initialCount: 33_554_431 }],
        reactions: [
          ...tpl.circuit.reactions,
          { name: "loseBig", reactants: [{ species: "big" }], rate: { kind: "massAction", ratePerMinute: 1e-9 } },
        ],
      },
    });
    const r = await pools[1].runChunk({ spec: big, replicateStart: 0, count: 100, trace: true });
    assert.ok((r.trace ?? []).length > 2, "parts first, then the whole chunk");
    const { trace, ...rest } = r;
    void trace;
    assert.deepEqual(rest, simulateChunk(big, 0, 100));
  });

  test("a chunk returns typed arrays intact and matches simulateChunk", async () => {
    const r = await pools[1].runChunk({ spec, replicateStart: 100, count: 5 });
    const local = simulateChunk(spec, 100, 5);
    assert.ok(r.gridSum instanceof Float64Array);
    assert.deepEqual(r.gridSum, local.gridSum);
  });

  test("wall-time cap aborts a long chunk instead of hanging", async () => {
    const long = { ...spec, endTimeMinutes: 100_000, gridStepMinutes: 100 };
    const r = await pools[0].runChunk({ spec: long, replicateStart: 0, count: 100, wallTimeLimitMs: 200 });
    assert.equal(r.aborted, true);
    assert.equal(r.wallTimeExceeded, true);
  });
});
