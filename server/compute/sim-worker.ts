/**
 * Piscina worker: a thin adapter around sim/. Compiles (and caches, per spec)
 * the circuit, runs one chunk, enforces the wall-time cap through the engine's
 * checkpoint (sim/ has no clock) and returns the result with its typed arrays
 * (the pulse records packed as columns among them) transferred rather than copied.
 */
import { readFileSync } from "node:fs";
import { threadId } from "node:worker_threads";
import { Piscina } from "piscina";
import { CHUNK_SIZE, simulateChunk, prepareRun, type ChunkResult } from "@/sim";
import { packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";
import type { SimTask } from "./sim-task";
import { THREAD_NAMES, lowerThreadPriority, nameThisThread } from "./thread-priority";

// Simulation yields the CPU to the HTTP thread (docs/runs.md).
lowerThreadPriority();
nameThisThread(THREAD_NAMES.sim);

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
    // Throwaway replicates let the JIT optimise this thread's code before timing starts: the generated kernel
    // (called per replicate) and, run as chunks are, in calls of at most a chunk with their pulses packed,
    // simulateChunk and the per-chunk code around it (called once per chunk, so one long call leaves them
    // unoptimised and V8 compiles them during the first measured chunks).
    const replicates = task.warmUp.replicates ?? 0;
    let last = simulateChunk(task.spec, 0, Math.min(replicates, CHUNK_SIZE));
    for (let start = CHUNK_SIZE; start < replicates; start += CHUNK_SIZE) {
      packPulseStats(last.pulses);
      last = simulateChunk(task.spec, start, Math.min(CHUNK_SIZE, replicates - start));
    }
    return { ...last, threadId };
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
