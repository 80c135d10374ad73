/**
 * The dispatch seam: the one interface the run queue calls to get a chunk of
 * replicates computed. Two implementations:
 *  - in-process (default): the server's own piscina pool (`createSimPool`);
 *  - Redis (LINGER_REDIS_URL set): chunks go on a BullMQ queue and worker
 *    processes on any machine compute them (./redis-dispatch.ts).
 * Either way the chunk (boundaries, replicate indices, hence seeds) is fixed by
 * the spec and the run queue alone writes SQLite, so the stored statistics and
 * their hash do not depend on where a chunk ran.
 */
import type { SimPool } from "./pool";
import type { SimTask } from "./sim-task";
import type { WorkerChunkResult } from "./sim-worker";
import type { ComputeStatus } from "@/shared/schemas/api-health";

export interface ChunkJob {
  runId: string;
  labId: string;
  chunkIndex: number;
  task: SimTask;
}

export type { WorkerInfo } from "@/shared/schemas/api-health";

/** What a dispatcher reports (the compute part of /api/health without the worker count). */
export type DispatchStats = Omit<ComputeStatus, "workerCount">;

export interface ChunkDispatcher {
  readonly mode: DispatchStats["mode"];
  /** How many chunks may be out at once; the run queue never exceeds it. */
  capacity(): number;
  /**
   * Computes one chunk; rejects when the chunk cannot be computed (the run fails with the message). The pulse
   * records come as `pulses` or, when they crossed a thread as columns, as `packedPulses` (`pulses` then empty).
   */
  run(job: ChunkJob): Promise<WorkerChunkResult>;
  /** Registers a callback for when capacity grows or lost work was found (the run queue pumps again). */
  onWake(fn: () => void): void;
  stats(): DispatchStats;
  close(): Promise<void>;
}

/** Completions per second over a sliding window (one minute by default). */
export function createRateMeter(windowMs = 60_000) {
  const stamps: number[] = [];
  const prune = (now: number) => {
    while (stamps.length && stamps[0] < now - windowMs) stamps.shift();
  };
  return {
    tick(now = Date.now()) {
      stamps.push(now);
      prune(now);
    },
    perSecond(now = Date.now()) {
      prune(now);
      return stamps.length / (windowMs / 1000);
    },
  };
}

/** Today's behaviour: chunks run on this process's piscina pool. */
export function createInProcessDispatcher(pool: SimPool): ChunkDispatcher {
  let inFlight = 0;
  const rate = createRateMeter();
  return {
    mode: "embedded",
    capacity: () => Math.max(1, pool.capacity),
    async run(job) {
      inFlight++;
      try {
        return await pool.runChunk(job.task, { keepPacked: true });
      } finally {
        inFlight--;
        rate.tick();
      }
    },
    onWake() {},
    stats: () => ({
      mode: "embedded",
      redis: null,
      window: Math.max(1, pool.capacity),
      inFlight,
      queueDepth: 0,
      chunksPerSecond: rate.perSecond(),
      workers: [],
    }),
    close: () => pool.destroy(),
  };
}
