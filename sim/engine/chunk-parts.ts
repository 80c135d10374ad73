/**
 * A chunk simulated in parts: the dispatch unit smaller than the stored chunk,
 * so that a small run gives every thread several tasks (its last task's tail a
 * small part of the run) while the chunk layout, the stored rows and the
 * server's per-chunk work (one transaction, one message to the finalising
 * thread) stay those of the whole chunk.
 *
 * Exact: replicates are seeded by their index, so a part's replicates are the
 * chunk's; species counts are whole numbers, so while the grid sums stay within
 * 2^53 no addition rounds and the parts' sums add up to the chunk's bit for bit
 * (each part checks this, `gridExact`; when a part cannot say so, e.g. counts
 * so large that the sums of squares round, the chunk runs whole instead).
 * tests/sim/engine/chunk-parts.test.ts holds merged parts equal to the whole chunk.
 */
import { CHUNK_SIZE } from "./chunks";
import type { ChunkResult } from "./simulate-chunk";
import type { PackedPulseStats } from "./pulse-columns";

/** Tasks a run should give each thread at least before chunks are split. */
export const TASKS_PER_THREAD_WANTED = 8;
/** At most this many parts per chunk, and parts of at least MIN_PART_REPLICATES replicates. */
export const MAX_PARTS = 4;
export const MIN_PART_REPLICATES = 10;

/**
 * How many parts a chunk of a run of `replicates` goes out in on `threads` threads: 1 on one thread or when
 * the run has enough chunks; otherwise enough for TASKS_PER_THREAD_WANTED tasks a thread, within the bounds.
 * Only the dispatch depends on it (results are the same for any value).
 */
export function partsPerChunk(replicates: number, chunkReplicates: number, threads: number): number {
  if (threads <= 1 || chunkReplicates < 2 * MIN_PART_REPLICATES) return 1;
  const chunks = Math.ceil(replicates / CHUNK_SIZE);
  const want = Math.ceil((TASKS_PER_THREAD_WANTED * threads) / Math.max(1, chunks));
  return Math.max(1, Math.min(MAX_PARTS, want, Math.floor(chunkReplicates / MIN_PART_REPLICATES)));
}

/** Splits [replicateStart, replicateStart + count) into `parts` contiguous ranges, sizes differing by at most 1. */
export function chunkParts(
  replicateStart: number,
  count: number,
  parts: number,
): { replicateStart: number; count: number }[] {
  const n = Math.max(1, Math.min(parts, count));
  const out: { replicateStart: number; count: number }[] = [];
  let start = replicateStart;
  for (let i = 0; i < n; i++) {
    const c = Math.floor(count / n) + (i < count % n ? 1 : 0);
    out.push({ replicateStart: start, count: c });
    start += c;
  }
  return out;
}

/** Concatenates packed pulse columns in part order (records stay replicate-major, pulse order). */
export function concatPackedPulses(parts: readonly PackedPulseStats[]): PackedPulseStats {
  const cat = (arrays: Float64Array[]) => {
    const out = new Float64Array(arrays.reduce((s, a) => s + a.length, 0));
    let o = 0;
    for (const a of arrays) {
      out.set(a, o);
      o += a.length;
    }
    return out;
  };
  return { numbers: cat(parts.map((p) => p.numbers)), widths: cat(parts.map((p) => p.widths)) };
}

/** The bound each of `parts` parts checks its grid sums against, so that the chunk's sums stay within 2^53. */
export const gridExactBound = (parts: number) => 2 ** 53 / Math.max(1, parts);

/**
 * The chunk's result from its parts (in replicate order, each simulated with gridExactBound(parts)), or null
 * when a part's grid sums were not exact: then only the whole chunk in one piece gives its sums (the caller
 * runs it so). Equal to simulateChunk over the whole range. A part that aborted ends the chunk there (later
 * parts are dropped, as simulateChunk stops at the aborted replicate).
 *
 * Why adding the parts' sums is exact: every value was a whole number >= 0 and each part's sums are at most
 * 2^53 / parts, so every partial sum, in the chunk's order or the parts', is a whole number at most 2^53,
 * which a double holds exactly: no addition rounds, and both orders give the true sum.
 */
export function mergeChunkParts<R extends ChunkResult>(parts: readonly R[]): R | null {
  if (parts.length === 0) throw new Error("mergeChunkParts: no parts");
  const used: R[] = [];
  for (const p of parts) {
    used.push(p);
    if (p.aborted) break;
  }
  if (!used.every((p) => p.gridExact === true)) return null;
  const first = parts[0];
  const len = first.gridSum.length;
  const gridSum = new Float64Array(len);
  const gridSumSq = new Float64Array(len);
  const gridCount = new Float64Array(first.gridCount.length);
  for (const p of used) {
    for (let i = 0; i < len; i++) {
      gridSum[i] += p.gridSum[i];
      gridSumSq[i] += p.gridSumSq[i];
    }
    for (let g = 0; g < gridCount.length; g++) gridCount[g] += p.gridCount[g];
  }
  const last = parts[parts.length - 1];
  const merged: R = {
    ...first,
    count: last.replicateStart + last.count - first.replicateStart,
    events: used.reduce((s, p) => s + p.events, 0),
    replicates: used.flatMap((p) => p.replicates),
    pulses: used.flatMap((p) => p.pulses),
    gridSum,
    gridSumSq,
    gridCount,
    trajectories: used.flatMap((p) => p.trajectories),
  };
  delete merged.gridExact;
  delete merged.recordedEvents;
  delete merged.aborted;
  const recorded = used.flatMap((p) => p.recordedEvents ?? []);
  if (recorded.length > 0) merged.recordedEvents = recorded;
  if (used[used.length - 1].aborted) merged.aborted = true;
  return merged;
}
