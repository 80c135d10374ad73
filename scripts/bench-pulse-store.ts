/**
 * What storing a run's pulses costs the event loop, and the database, in one
 * process (docs/benchmarks.md, "Pulse storage"): N replicates of
 * docs/examples/benchmark.json (the same 1,000 simulated replicates fed N / 1,000
 * times with their replicate numbers shifted; 13 pulses a replicate) stored chunk
 * by chunk through the run queue's writer (server/compute/run-store.ts
 * createChunkWriter, each chunk one transaction with its chunk row, replicate rows
 * and pulses) into a fresh database, the pulses as pulse_stats rows (the old
 * format) or as one BLOB per chunk (pulse_chunks), the two alternated. Prints per
 * format and repetition: CPU ms per chunk transaction (process.cpuUsage: user +
 * system; this thread only does the work), the database's size once checkpointed
 * and the pulses' share of it, CPU ms of the pulse readers (the browse route's
 * pages, the whole run as records), and a hash of what the readers gave so the
 * two formats can be compared for bytes.
 *
 * Standalone: npx tsx scripts/bench-pulse-store.ts [N = 10000] [repetitions = 3]
 */
import { createHash } from "node:crypto";
import { readFileSync, statSync } from "node:fs";
import { loadSpecFile } from "@/server/cli/load-spec";
import { chunkLayout, gridTimes, simulateChunk } from "@/sim";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import { schema } from "@/db/client";
import { createChunkWriter, speciesNames } from "@/server/compute/run-store";
import { readPulsePage, readPulseStats, type PulsePageQuery } from "@/server/compute/pulse-store";
import { makeTestContext } from "@/tests/helpers/test-app";

const N = Number(process.argv[2] ?? 10000);
const repetitions = Number(process.argv[3] ?? 3);
const spec = loadSpecFile("docs/examples/benchmark.json", { replicates: N });
const layout = chunkLayout(spec);
const C = 1000;
const per = layout.chunkSize;
if (C % per !== 0 || N % C !== 0) throw new Error(`N must be a multiple of ${C} and chunks of ${per} must divide it`);
const base = Array.from({ length: C / per }, (_, k) => simulateChunk(spec, k * per, per, { trajectoryReplicates: 0 }));
const cpuMs = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e3;
};
const load = () => readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" ");
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const PAGES: [string, PulsePageQuery][] = [
  ["page 1", { sort: "replicate", dir: "asc", page: 1, pageSize: 50 }],
  ["page 1000", { sort: "replicate", dir: "asc", page: 1000, pageSize: 50 }],
  ["durationBin", { sort: "replicate", dir: "asc", page: 2, pageSize: 50, durationBin: 20 }],
  ["passed=no", { sort: "replicate", dir: "asc", page: 1, pageSize: 50, passed: "no" }],
  ["sort delay", { sort: "delay", dir: "desc", page: 3, pageSize: 50 }],
];

async function one(format: "rows" | "blobs") {
  const t = await makeTestContext();
  try {
    const runId = `run_store_${format}`;
    t.ctx.db
      .insert(schema.runs)
      .values({
        id: runId,
        labId: t.demoLab!.id,
        name: runId,
        status: "running",
        spec,
        seed: spec.seed,
        replicates: spec.replicates,
        chunkSize: per,
        engineVersion: "bench",
        createdAt: new Date(),
      })
      .run();
    const size = () => {
      t.ctx.sqlite.pragma("wal_checkpoint(TRUNCATE)");
      return statSync(t.dbPath).size;
    };
    const before = size();
    const writer = createChunkWriter(t.ctx.sqlite, { pulseFormat: format });
    const species = speciesNames(spec);
    const ng = gridTimes(spec).length;
    const perChunk: number[] = [];
    layout.chunks.forEach((c, i) => {
      const shift = Math.floor((i * per) / C) * C;
      const r = base[i % base.length];
      const packed = packPulseStats(r.pulses); // as a worker thread sends them
      for (let o = 0; o < packed.numbers.length; o += 14) packed.numbers[o] += shift;
      const replicates = r.replicates.map((x) => ({ ...x, replicate: x.replicate + shift }));
      const c0 = cpuMs();
      writer.write(runId, species, ng, {
        chunkIndex: i,
        replicateStart: c.replicateStart,
        count: c.count,
        events: r.events,
        seconds: 0.1,
        gridSum: r.gridSum,
        gridSumSq: r.gridSumSq,
        gridCount: r.gridCount,
        replicates,
        pulses: packed,
        trajectories: [],
      });
      perChunk.push(cpuMs() - c0);
    });
    const after = size();
    const pulseTable = format === "rows" ? "pulse_stats" : "pulse_chunks";
    let pulseBytes: number | null = null;
    try {
      pulseBytes = (
        t.ctx.sqlite
          .prepare(`SELECT sum(pgsize) AS b FROM dbstat WHERE name = ? OR name LIKE ?`)
          .get(pulseTable, `%${pulseTable}%`) as { b: number }
      ).b;
    } catch {
      /* dbstat not compiled in */
    }
    const h = createHash("sha256");
    const readMs: Record<string, number> = {};
    for (const [name, q] of PAGES) {
      const xs: number[] = [];
      for (let k = 0; k < 5; k++) {
        const c0 = cpuMs();
        const page = readPulsePage(t.ctx.db, runId, q);
        xs.push(cpuMs() - c0);
        if (k === 0) h.update(JSON.stringify(page));
      }
      readMs[name] = +median(xs).toFixed(1);
    }
    const c0 = cpuMs();
    const all = readPulseStats(t.ctx.db, runId);
    readMs["all records"] = +(cpuMs() - c0).toFixed(0);
    h.update(JSON.stringify(all));
    const row = {
      format,
      N,
      pulses: all.length,
      chunkMs: +median(perChunk).toFixed(2),
      chunkMsTotal: +perChunk.reduce((s, x) => s + x, 0).toFixed(0),
      dbMB: +((after - before) / 1e6).toFixed(1),
      pulseMB: pulseBytes === null ? null : +(pulseBytes / 1e6).toFixed(1),
      readMs,
      hash: h.digest("hex").slice(0, 16),
      load: load(),
    };
    console.log(JSON.stringify(row));
  } finally {
    await t.close();
  }
}

async function main() {
  for (let rep = 0; rep < repetitions; rep++) for (const f of ["rows", "blobs"] as const) await one(f);
}

void main();
