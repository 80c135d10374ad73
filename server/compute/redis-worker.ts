/**
 * A chunk worker (`npm run worker`): takes chunks from the BullMQ queue in
 * Redis, computes them on its own piscina pool (./pool.ts, ./sim-worker.ts,
 * exactly what the embedded server runs) and puts each result on the results
 * queue. It needs the Redis URL and nothing else: no database, no secrets.
 *
 * - Engine versions must match: a chunk queued by a server with another engine
 *   is refused with a log line and goes back on the queue (delayed) for a
 *   worker that has it; results of two engines never mix in one run.
 * - Heartbeat: a key with this worker's figures, refreshed every few seconds,
 *   expiring when the worker is gone (the server's admin page and /api/health).
 * - close(): stops taking chunks, lets the current ones finish for up to
 *   drainMs, then hands back what is still running (moved back to the queue).
 * - Stall timeout: a worker killed outright holds its chunks' locks for
 *   lockMs; the other workers' stalled check (every lockMs) then puts them back,
 *   so a chunk is retried within about 2 x lockMs (default 30 s: within a minute).
 */
import { hostname } from "node:os";
import { DelayedError, Queue, WaitingError, Worker, type Job } from "bullmq";
import { ENGINE_VERSION } from "@/sim";
import { createSimPool } from "./pool";
import type { WorkerInfo } from "./dispatch";
import {
  CHUNK_QUEUE,
  HEARTBEAT_KEY,
  REDIS_PREFIX,
  RESULT_QUEUE,
  chunkJobId,
  compareEngineVersions,
  encodeResult,
  redactRedisUrl,
  redisConnection,
  type ChunkJobData,
  type ResultJobData,
} from "./redis-protocol";

export interface ChunkWorkerOptions {
  url: string;
  threads: number;
  /** Default: host name and process id. */
  id?: string;
  /** The engine this worker runs (tests pretend to be an older one). */
  engineVersion?: string;
  /** Chunk lock, ms: the stall timeout after a worker dies (default 30000). */
  lockMs?: number;
  heartbeatMs?: number;
  /** How long a refused chunk waits before it is offered again, ms (default 5000). */
  refuseDelayMs?: number;
  log?: (msg: string) => void;
}

export interface ChunkWorker {
  id: string;
  /** Resolves once connected and taking chunks. */
  ready: Promise<void>;
  info(): WorkerInfo;
  /** Graceful stop: finish current chunks for up to drainMs (default 30000), hand the rest back. */
  close(drainMs?: number): Promise<void>;
}

class HandBack extends Error {}

