/**
 * Splitting a run into chunks and reducing their grid sums. The layout depends
 * only on the spec (never on the pool size), and reduceChunks adds the chunks'
 * partial sums in chunk order, so the aggregates are bit-identical for any
 * number of threads.
 */
import type { RunSpec } from "@/shared/schemas/run-spec";
import { gridTimes } from "./run-setup";

/** Replicates per chunk: about 0.1 s of work on the benchmark circuit at 20M events/s. */
export const CHUNK_SIZE = 100;

export interface ChunkLayout {
  chunkSize: number;
  chunks: { index: number; replicateStart: number; count: number }[];
}

export function chunkLayout(spec: Pick<RunSpec, "replicates">, chunkSize: number = CHUNK_SIZE): ChunkLayout {
  if (!Number.isInteger(chunkSize) || chunkSize < 1) throw new Error(`invalid chunk size ${chunkSize}`);
  const chunks: ChunkLayout["chunks"] = [];
  for (let start = 0, index = 0; start < spec.replicates; start += chunkSize, index++)
    chunks.push({ index, replicateStart: start, count: Math.min(chunkSize, spec.replicates - start) });
  return { chunkSize, chunks };
}

export interface GridPartial {
  gridSum: Float64Array;
  gridSumSq: Float64Array;
  /** Valid replicates per grid point; when absent every replicate counts (spec.replicates in total). */
  gridCount?: Float64Array;
}

/**
 * Mean and sample standard deviation (n - 1 denominator; 0 for one replicate,
 * NaN for none) per species per grid time, [species][grid].
 */
export function reduceChunks(
  spec: Pick<RunSpec, "replicates" | "endTimeMinutes" | "gridStepMinutes">,
  chunks: readonly GridPartial[],
): { mean: Float64Array; sd: Float64Array; count: Float64Array } {
  const reducer = createGridReducer(spec);
  for (const c of chunks) reducer.add(c);
  return reducer.result();
}

/**
 * reduceChunks one chunk at a time, for a caller that receives chunks as they
 * finish: add them in chunk order and the result is bit-identical to
 * reduceChunks over the same chunks (the same additions in the same order).
 */
export function createGridReducer(spec: Pick<RunSpec, "replicates" | "endTimeMinutes" | "gridStepMinutes">) {
  const ng = gridTimes(spec).length;
  let sum: Float64Array | null = null;
  let sumSq: Float64Array | null = null;
  const count = new Float64Array(ng);
  let chunks = 0;
  let firstHasCount = false;
  return {
    add(c: GridPartial) {
      if (sum === null || sumSq === null) {
        sum = new Float64Array(c.gridSum.length);
        sumSq = new Float64Array(c.gridSum.length);
        firstHasCount = !!c.gridCount;
      }
      const len = sum.length;
      for (let i = 0; i < len; i++) {
        sum[i] += c.gridSum[i];
        sumSq[i] += c.gridSumSq[i];
      }
      if (c.gridCount) for (let g = 0; g < ng; g++) count[g] += c.gridCount[g];
      chunks++;
    },
    result(): { mean: Float64Array; sd: Float64Array; count: Float64Array } {
      const s = sum ?? new Float64Array(0);
      const sq = sumSq ?? new Float64Array(0);
      if (chunks > 0 && !firstHasCount) count.fill(spec.replicates);
      const len = s.length;
      const mean = new Float64Array(len);
      const sd = new Float64Array(len);
      for (let i = 0; i < len; i++) {
        const n = count[i % ng];
        if (n === 0) {
          mean[i] = NaN;
          sd[i] = NaN;
          continue;
        }
        const m = s[i] / n;
        mean[i] = m;
        sd[i] = n > 1 ? Math.sqrt(Math.max(0, (sq[i] - n * m * m) / (n - 1))) : 0;
      }
      return { mean, sd, count };
    },
  };
}
