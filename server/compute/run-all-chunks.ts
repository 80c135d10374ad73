/**
 * Runs every chunk of a spec (chunkLayout: fixed by the spec, never by the
 * pool) on the pool, or in this thread when no pool is given, and hands the
 * results to `onChunk` strictly in chunk order (later chunks that finish early
 * wait), so anything reduced from them is identical for any thread count.
 */
import { chunkLayout, simulateChunk, type ChunkResult } from "@/sim";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { SimPool } from "./pool";
import type { ChunkTrace } from "./sim-worker";

export interface RunAllOptions {
  pool?: SimPool | null;
  keepAllGrid?: boolean;
  trajectoryReplicates?: number;
  /** Called in chunk order. */
  onChunk?: (result: ChunkResult, index: number) => void | Promise<void>;
  /** Called as chunks complete (any order): replicates done so far. */
  onProgress?: (replicatesDone: number, total: number) => void;
  /** Bench only: each chunk's thread and times, in chunk order (`traces` in the result; pool runs only). */
  trace?: boolean;
  /** Replicates per chunk (default: chunkLayout's); a run resumed from SQLite uses its stored one. */
  chunkSize?: number;
}

export async function runAllChunks(
  spec: RunSpec,
  opts: RunAllOptions = {},
): Promise<{ events: number; chunks: number; traces?: (ChunkTrace & { index: number; receivedMs: number })[] }> {
  const layout = chunkLayout(spec, opts.chunkSize);
  const options = { keepAllGrid: opts.keepAllGrid, trajectoryReplicates: opts.trajectoryReplicates };
  let done = 0;
  let events = 0;
  const pending = new Map<number, ChunkResult>();
  let next = 0;
  const flush = async () => {
    while (pending.has(next)) {
      const r = pending.get(next)!;
      pending.delete(next);
      events += r.events;
      await opts.onChunk?.(r, next);
      next++;
    }
  };
  if (!opts.pool) {
    for (const c of layout.chunks) {
      const r = simulateChunk(spec, c.replicateStart, c.count, options);
      done += c.count;
      opts.onProgress?.(done, spec.replicates);
      pending.set(c.index, r);
      await flush();
    }
    return { events, chunks: layout.chunks.length };
  }
  const pool = opts.pool;
  const traces: (ChunkTrace & { index: number; receivedMs: number })[] = [];
  let chain = Promise.resolve();
  await Promise.all(
    layout.chunks.map((c) =>
      // Without onChunk nobody reads the records: the pulse columns stay packed (no unpacking on this thread).
      pool
        .runChunk(
          { spec, replicateStart: c.replicateStart, count: c.count, options, ...(opts.trace ? { trace: true } : {}) },
          { keepPacked: !opts.onChunk },
        )
        .then((r) => {
          const receivedMs = performance.timeOrigin + performance.now();
          for (const t of r.trace ?? []) traces.push({ ...t, index: c.index, receivedMs });
          done += c.count;
          opts.onProgress?.(done, spec.replicates);
          pending.set(c.index, r);
          chain = chain.then(flush);
          return chain;
        }),
    ),
  );
  await chain;
  traces.sort((a, b) => a.index - b.index || a.startMs - b.startMs);
  return { events, chunks: layout.chunks.length, ...(opts.trace ? { traces } : {}) };
}
