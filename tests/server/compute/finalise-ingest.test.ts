/**
 * The finalising thread reduces a run's chunks as they are stored (ingest) or,
 * when it has not seen all of them, reads them back from SQLite. Both must give
 * the same bytes: series, summary, behaviour labels and statistics hash, and the
 * hash must equal the one the CLI computes from the same results in memory.
 * Chunks here arrive out of order and one twice, as they can from the pool.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { schema } from "@/db/client";
import { chunkLayout, gridTimes, reduceChunks, simulateChunk, type ChunkResult } from "@/sim";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import type { RunSpec } from "@/shared/schemas/run-spec";
import finaliser, { type FinaliseResult, type IngestTask } from "@/server/compute/finalise-worker";
import {
  createChunkWriter,
  gridSeries,
  readPulseStats,
  speciesNames,
  statsHash,
  statsHashInMemory,
} from "@/server/compute/run-store";
import { makeTestContext, type TestApp } from "@/tests/helpers/test-app";
import { shortLadderSpec } from "@/tests/helpers/run-helpers";

function insertRun(t: TestApp, id: string, spec: RunSpec) {
  t.ctx.db
    .insert(schema.runs)
    .values({
      id,
      labId: t.demoLab!.id,
      name: id,
      status: "running",
      spec,
      seed: spec.seed,
      replicates: spec.replicates,
      chunkSize: chunkLayout(spec).chunkSize,
      engineVersion: "test",
      createdAt: new Date(),
    })
    .run();
}

const ingestTask = (runId: string, spec: RunSpec, chunkIndex: number, r: ChunkResult): IngestTask => ({
  kind: "ingest",
  runId,
  chunkIndex,
  chunks: chunkLayout(spec).chunks.length,
  spec,
  replicates: r.replicates,
  pulses: packPulseStats(r.pulses),
  gridSum: r.gridSum.slice(),
  gridSumSq: r.gridSumSq.slice(),
  gridCount: r.gridCount.slice(),
});

function assertSame(a: FinaliseResult, b: FinaliseResult) {
  assert.equal(a.statsHash, b.statsHash);
  assert.deepEqual(a.summary, b.summary);
  assert.equal(JSON.stringify(a.summary), JSON.stringify(b.summary), "the stored summary bytes");
  assert.deepEqual(a.regime, b.regime);
  assert.deepEqual(a.replicateFigures, b.replicateFigures);
  assert.equal(a.capped, b.capped);
  assert.equal(a.series.length, b.series.length);
  a.series.forEach((s, i) => {
    assert.equal(s.species, b.series[i].species);
    assert.equal(s.kind, b.series[i].kind);
    assert.ok(Buffer.from(s.values).equals(Buffer.from(b.series[i].values)), `${s.species}/${s.kind} differs`);
  });
}

test("finalising from chunks reduced as they arrive equals finalising from SQLite, and the CLI's hash", async () => {
  const t = await makeTestContext();
  try {
    const spec = shortLadderSpec(350, "ingest-seed");
    const layout = chunkLayout(spec);
    assert.equal(layout.chunks.length, 4); // 100, 100, 100, 50
    const results = layout.chunks.map((c) =>
      simulateChunk(spec, c.replicateStart, c.count, { trajectoryReplicates: 20 }),
    );
    const writer = createChunkWriter(t.ctx.sqlite);
    const species = speciesNames(spec);
    const ng = gridTimes(spec).length;
    for (const runId of ["run_ingest_a", "run_ingest_b"]) {
      insertRun(t, runId, spec);
      layout.chunks.forEach((c, i) => {
        const r = results[i];
        writer.write(runId, species, ng, {
          chunkIndex: i,
          replicateStart: c.replicateStart,
          count: c.count,
          events: r.events,
          seconds: 0.1,
          gridSum: r.gridSum,
          gridSumSq: r.gridSumSq,
          gridCount: r.gridCount,
          replicates: r.replicates,
          // both storage paths: columns as a worker thread sends them, and records
          pulses: i % 2 === 0 ? packPulseStats(r.pulses) : r.pulses,
          trajectories: r.trajectories,
        });
      });
    }
    // The two storage paths stored the same rows.
    assert.deepEqual(readPulseStats(t.ctx.db, "run_ingest_a"), readPulseStats(t.ctx.db, "run_ingest_b"));

    // Run a: every chunk ingested, out of order, chunk 0 twice; the spec's part of the finalisation prepared
    // ahead (as the run queue asks with the first chunk).
    finaliser({ kind: "prepare", runId: "run_ingest_a", chunks: layout.chunks.length, spec });
    for (const i of [2, 0, 3, 0, 1]) finaliser(ingestTask("run_ingest_a", spec, i, results[i]));
    const ingested = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_ingest_a" })!;
    const fromDb = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_ingest_a", fromDatabase: true })!;
    assert.equal(ingested.source, "ingested");
    assert.equal(ingested.preparedAhead, true);
    assert.equal(ingested.summarisedAhead, true, "the summary's samples were sorted as the chunks came");
    assert.equal(fromDb.source, "database");
    assert.equal(fromDb.preparedAhead, false);
    assert.equal(fromDb.summarisedAhead, false);
    assertSame(ingested, fromDb);
    // The labels went through the pass-curve rule settled after the ensembles (a filter circuit with pulses).
    assert.ok(ingested.summary.byDuration.length >= 2);

    // Run b: chunk 1 never ingested (say the thread restarted), so finalisation reads everything back.
    for (const i of [0, 2, 3]) finaliser(ingestTask("run_ingest_b", spec, i, results[i]));
    const partial = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_ingest_b" })!;
    assert.equal(partial.source, "database");
    assertSame(ingested, partial);
    // Ingested in full but not prepared ahead: the finalisation does the spec's part itself.
    for (const i of [0, 1, 2, 3]) finaliser(ingestTask("run_ingest_b", spec, i, results[i]));
    const unprepared = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_ingest_b" })!;
    assert.equal(unprepared.source, "ingested");
    assert.equal(unprepared.preparedAhead, false);
    assert.equal(unprepared.summarisedAhead, false);
    assertSame(ingested, unprepared);

    // The CLI's hash of the same results in memory, and the hash of the stored rows once the series are stored.
    const { mean, sd } = reduceChunks(spec, results);
    const odeless = gridSeries(spec, mean, sd, null);
    const cli = statsHashInMemory(
      results.flatMap((r) => r.replicates),
      results.flatMap((r) => r.pulses),
      odeless,
    );
    assert.equal(ingested.statsHash, cli);
    for (const s of ingested.series)
      t.ctx.db
        .insert(schema.runSeries)
        .values({ runId: "run_ingest_a", species: s.species, kind: s.kind, values: Buffer.from(s.values) })
        .run();
    assert.equal(statsHash(t.ctx.db, "run_ingest_a"), ingested.statsHash);
    assert.ok(ingested.summary.counts.pulses > 0, "the run has pulse records to summarise");
    assert.equal(ingested.summary.counts.replicates, 350);
  } finally {
    await t.close();
  }
});

test("a dropped run's ingested chunks are forgotten: its finalisation reads SQLite", async () => {
  const t = await makeTestContext();
  try {
    const spec = shortLadderSpec(100, "drop-seed");
    insertRun(t, "run_drop", spec);
    const r = simulateChunk(spec, 0, 100, { trajectoryReplicates: 0 });
    createChunkWriter(t.ctx.sqlite).write("run_drop", speciesNames(spec), gridTimes(spec).length, {
      chunkIndex: 0,
      replicateStart: 0,
      count: 100,
      events: r.events,
      seconds: 0.1,
      gridSum: r.gridSum,
      gridSumSq: r.gridSumSq,
      gridCount: r.gridCount,
      replicates: r.replicates,
      pulses: r.pulses,
      trajectories: [],
    });
    finaliser(ingestTask("run_drop", spec, 0, r));
    finaliser({ kind: "drop", runId: "run_drop" });
    const f = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_drop" })!;
    assert.equal(f.source, "database");
    assert.equal(f.summary.counts.replicates, 100);
  } finally {
    await t.close();
  }
});