export function createChunkWorker(opts: ChunkWorkerOptions): ChunkWorker {
  const log = opts.log ?? ((m: string) => console.log(`[worker] ${m}`));
  const id = opts.id ?? `${hostname()}-${process.pid}`;
  const engineVersion = opts.engineVersion ?? ENGINE_VERSION;
  const lockMs = opts.lockMs ?? 30_000;
  const heartbeatMs = opts.heartbeatMs ?? 5000;
  const pool = createSimPool({ threads: opts.threads });
  const conn = redisConnection(opts.url, `linger-worker-${id}`);
  let down = false;
  conn.on("error", (e) => {
    if (!down) log(`Redis at ${redactRedisUrl(opts.url)} unreachable (${e.message}); retrying.`);
    down = true;
  });
  conn.on("ready", () => {
    if (down) log("Redis is back; taking chunks again.");
    down = false;
  });
  const resultsQueue = new Queue<ResultJobData>(RESULT_QUEUE, { connection: conn, prefix: REDIS_PREFIX });
  resultsQueue.on("error", () => {});
  const startedAt = new Date().toISOString();
  let busy = 0;
  let chunksDone = 0;
  const refusedRuns = new Set<string>();
  const handBack = new Set<(e: Error) => void>();

  const info = (): WorkerInfo => ({
    id,
    host: hostname(),
    pid: process.pid,
    threads: pool.threads,
    engineVersion,
    busy,
    chunksDone,
    startedAt,
    lastHeartbeat: new Date().toISOString(),
  });

  async function processChunk(job: Job<ChunkJobData>, token?: string) {
    const d = job.data;
    if (d.engineVersion !== engineVersion) {
      if (!refusedRuns.has(d.runId)) {
        refusedRuns.add(d.runId);
        const older = compareEngineVersions(engineVersion, d.engineVersion) < 0;
        log(
          `Refusing chunks of run ${d.runId}: they need ${d.engineVersion}, this worker runs ${engineVersion} (${older ? "older" : "newer"}). ` +
            `${older ? "Update Linger on this machine (git pull, npm ci) and restart the worker" : "Run a worker with the server's version"}; the chunks go back on the queue for another worker.`,
        );
      }
      await job.moveToDelayed(Date.now() + (opts.refuseDelayMs ?? 5000), token);
      throw new DelayedError();
    }
    busy++;
    const t0 = performance.now();
    let stopper: (e: Error) => void = () => {};
    try {
      const computed = pool.runChunk(d.task);
      const stop = new Promise<never>((_, reject) => {
        stopper = reject;
        handBack.add(reject);
      });
      let data: ResultJobData;
      try {
        const result = await Promise.race([computed, stop]);
        result.seconds = (performance.now() - t0) / 1000;
        data = { runId: d.runId, chunkIndex: d.chunkIndex, workerId: id, result: encodeResult(result) };
      } catch (e) {
        if (e instanceof HandBack) {
          computed.catch(() => {});
          await job.moveToWait(token);
          throw new WaitingError();
        }
        data = { runId: d.runId, chunkIndex: d.chunkIndex, workerId: id, error: (e as Error)?.message ?? String(e) };
      }
      // The result job has the chunk's id too: a chunk computed twice (after a stall) is delivered once.
      await resultsQueue.add("result", data, {
        jobId: chunkJobId(d.runId, d.chunkIndex),
        removeOnComplete: true,
        removeOnFail: true,
      });
      chunksDone++;
      return "done";
    } finally {
      handBack.delete(stopper);
      busy--;
    }
  }

  const worker = new Worker<ChunkJobData>(CHUNK_QUEUE, processChunk, {
    connection: conn,
    prefix: REDIS_PREFIX,
    concurrency: pool.threads,
    lockDuration: lockMs,
    stalledInterval: lockMs,
    // A chunk that kills its worker three times fails the run (with BullMQ's reason) rather than looping.
    maxStalledCount: 3,
  });
  worker.on("error", () => {});

  const beat = async () => {
    try {
      await conn.set(HEARTBEAT_KEY(id), JSON.stringify(info()), "PX", heartbeatMs * 3);
    } catch {
      // Redis down: the next beat tries again.
    }
  };
  const beatTimer = setInterval(() => void beat(), heartbeatMs);
  beatTimer.unref();
  const ready = worker.waitUntilReady().then(async () => {
    await beat();
    log(`worker ${id} (${engineVersion}, ${pool.threads} thread(s)) taking chunks from ${redactRedisUrl(opts.url)}`);
  });

  return {
    id,
    ready,
    info,
    async close(drainMs = 30_000) {
      clearInterval(beatTimer);
      const closing = worker.close();
      const timer = setTimeout(() => {
        if (busy > 0) log(`handing ${busy} unfinished chunk(s) back to the queue`);
        for (const f of [...handBack]) f(new HandBack("shutting down"));
      }, drainMs);
      // Redis down while closing: BullMQ would wait for it; force the close a few seconds after the drain time.
      const force = new Promise<void>((r) =>
        setTimeout(() => void worker.close(true).then(r, r), drainMs + 5000).unref(),
      );
      await Promise.race([closing, force]);
      clearTimeout(timer);
      const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms).unref());
      await Promise.race([resultsQueue.close().catch(() => {}), sleep(2000)]);
      if (conn.status === "ready") await Promise.race([conn.del(HEARTBEAT_KEY(id)).catch(() => {}), sleep(1000)]);
      conn.disconnect();
      await pool.destroy();
    },
  };
}
