/**
 * The Redis dispatcher (LINGER_REDIS_URL set): the run queue's chunks go on a
 * BullMQ queue, worker processes (`npm run worker`, any machine) compute them
 * and put each result on a results queue, which this server consumes and
 * hands back to the run queue, which stores it (the only writer of SQLite).
 *
 * Faults:
 *  - a worker killed mid-chunk: its lock expires and BullMQ's stalled check
 *    (run by the other workers) puts the chunk back on the queue; the result is
 *    stored once whatever happens (job ids and chunk rows keyed by run + chunk).
 *  - Redis restarted: ioredis reconnects; chunks this server is waiting for that
 *    Redis no longer has (restarted without its data) are queued again, on
 *    reconnect and on a periodic check.
 *  - this server restarted: the run queue re-reads stored chunks and hands out
 *    only the missing ones; the same job ids make a chunk still queued a no-op.
 */
import { hostname } from "node:os";
import { Queue, Worker } from "bullmq";
import { ENGINE_VERSION } from "@/sim";
import { createRateMeter, type ChunkDispatcher, type ChunkJob, type WorkerInfo } from "./dispatch";
import type { WorkerChunkResult } from "./sim-worker";
import {
  CHUNK_QUEUE,
  HEARTBEAT_PATTERN,
  REDIS_PREFIX,
  RESULT_QUEUE,
  chunkJobId,
  decodeResult,
  redactRedisUrl,
  redisConnection,
  type ChunkJobData,
  type ResultJobData,
} from "./redis-protocol";

export interface RedisDispatcherOptions {
  url: string;
  /** Fixed feeding window (chunks out at once); default: twice the live workers' threads, at least 4. */
  window?: number;
  /** How often chunks being waited for are checked against Redis, ms (default 5000). */
  reconcileMs?: number;
  /** How often worker heartbeats and queue counts are read, ms (default 2000). */
  statsMs?: number;
  log?: (msg: string) => void;
}

interface Waiter {
  job: ChunkJob;
  resolve: (r: WorkerChunkResult) => void;
  reject: (e: Error) => void;
}

export const MIN_WINDOW = 4;

