/**
 * CPU time of the finalising thread's work for a run of N replicates, in one process
 * (docs/benchmarks.md, "Pipeline", "The tail after the last chunk"): the real
 * finalise-worker.ts task handler fed as the run queue feeds it (a "prepare" task,
 * then one "ingest" task per 100-replicate chunk, then "finalise"), and the event
 * loop's finish transaction (server/compute/run-store.ts storeFinalised) on a test
 * database holding the run's chunk rows with their grid sums. The same 1,000 simulated
 * replicates of docs/examples/benchmark.json are fed N / 1,000 times with their
 * replicate numbers shifted (13 pulses a replicate). Prints CPU seconds
 * (process.cpuUsage: user + system, this thread only does the work), the load
 * average, and a hash of the result so two versions can be compared for bytes.
 *
 * Standalone: npx tsx scripts/bench-finalise-tail.ts [N = 10000] [repetitions = 3] [--profile DIR]
 * (--profile: CPU profiles of the ingest tasks and of the finalise task of the last repetition, apart).
 */
import { createHash } from "node:crypto";
import { MessageChannel } from "node:worker_threads";
import { Session } from "node:inspector";
import { readFileSync, writeFileSync } from "node:fs";
import { loadSpecFile } from "@/server/cli/load-spec";
import { chunkLayout, simulateChunk } from "@/sim";
import { packPulseStats } from "@/sim/engine/pulse-columns";
import { schema } from "@/db/client";
import finaliser, { type FinaliseResult, type IngestTask } from "@/server/compute/finalise-worker";
import { toBlob } from "@/server/compute/run-store";
import { storeFinalised } from "@/server/compute/store-finalised";
import { makeTestContext } from "@/tests/helpers/test-app";

const argv = process.argv.slice(2);
const profileAt = argv.indexOf("--profile");
const profileDir = profileAt >= 0 ? argv.splice(profileAt, 2)[1] : null;
const N = Number(argv[0] ?? 10000);
const repetitions = Number(argv[1] ?? 3);
const session = profileDir ? new Session() : null;
session?.connect();
const post = (method: string, params?: object) =>
  new Promise<any>((res, rej) => session!.post(method, params ?? {}, (e, r) => (e ? rej(e) : res(r))));
async function profiled<T>(name: string, on: boolean, fn: () => T): Promise<T> {
  if (!on || !session) return fn();
  await post("Profiler.enable");
  await post("Profiler.setSamplingInterval", { interval: 200 });
  await post("Profiler.start");
  const v = fn();
  const { profile } = await post("Profiler.stop");
  writeFileSync(`${profileDir}/${name}-${N}.cpuprofile`, JSON.stringify(profile));
  return v;
}
const spec = loadSpecFile("docs/examples/benchmark.json", { replicates: N });
const layout = chunkLayout(spec);
const C = 1000;
const per = layout.chunkSize;
if (C % per !== 0 || N % C !== 0) throw new Error(`N must be a multiple of ${C} and chunks of ${per} must divide it`);
const base = Array.from({ length: C / per }, (_, k) => simulateChunk(spec, k * per, per, { trajectoryReplicates: 0 }));
const cpu = () => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
};

function task(runId: string, chunkIndex: number): IngestTask {
  const shift = Math.floor((chunkIndex * per) / C) * C;
  const r = base[chunkIndex % base.length];
  const packed = packPulseStats(r.pulses);
  for (let o = 0; o < packed.numbers.length; o += 14) packed.numbers[o] += shift;
  return {
    kind: "ingest",
    runId,
    chunkIndex,
    chunks: layout.chunks.length,
    spec,
    replicates: r.replicates.map((x) => ({
      replicate: x.replicate + shift,
      events: x.events,
      capped: x.capped,
      outputMean: x.outputMean,
      outputVar: x.outputVar,
    })),
    pulses: packed,
    gridSum: r.gridSum.slice(),
    gridSumSq: r.gridSumSq.slice(),
    gridCount: r.gridCount.slice(),
  };
}

async function main() {
  const t = await makeTestContext();
  const rows: Record<string, number | string>[] = [];
  try {
    for (let rep = 0; rep < repetitions; rep++) {
      const runId = `run_tail_${rep}`;
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
      const ins = t.ctx.sqlite.prepare(
        `INSERT INTO run_chunks (run_id, chunk_index, replicate_start, count, events, grid_sum, grid_sum_sq, grid_count, seconds) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      );
      t.ctx.sqlite.transaction(() => {
        layout.chunks.forEach((c, i) => {
          const r = base[i % base.length];
          ins.run(
            runId,
            i,
            c.replicateStart,
            c.count,
            r.events,
            toBlob(r.gridSum),
            toBlob(r.gridSumSq),
            toBlob(r.gridCount),
            0.1,
          );
        });
      })();
      finaliser({ kind: "prepare", runId, chunks: layout.chunks.length, spec });
      const tasks = layout.chunks.map((_, i) => task(runId, i));
      const last = rep === repetitions - 1;
      const c0 = cpu();
      await profiled("ingest", last, () => {
        for (const x of tasks) finaliser(x);
      });
      const c1 = cpu();
      const result = await profiled(
        "tail",
        last,
        () => finaliser({ kind: "finalise", dbPath: t.dbPath, runId }) as FinaliseResult,
      );
      const c2 = cpu();
      // What the event loop does with the result (the structured clone back from the thread, then the transaction).
      const { port1, port2 } = new MessageChannel();
      const cloned = await new Promise<FinaliseResult>((res) => {
        port2.once("message", (m: unknown) => res(m as FinaliseResult));
        port1.postMessage(result);
      });
      port1.close();
      port2.close();
      const c3 = cpu();
      const stored = storeFinalised(t.ctx.db, t.ctx.sqlite, runId, cloned, spec);
      const c4 = cpu();
      if (!stored) throw new Error("not stored");
      const bytes = createHash("sha256")
        .update(JSON.stringify(result.summary))
        .update(JSON.stringify(result.replicateFigures))
        .update(JSON.stringify(result.regime))
        .update(result.statsHash)
        .digest("hex")
        .slice(0, 16);
      rows.push({
        N,
        ingestPerChunkMs: +(((c1 - c0) / tasks.length) * 1000).toFixed(2),
        tailCpuS: +(c2 - c1).toFixed(3),
        cloneCpuS: +(c3 - c2).toFixed(3),
        storeCpuS: +(c4 - c3).toFixed(3),
        statsHash: result.statsHash.slice(0, 16),
        bytes,
        load: readFileSync("/proc/loadavg", "utf8").split(" ").slice(0, 3).join(" "),
      });
      console.log(JSON.stringify(rows[rows.length - 1]));
    }
  } finally {
    await t.close();
  }
}

void main();
