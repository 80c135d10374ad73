/**
 * Runs every chunk of a spec (chunkLayout: fixed by the spec, never by the
 * pool) on the pool, or in this thread when no pool is given, and hands the
 * results to `onChunk` strictly in chunk order (later chunks that finish early
 * wait), so anything reduced from them is identical for any thread count.
 */
import { chunkLayout, simulateChunk, type ChunkResult } from "@/sim";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { SimPool } from "./pool";

export interface RunAllOptions {
  pool?: SimPool | null;
  keepAllGrid?: boolean;
  trajectoryReplicates?: number;
  /** Called in chunk order. */
  onChunk?: (result: ChunkResult, index: number) => void | Promise<void>;
  /** Called as chunks complete (any order): replicates done so far. */
  onProgress?: (replicatesDone: number, total: number) => void;
}

export async function runAllChunks(
  spec: RunSpec,
  opts: RunAllOptions = {},
): Promise<{ events: number; chunks: number }> {
  const layout = chunkLayout(spec);
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
  let chain = Promise.resolve();
  await Promise.all(
    layout.chunks.map((c) =>
      // Without onChunk nobody reads the records: the pulse columns stay packed (no unpacking on this thread).
      pool
        .runChunk({ spec, replicateStart: c.replicateStart, count: c.count, options }, { keepPacked: !opts.onChunk })
        .then((r) => {
          done += c.count;
          opts.onProgress?.(done, spec.replicates);
          pending.set(c.index, r);
          chain = chain.then(flush);
          return chain;
        }),
    ),
  );
  await chain;
  return { events, chunks: layout.chunks.length };
}