export function createRedisDispatcher(opts: RedisDispatcherOptions): ChunkDispatcher {
  const log = opts.log ?? ((m: string) => console.log(`[redis] ${m}`));
  const where = redactRedisUrl(opts.url);
  const conn = redisConnection(opts.url, `linger-server-${hostname()}-${process.pid}`);
  let down = false;
  let closed = false;
  conn.on("error", (e) => {
    if (!down && !closed) log(`Redis at ${where} unreachable (${e.message}); retrying, queued chunks wait.`);
    down = true;
  });
  conn.on("ready", () => {
    if (down) {
      log(`Redis at ${where} is back; checking for chunks it lost.`);
      down = false;
      void reconcile();
    }
  });
  const chunks = new Queue<ChunkJobData>(CHUNK_QUEUE, {
    connection: conn,
    prefix: REDIS_PREFIX,
    defaultJobOptions: { removeOnComplete: true, removeOnFail: { age: 24 * 3600 } },
  });
  const resultsQueue = new Queue<ResultJobData>(RESULT_QUEUE, { connection: conn, prefix: REDIS_PREFIX });
  chunks.on("error", () => {});
  resultsQueue.on("error", () => {});
  const waiters = new Map<string, Waiter>();
  const rate = createRateMeter();
  const wakers: (() => void)[] = [];
  const wake = () => wakers.forEach((f) => f());

  const resultsConn = redisConnection(opts.url, `linger-server-results-${process.pid}`);
  resultsConn.on("error", () => {});
  const results = new Worker<ResultJobData>(
    RESULT_QUEUE,
    async (job) => {
      const { runId, chunkIndex } = job.data;
      const id = chunkJobId(runId, chunkIndex);
      const w = waiters.get(id);
      // No one waiting: a duplicate of a chunk already stored, or a cancelled run's chunk.
      if (!w) return "dropped";
      waiters.delete(id);
      rate.tick();
      if (job.data.error !== undefined) w.reject(new Error(job.data.error));
      else w.resolve(decodeResult(job.data.result!));
      // The run queue stores the chunk synchronously when the promise settles: let it, so this result
      // job completes only after the chunk is in SQLite (a crash before that redelivers it).
      await new Promise((r) => setImmediate(r));
      return "stored";
    },
    {
      connection: resultsConn,
      prefix: REDIS_PREFIX,
      concurrency: 1,
    },
  );
  results.on("error", () => {});

  function submit(id: string, job: ChunkJob) {
    const data: ChunkJobData = {
      runId: job.runId,
      labId: job.labId,
      chunkIndex: job.chunkIndex,
      engineVersion: ENGINE_VERSION,
      task: job.task,
    };
    chunks.add("chunk", data, { jobId: id }).catch((e) => {
      // Redis unreachable: the periodic check queues it again.
      if (!closed) log(`chunk ${job.chunkIndex} of run ${job.runId} not queued yet (${(e as Error).message})`);
    });
  }

  let reconciling = false;
  async function reconcile() {
    if (reconciling || closed) return;
    reconciling = true;
    let lost = 0;
    try {
      for (const [id, w] of [...waiters]) {
        const state = await chunks.getJobState(id);
        if (!waiters.has(id) || closed) continue;
        if (state === "failed") {
          const j = await chunks.getJob(id);
          waiters.delete(id);
          await j?.remove().catch(() => {});
          w.reject(
            new Error(`chunk ${w.job.chunkIndex} failed on the workers: ${j?.failedReason ?? "no reason given"}`),
          );
          continue;
        }
        if (state !== "unknown") continue;
        // Not queued, not running: finished with its result on the way, or lost with a Redis restart.
        const resultState = await resultsQueue.getJobState(id);
        if (resultState !== "unknown" || !waiters.has(id)) continue;
        lost++;
        submit(id, w.job);
      }
      if (lost > 0) log(`queued ${lost} chunk(s) again that Redis no longer had`);
    } catch {
      // Redis down: the next check tries again.
    } finally {
      reconciling = false;
    }
  }
  const reconcileTimer = setInterval(() => void reconcile(), opts.reconcileMs ?? 5000);
  reconcileTimer.unref();

  let workers: WorkerInfo[] = [];
  let queueDepth = 0;
  let liveThreads = 0;
  async function refreshStats() {
    if (closed) return;
    try {
      const counts = await chunks.getJobCounts("waiting", "delayed", "prioritized", "paused");
      queueDepth = Object.values(counts).reduce((s, n) => s + n, 0);
      const keys: string[] = [];
      let cursor = "0";
      do {
        const [next, found] = await conn.scan(cursor, "MATCH", HEARTBEAT_PATTERN, "COUNT", 200);
        cursor = next;
        keys.push(...found);
      } while (cursor !== "0");
      const values = keys.length ? await conn.mget(...keys) : [];
      workers = values
        .filter((v): v is string => !!v)
        .map((v) => JSON.parse(v) as WorkerInfo)
        .sort((a, b) => a.id.localeCompare(b.id));
      const threads = workers.reduce((s, w) => s + w.threads, 0);
      if (threads > liveThreads) {
        liveThreads = threads;
        wake();
      } else liveThreads = threads;
    } catch {
      // Redis down: keep the last figures; the connection state says so.
    }
  }
  const statsTimer = setInterval(() => void refreshStats(), opts.statsMs ?? 2000);
  statsTimer.unref();
  void refreshStats();

  const capacity = () => opts.window ?? Math.max(MIN_WINDOW, 2 * liveThreads);

  return {
    mode: "redis",
    capacity,
    run(job) {
      const id = chunkJobId(job.runId, job.chunkIndex);
      return new Promise<WorkerChunkResult>((resolve, reject) => {
        waiters.set(id, { job, resolve, reject });
        submit(id, job);
      });
    },
    onWake(fn) {
      wakers.push(fn);
    },
    stats: () => ({
      mode: "redis",
      redis: conn.status === "ready" ? "connected" : "disconnected",
      window: capacity(),
      inFlight: waiters.size,
      queueDepth,
      chunksPerSecond: rate.perSecond(),
      workers,
    }),
    async close() {
      closed = true;
      clearInterval(reconcileTimer);
      clearInterval(statsTimer);
      waiters.clear();
      const done = Promise.allSettled([results.close(), chunks.close(), resultsQueue.close()]).then(() => true);
      // With Redis down, closing waits for a reconnect that may never come: force it after a few seconds
      // (a result being stored then is redelivered to the next server, and ignored if already stored).
      const sleep = (ms: number) => new Promise<false>((r) => setTimeout(() => r(false), ms).unref());
      if (!(await Promise.race([done, sleep(3000)])))
        await Promise.race([results.close(true).catch(() => {}), sleep(1000)]);
      conn.disconnect();
      resultsConn.disconnect();
    },
  };
}
