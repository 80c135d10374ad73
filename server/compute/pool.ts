/**
 * The simulation pool: piscina threads running ./sim-worker.ts (TypeScript
 * loaded through tsx in each thread). Used by the server's run queue, the CLI
 * and the benchmark.
 */
import path from "node:path";
import { Piscina } from "piscina";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { SimTask } from "./sim-task";
import type { WorkerChunkResult } from "./sim-worker";
import { unpackPulseStats } from "@/sim/engine/pulse-columns";
import {
  chunkParts,
  concatPackedPulses,
  gridExactBound,
  mergeChunkParts,
  partsPerChunk,
} from "@/sim/engine/chunk-parts";

export type { SimTask } from "./sim-task";

export interface SimPool {
  /**
   * Computes one chunk. The pulse records arrive as columns; they are unpacked into `pulses` here unless
   * `keepPacked` (the run queue stores and reduces the columns as they are, off the records' cost).
   */
  runChunk(task: SimTask, opts?: { keepPacked?: boolean }): Promise<WorkerChunkResult>;
  /** Compiles the spec in every thread and runs a few throwaway replicates (so timing starts with warm caches and JIT). */
  warmUp(spec: RunSpec, opts?: { replicates?: number }): Promise<void>;
  threads: number;
  /**
   * Chunks that may be out at once: two per thread, so each thread has its next chunk queued at its own port
   * and starts it the moment it finishes one, not when the main thread (writing a chunk to SQLite, answering
   * HTTP) gets round to handing it one.
   */
  capacity: number;
  destroy(): Promise<void>;
}

/** Tasks handed to a thread at once (it runs them one after another). */
const TASKS_PER_THREAD = 2;

export function createSimPool(opts: {
  threads: number;
  idleTimeoutMs?: number;
  /** Small runs' chunks go out in parts (default true; false for the bench's comparison). */
  chunkParts?: boolean;
}): SimPool {
  const splitting = opts.chunkParts ?? true;
  const threads = Math.max(1, Math.floor(opts.threads));
  const piscina = new Piscina({
    filename: path.resolve(__dirname, "sim-worker.ts"),
    execArgv: ["--import", "tsx"],
    minThreads: threads,
    maxThreads: threads,
    concurrentTasksPerWorker: TASKS_PER_THREAD,
    idleTimeout: opts.idleTimeoutMs ?? 60_000,
  });
  return {
    threads,
    capacity: threads * TASKS_PER_THREAD,
    async runChunk(task, runOpts = {}) {
      // A small run's chunks go out in parts, so each thread gets several tasks and the last one's tail is
      // short; the parts merge into exactly the chunk's result (sim/engine/chunk-parts.ts).
      const parts = task.warmUp || !splitting ? 1 : partsPerChunk(task.spec.replicates, task.count, threads);
      let result: WorkerChunkResult;
      if (parts <= 1) result = await piscina.run(task);
      else {
        const results: WorkerChunkResult[] = await Promise.all(
          chunkParts(task.replicateStart, task.count, parts).map((p) =>
            piscina.run({
              ...task,
              replicateStart: p.replicateStart,
              count: p.count,
              options: { ...task.options, gridExactBound: gridExactBound(parts) },
            } satisfies SimTask),
          ),
        );
        const merged = mergeChunkParts(results);
        const traces = results.flatMap((r) => r.trace ?? []);
        if (merged) {
          // parts after an aborted one are dropped, as in the merge
          const aborted = results.findIndex((r) => r.aborted);
          const used = aborted < 0 ? results : results.slice(0, aborted + 1);
          if (used.some((r) => r.packedPulses))
            merged.packedPulses = concatPackedPulses(used.map((r) => r.packedPulses!));
          if (used.some((r) => r.wallTimeExceeded)) merged.wallTimeExceeded = true;
          result = merged;
        } else {
          // grid sums that would round (very large counts): only the whole chunk gives its sums
          result = await piscina.run(task);
          traces.push(...(result.trace ?? []));
        }
        if (task.trace) result.trace = traces;
      }
      if (result.packedPulses && !runOpts.keepPacked) {
        result.pulses = unpackPulseStats(result.packedPulses);
        delete result.packedPulses;
      }
      return result;
    },
    async warmUp(spec, warmOpts = {}) {
      // A thread not started yet when the tasks go out leaves its share to a started one (two tasks per
      // thread): rounds go on until every thread has compiled the spec and run its throwaway replicates.
      const warm = new Set<number>();
      for (let round = 0; round < 20 && warm.size < threads; round++) {
        const tasks: Promise<{ threadId?: number }>[] = [];
        for (let i = warm.size; i < threads; i++)
          tasks.push(
            piscina.run({
              spec,
              replicateStart: 0,
              count: 0,
              warmUp: { holdMs: threads > 1 ? 100 : 0, replicates: warmOpts.replicates ?? 3 },
            } satisfies SimTask),
          );
        for (const r of await Promise.all(tasks)) if (r.threadId !== undefined) warm.add(r.threadId);
      }
    },
    destroy: () => piscina.destroy(),
  };
}
