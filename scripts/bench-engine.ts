/**
 * Engine benchmark: the circuit in docs/examples/benchmark.json, loaded through
 * the CLI's own loader (nothing recognises the circuit), run on the worker pool
 * started and warmed (spec compiled in every thread) beforehand. `seconds` runs
 * from dispatching the first replicate to receiving the last, so it includes
 * seeding, grid recording, online crossing detection and the results' transfer.
 * `events` counts reaction firings only.
 */
import os from "node:os";
import path from "node:path";
import { loadSpecFile } from "@/server/cli/load-spec";
import { ENGINE_VERSION } from "@/sim";
import { createSimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { cpuByThread, threadTimes, type CpuByThread } from "@/scripts/lib/proc-stat";

export interface EngineBenchResult {
  model: string;
  engineVersion: string;
  replicates: number;
  events: number;
  seconds: number;
  eventsPerSecond: number;
  threads: number;
  /** CPU time of the whole process (all threads) over the same span: shows contention from other processes. */
  cpuSeconds: number;
  /** The same by thread (main, simulation threads, V8/libuv helpers); null where /proc is missing. */
  cpuByThread: CpuByThread | null;
}

export interface EngineBenchOptions {
  /** Thread counts to measure, in order (default [1, available parallelism]). */
  threads?: number[];
  specPath?: string;
  replicates?: number;
  /** Throwaway replicates per thread before timing (default 3; 0 compiles the spec only, as the server's pool does). */
  warmUpReplicates?: number;
  /** Called after each measurement. */
  onResult?: (r: EngineBenchResult) => void;
}

/**
 * Throwaway replicates per thread before a measured speed figure, run as chunks (five calls of 100): enough
 * for V8 to have optimised the circuit's kernel, simulateChunk and the per-chunk code around it. With 100 in
 * one call, simulateChunk was still compiled during the first measured chunks: a 2-thread pool's first 1,000
 * replicates took 1.14 s of simulation CPU and 0.21 s on V8's compiler threads, against 0.91 s and 0.02 s
 * once settled (4 Dec 2026); three calls were enough there.
 */
export const WARM_UP_REPLICATES_PER_THREAD = 500;

export const DEFAULT_BENCH_SPEC = path.resolve(__dirname, "../docs/examples/benchmark.json");

export async function runEngineBench(opts: EngineBenchOptions = {}): Promise<EngineBenchResult[]> {
  const spec = loadSpecFile(opts.specPath ?? DEFAULT_BENCH_SPEC, { replicates: opts.replicates });
  const threadCounts = opts.threads ?? [...new Set([1, Math.max(1, os.availableParallelism())])];
  const results: EngineBenchResult[] = [];
  for (const threads of threadCounts) {
    const pool = createSimPool({ threads });
    try {
      await pool.warmUp(spec, { replicates: opts.warmUpReplicates });
      const c0 = process.cpuUsage();
      const threads0 = threadTimes(process.pid);
      const t0 = performance.now();
      const { events } = await runAllChunks(spec, { pool });
      const seconds = (performance.now() - t0) / 1000;
      const cpu = process.cpuUsage(c0);
      const threads1 = threadTimes(process.pid);
      const r: EngineBenchResult = {
        model: spec.circuit.name,
        engineVersion: ENGINE_VERSION,
        replicates: spec.replicates,
        events,
        seconds,
        eventsPerSecond: events / seconds,
        threads,
        cpuSeconds: (cpu.user + cpu.system) / 1e6,
        cpuByThread: cpuByThread(process.pid, threads0, threads1),
      };
      results.push(r);
      opts.onResult?.(r);
    } finally {
      await pool.destroy();
    }
  }
  return results;
}
