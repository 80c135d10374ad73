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
  destroy(): Promise<void>;
}

export function createSimPool(opts: { threads: number; idleTimeoutMs?: number }): SimPool {
  const threads = Math.max(1, Math.floor(opts.threads));
  const piscina = new Piscina({
    filename: path.resolve(__dirname, "sim-worker.ts"),
    execArgv: ["--import", "tsx"],
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: opts.idleTimeoutMs ?? 60_000,
  });
  return {
    threads,
    async runChunk(task, runOpts = {}) {
      const result: WorkerChunkResult = await piscina.run(task);
      if (result.packedPulses && !runOpts.keepPacked) {
        result.pulses = unpackPulseStats(result.packedPulses);
        delete result.packedPulses;
      }
      return result;
    },
    async warmUp(spec, warmOpts = {}) {
      const tasks: Promise<unknown>[] = [];
      for (let i = 0; i < threads; i++)
        tasks.push(
          piscina.run({
            spec,
            replicateStart: 0,
            count: 0,
            warmUp: { holdMs: threads > 1 ? 100 : 0, replicates: warmOpts.replicates ?? 3 },
          } satisfies SimTask),
        );
      await Promise.all(tasks);
    },
    destroy: () => piscina.destroy(),
  };
}
