/**
 * A run's pulses stored as chunk BLOBs (pulse_chunks) must read exactly as the
 * same pulses stored as pulse_stats rows (the format of runs stored before the
 * BLOBs): every reader in server/compute/pulse-store.ts, the statistics hash,
 * firstDifference, the CSV exports, the paged browse with every sort and filter,
 * the match figures and schedule, and the finalisation from the database.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { eq } from "drizzle-orm";
import { schema } from "@/db/client";
import { chunkLayout, gridTimes, simulateChunk, type ChunkResult } from "@/sim";
import { outputPulsesCsv, pulseStatsCsv, replicateStatsCsv } from "@/sim/analysis";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import type { PulseStat, RunSpec } from "@/shared/schemas/run-spec";
import finaliser from "@/server/compute/finalise-worker";
import {
  createChunkWriter,
  firstDifference,
  readReplicateRows,
  speciesNames,
  statsHash,
} from "@/server/compute/run-store";
import {
  PULSE_SORT_KEYS,
  decodePulseChunk,
  encodePulseChunk,
  firstInOrder,
  firstReplicateSchedule,
  forEachPulseFigure,
  hasPulseChunks,
  readPulseColumns,
  readPulsePage,
  readPulseStats,
  type PulsePageQuery,
} from "@/server/compute/pulse-store";
import { runFigures } from "@/server/services/match.service";
import { makeTestContext, type TestApp } from "@/tests/helpers/test-app";
import { shortLadderSpec } from "@/tests/helpers/run-helpers";

function insertRun(t: TestApp, id: string, s: RunSpec) {
  t.ctx.db
    .insert(schema.runs)
    .values({
      id,
      labId: t.demoLab!.id,
      name: id,
      status: "running",
      spec: s,
      seed: s.seed,
      replicates: s.replicates,
      chunkSize: chunkLayout(s).chunkSize,
      engineVersion: "test",
      createdAt: new Date(),
    })
    .run();
}

function store(
  t: TestApp,
  runId: string,
  s: RunSpec,
  results: ChunkResult[],
  order: number[],
  format?: "blobs" | "rows",
) {
  const writer = createChunkWriter(t.ctx.sqlite, { pulseFormat: format });
  const layout = chunkLayout(s);
  for (const i of order) {
    const c = layout.chunks[i];
    const r = results[i];
    writer.write(runId, speciesNames(s), gridTimes(s).length, {
      chunkIndex: i,
      replicateStart: c.replicateStart,
      count: c.count,
      events: r.events,
      seconds: 0.1,
      gridSum: r.gridSum,
      gridSumSq: r.gridSumSq,
      gridCount: r.gridCount,
      replicates: r.replicates,
      pulses: i % 2 === 0 ? packPulseStats(r.pulses) : r.pulses,
      trajectories: r.trajectories,
    });
  }
}

const count = (t: TestApp, table: string, runId: string) =>
  (t.ctx.sqlite.prepare(`SELECT count(*) AS n FROM ${table} WHERE run_id = ?`).get(runId) as { n: number }).n;

function figures(t: TestApp, runId: string) {
  // Samples compared as sets: the matching sorts them (KS, W1); rows and BLOBs give them in different orders.
  const f = runFigures(t.ctx, runId);
  const up = (xs: number[]) => [...xs].sort((a, b) => a - b);
  return { ...f, bins: [...f.bins.entries()], delays: up(f.delays), widths: up(f.widths) };
}

function pageQueries(pulses: PulseStat[]): PulsePageQuery[] {
  const bins = [...new Set(pulses.map((p) => p.durationBin))];
  const qs: PulsePageQuery[] = [];
  for (const sort of PULSE_SORT_KEYS)
    for (const dir of ["asc", "desc"] as const)
      for (const filter of [{}, { durationBin: bins[1] }, { passed: "yes" as const }, { passed: "no" as const }])
        for (const page of [1, 3, 1000]) qs.push({ sort, dir, page, pageSize: 37, ...filter });
  // unfiltered pages that cross chunk boundaries (chunks of 100 replicates)
  for (let page = 1; page <= 40; page += 3) qs.push({ sort: "replicate", dir: "asc", page, pageSize: 113 });
  qs.push({ sort: "replicate", dir: "asc", page: 1, pageSize: 500, durationBin: bins[0], passed: "no" });
  qs.push({ sort: "delay", dir: "asc", page: 1, pageSize: 5, durationBin: 12345.5 });
  return qs;
}

test("a run's pulses stored as chunk BLOBs read exactly as the same pulses stored as rows", async () => {
  const t = await makeTestContext();
  try {
    const s = shortLadderSpec(350, "pulse-store-seed");
    const layout = chunkLayout(s);
    assert.equal(layout.chunks.length, 4);
    const results = layout.chunks.map((c) => simulateChunk(s, c.replicateStart, c.count, { trajectoryReplicates: 5 }));
    insertRun(t, "run_rows", s);
    insertRun(t, "run_blobs", s);
    store(t, "run_rows", s, results, [0, 1, 2, 3], "rows");
    store(t, "run_blobs", s, results, [2, 0, 3, 1]); // out of order, as the pool can deliver
    assert.equal(count(t, "pulse_chunks", "run_rows"), 0);
    assert.equal(count(t, "pulse_stats", "run_blobs"), 0);
    assert.equal(count(t, "pulse_chunks", "run_blobs"), 4);
    assert.ok(hasPulseChunks(t.ctx.db, "run_blobs"));
    assert.ok(!hasPulseChunks(t.ctx.db, "run_rows"));

    const rows = readPulseStats(t.ctx.db, "run_rows");
    const blobs = readPulseStats(t.ctx.db, "run_blobs");
    assert.ok(rows.length > 300, `the run has pulses (${rows.length})`);
    assert.ok(rows.some((p) => p.delay === null) && rows.some((p) => p.widths.length > 0), "null figures and widths");
    assert.deepEqual(blobs, rows);
    for (const runId of ["run_rows", "run_blobs"]) {
      const cols = readPulseColumns(t.ctx.db, runId);
      const packed = packPulseStats(rows);
      assert.ok(Buffer.from(cols.numbers.buffer).equals(Buffer.from(packed.numbers.buffer)), `${runId}: numbers`);
      assert.ok(Buffer.from(cols.widths.buffer).equals(Buffer.from(packed.widths.buffer)), `${runId}: widths`);
    }
    assert.equal(pulseStatsCsv(blobs), pulseStatsCsv(rows));
    assert.equal(outputPulsesCsv(blobs), outputPulsesCsv(rows));
    assert.equal(
      replicateStatsCsv(
        blobs,
        readReplicateRows(t.ctx.db, "run_blobs").map((r) => ({
          ...r,
          outputMean: r.outputMean ?? NaN,
          outputVar: r.outputVar ?? NaN,
        })),
      ),
      replicateStatsCsv(
        rows,
        readReplicateRows(t.ctx.db, "run_rows").map((r) => ({
          ...r,
          outputMean: r.outputMean ?? NaN,
          outputVar: r.outputVar ?? NaN,
        })),
      ),
    );
    assert.equal(firstDifference(t.ctx.db, "run_rows", "run_blobs"), null);
    assert.deepEqual(figures(t, "run_blobs"), figures(t, "run_rows"));
    const seen: string[][] = [[], []];
    forEachPulseFigure(t.ctx.db, "run_rows", (p) => seen[0].push(JSON.stringify(p)));
    forEachPulseFigure(t.ctx.db, "run_blobs", (p) => seen[1].push(JSON.stringify(p)));
    assert.deepEqual(seen[1].sort(), seen[0].sort());
    const schedule = firstReplicateSchedule(t.ctx.db, "run_blobs");
    assert.ok(schedule.length > 1);
    assert.deepEqual(schedule, firstReplicateSchedule(t.ctx.db, "run_rows"));

    for (const q of pageQueries(rows)) {
      const a = readPulsePage(t.ctx.db, "run_rows", q);
      const b = readPulsePage(t.ctx.db, "run_blobs", q);
      assert.deepEqual(b, a, JSON.stringify(q));
      assert.equal(JSON.stringify(b), JSON.stringify(a), JSON.stringify(q));
    }
    assert.ok(
      readPulsePage(t.ctx.db, "run_rows", { sort: "replicate", dir: "asc", page: 1, pageSize: 10, passed: "yes" })
        .total > 0,
    );

    // The finalisation from the database: same summary bytes and hash; then the stored hash with its series.
    const fa = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_rows", fromDatabase: true })!;
    const fb = finaliser({ kind: "finalise", dbPath: t.dbPath, runId: "run_blobs", fromDatabase: true })!;
    assert.equal(fb.statsHash, fa.statsHash);
    assert.equal(JSON.stringify(fb.summary), JSON.stringify(fa.summary));
    assert.deepEqual(fb.replicateFigures, fa.replicateFigures);
    for (const runId of ["run_rows", "run_blobs"])
      for (const x of fa.series)
        t.ctx.db
          .insert(schema.runSeries)
          .values({ runId, species: x.species, kind: x.kind, values: Buffer.from(x.values) })
          .run();
    assert.equal(statsHash(t.ctx.db, "run_blobs"), statsHash(t.ctx.db, "run_rows"));
    assert.equal(statsHash(t.ctx.db, "run_blobs"), fa.statsHash);

    // Deleting a run deletes its BLOBs.
    t.ctx.db.delete(schema.runs).where(eq(schema.runs.id, "run_blobs")).run();
    assert.equal(count(t, "pulse_chunks", "run_blobs"), 0);
  } finally {
    await t.close();
  }
});

test("a run stored as rows keeps rows when it resumes, and reads as before", async () => {
  const t = await makeTestContext();
  try {
    const s = shortLadderSpec(200, "pulse-store-resume");
    const layout = chunkLayout(s);
    const results = layout.chunks.map((c) => simulateChunk(s, c.replicateStart, c.count, { trajectoryReplicates: 0 }));
    insertRun(t, "run_old", s);
    // chunk 0 stored before the upgrade (rows), chunk 1 after it by the default writer
    store(t, "run_old", s, results, [0], "rows");
    store(t, "run_old", s, results, [1]);
    assert.equal(count(t, "pulse_chunks", "run_old"), 0);
    const expected = results.flatMap((r) => r.pulses);
    assert.equal(count(t, "pulse_stats", "run_old"), expected.length);
    // The rows read as the pulses went in (null for a missing figure, widths through JSON).
    assert.deepEqual(
      readPulseStats(t.ctx.db, "run_old"),
      expected
        .map((p) => ({ ...p, widths: JSON.parse(JSON.stringify(p.widths)) as number[] }))
        .sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex),
    );
  } finally {
    await t.close();
  }
});

test("edge values (null figures, several widths, -0, excluded pulses) read the same from rows and BLOBs", async () => {
  const t = await makeTestContext();
  try {
    const s = shortLadderSpec(100, "pulse-store-edges");
    const r = simulateChunk(s, 0, 100, { trajectoryReplicates: 0 });
    // the simulated records with figures changed to what this circuit does not produce
    const pulses = r.pulses.map((p, i) => ({
      ...p,
      excluded: i % 5 === 0,
      passed: i % 5 !== 0 && p.passed,
      widths: i % 3 === 0 ? [1 / 3, -0, 2 ** -1074, 1e308].slice(0, 1 + (i % 4)) : p.widths,
      peak: i % 7 === 0 ? -0 : p.peak,
      fwhm: i % 4 === 0 ? null : p.fwhm,
      delay: i % 6 === 0 ? null : (p.delay ?? 0.1 + 0.2),
    }));
    for (const [runId, format] of [
      ["run_edge_rows", "rows"],
      ["run_edge_blobs", "blobs"],
    ] as const) {
      insertRun(t, runId, s);
      store(t, runId, s, [{ ...r, pulses }], [0], format);
    }
    const rows = readPulseStats(t.ctx.db, "run_edge_rows");
    assert.deepEqual(readPulseStats(t.ctx.db, "run_edge_blobs"), rows);
    assert.ok(rows.some((p) => p.widths.length === 4));
    const a = readPulseColumns(t.ctx.db, "run_edge_rows"),
      b = readPulseColumns(t.ctx.db, "run_edge_blobs");
    assert.ok(Buffer.from(a.numbers.buffer).equals(Buffer.from(b.numbers.buffer)));
    assert.ok(Buffer.from(a.widths.buffer).equals(Buffer.from(b.widths.buffer)));
    for (const q of pageQueries(rows))
      assert.equal(
        JSON.stringify(readPulsePage(t.ctx.db, "run_edge_blobs", q)),
        JSON.stringify(readPulsePage(t.ctx.db, "run_edge_rows", q)),
        JSON.stringify(q),
      );
    assert.equal(firstDifference(t.ctx.db, "run_edge_rows", "run_edge_blobs"), null);
    assert.deepEqual(figures(t, "run_edge_blobs"), figures(t, "run_edge_rows"));
  } finally {
    await t.close();
  }
});

test("firstInOrder gives the first k of a full sort, for every k", () => {
  // many ties and nulls (NaN), as the figures have: the tie-break by position makes the order total
  const keys = Array.from({ length: 300 }, (_, i) => (i % 7 === 0 ? NaN : (i * 37) % 11));
  const cmp = (x: number, y: number) => {
    const a = keys[x],
      b = keys[y];
    if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) ? (Number.isNaN(b) ? x - y : 1) : -1;
    return a === b ? x - y : a < b ? 1 : -1;
  };
  const full = keys.map((_, i) => i).sort(cmp);
  for (const k of [0, 1, 2, 5, 36, 37, 38, 150, 299, 300, 400])
    assert.deepEqual(
      firstInOrder(
        keys.map((_, i) => i),
        k,
        cmp,
      ),
      full.slice(0, k),
      `k = ${k}`,
    );
});

test("the chunk encoding round-trips exactly, sorts a chunk into (replicate, pulse) order and reads unaligned BLOBs", () => {
  const base: PulseStat = {
    replicate: 7,
    pulseIndex: 1,
    on: 30,
    off: 45.5,
    durationBin: 15.5,
    excluded: false,
    passed: true,
    delay: 1 / 3,
    offDelay: null,
    widths: [2.25, Number.MIN_VALUE, 1e300],
    peak: 123.456,
    timeToPeak: -0,
    fwhm: null,
    baseline: 0.1 + 0.2,
  };
  const pulses: PulseStat[] = [
    base,
    { ...base, pulseIndex: 0, excluded: true, passed: false, delay: null, widths: [], fwhm: 4 },
    { ...base, replicate: 3, pulseIndex: 2, widths: [-0] },
  ];
  const blob = encodePulseChunk(pulses);
  const unaligned = Buffer.alloc(blob.length + 3).subarray(3);
  blob.copy(unaligned);
  for (const b of [blob, unaligned]) {
    const c = decodePulseChunk(b);
    assert.equal(c.n, 3);
    assert.deepEqual([...c.replicate], [3, 7, 7]);
    assert.deepEqual([...c.pulseIndex], [2, 0, 1]);
    assert.ok(Object.is(c.f64.timeToPeak[0], 0), "-0 is stored as 0, as a REAL column gives it back");
    assert.ok(Object.is(c.widths[0], 0));
    assert.deepEqual([...c.widths.subarray(1)], [2.25, Number.MIN_VALUE, 1e300]);
    assert.ok(Number.isNaN(c.f64.offDelay[0]));
  }
  assert.throws(() => decodePulseChunk(blob.subarray(0, blob.length - 1)), /does not hold/);
  assert.throws(() => encodePulseChunk([{ ...base, replicate: 1.5 }]), /not a 32-bit integer/);
  assert.equal(decodePulseChunk(encodePulseChunk([])).n, 0);
});
