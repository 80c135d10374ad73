/**
 * Piscina worker: a thin adapter around sim/. Compiles (and caches, per spec)
 * the circuit, runs one chunk, enforces the wall-time cap through the engine's
 * checkpoint (sim/ has no clock) and returns the result with its typed arrays
 * (the pulse records packed as columns among them) transferred rather than copied.
 */
import { readFileSync } from "node:fs";
import { threadId } from "node:worker_threads";
import { Piscina } from "piscina";
import { simulateChunk, prepareRun, type ChunkResult } from "@/sim";
import { packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";
import type { SimTask } from "./sim-task";
import { lowerThreadPriority } from "./thread-priority";

// Simulation yields the CPU to the HTTP thread (docs/runs.md).
lowerThreadPriority();

export type WorkerChunkResult = ChunkResult & {
  /** Set in the worker thread: the pulses as columns (pool.ts unpacks them into `pulses` on arrival). */
  packedPulses?: PackedPulseStats;
  wallTimeExceeded?: boolean;
  /** Compute seconds measured where the chunk ran (set by the Redis worker; the embedded queue times the call). */
  seconds?: number;
  /** Bench only (task.trace): where and when the chunk ran (one entry per part when it ran in parts). */
  trace?: ChunkTrace[];
};

export interface ChunkTrace {
  threadId: number;
  /** performance.timeOrigin + performance.now(), ms since the epoch (comparable across threads). */
  startMs: number;
  endMs: number;
  /** This thread's CPU time spent on the chunk (Linux /proc/thread-self/schedstat, ns precision), ms; null elsewhere. */
  cpuMs: number | null;
}

/** The calling thread's CPU time in ms (Linux), or null. */
export function threadCpuMs(): number | null {
  try {
    return Number(readFileSync("/proc/thread-self/schedstat", "utf8").split(" ")[0]) / 1e6;
  } catch {
    return null;
  }
}

function transferables(r: WorkerChunkResult): ArrayBuffer[] {
  const out = new Set<ArrayBuffer>();
  const add = (a: { buffer: ArrayBufferLike }) => out.add(a.buffer as ArrayBuffer);
  add(r.gridSum);
  add(r.gridSumSq);
  add(r.gridCount);
  if (r.packedPulses) {
    add(r.packedPulses.numbers);
    add(r.packedPulses.widths);
  }
  for (const t of r.trajectories) add(t.values);
  for (const e of r.recordedEvents ?? []) {
    add(e.initial);
    add(e.times);
    add(e.reactions);
  }
  return [...out];
}

export default function simWorker(task: SimTask): unknown {
  if (task.warmUp) {
    prepareRun(task.spec);
    const hold = task.warmUp.holdMs ?? 0;
    if (hold > 0) Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, hold);
    // A few throwaway replicates let the JIT optimise this thread's generated kernel before timing starts.
    return { ...simulateChunk(task.spec, 0, task.warmUp.replicates ?? 0), threadId };
  }
  const cpu0 = task.trace ? threadCpuMs() : null;
  const startMs = performance.timeOrigin + performance.now();
  const limit = task.wallTimeLimitMs;
  const deadline = limit !== undefined && limit > 0 ? Date.now() + limit : Infinity;
  const checkpoint = Number.isFinite(deadline) ? () => Date.now() < deadline : undefined;
  const result: WorkerChunkResult = simulateChunk(task.spec, task.replicateStart, task.count, {
    ...task.options,
    checkpoint,
  });
  if (result.aborted) result.wallTimeExceeded = true;
  // Pulses travel as two transferred buffers, not as cloned objects (sim/engine/pulse-columns.ts).
  result.packedPulses = packPulseStats(result.pulses);
  result.pulses = [];
  if (task.trace) {
    const cpu1 = threadCpuMs();
    result.trace = [
      {
        threadId,
        startMs,
        endMs: performance.timeOrigin + performance.now(),
        cpuMs: cpu0 === null || cpu1 === null ? null : cpu1 - cpu0,
      },
    ];
  }
  const movable = {
    get [Piscina.transferableSymbol]() {
      return transferables(result);
    },
    get [Piscina.valueSymbol]() {
      return result;
    },
  };
  return Piscina.move(movable as never);
}
