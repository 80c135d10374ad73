/**
 * What the server and the worker processes agree on in Redis: queue names,
 * job ids, job data, how results travel, and the heartbeat keys. Nothing else
 * is shared: a worker has no database and no secrets beyond the Redis URL.
 *
 * Results travel as Node's structured-clone serialisation (v8.serialize) in
 * base64, so typed arrays, NaN, infinities and -0 arrive bit for bit (JSON
 * would turn NaN and Infinity into null and change the stored statistics).
 */
import { deserialize, serialize } from "node:v8";
import IORedis, { type Redis } from "ioredis";
import type { SimTask } from "./sim-task";
import type { WorkerChunkResult } from "./sim-worker";

/** Key prefix of every BullMQ key and heartbeat Linger writes. */
export const REDIS_PREFIX = "linger";
/** Chunks to compute: server -> workers. */
export const CHUNK_QUEUE = "chunks";
/** Computed chunks: workers -> server (the only writer of SQLite). */
export const RESULT_QUEUE = "results";
export const HEARTBEAT_KEY = (workerId: string) => `${REDIS_PREFIX}:workers:${workerId}`;
export const HEARTBEAT_PATTERN = `${REDIS_PREFIX}:workers:*`;

/** One id per (run, chunk index), for the chunk job and its result: a re-queued chunk cannot exist twice. */
export const chunkJobId = (runId: string, chunkIndex: number) => `${runId}~${chunkIndex}`;

export interface ChunkJobData {
  runId: string;
  labId: string;
  chunkIndex: number;
  /** The engine that must compute it (ENGINE_VERSION of the server that queued it). */
  engineVersion: string;
  task: SimTask;
}

export interface ResultJobData {
  runId: string;
  chunkIndex: number;
  workerId: string;
  /** base64 of v8.serialize(WorkerChunkResult), or absent when `error` is set. */
  result?: string;
  error?: string;
}

export const encodeResult = (r: WorkerChunkResult): string => serialize(r).toString("base64");
export const decodeResult = (s: string): WorkerChunkResult => deserialize(Buffer.from(s, "base64"));

/**
 * A Redis connection as BullMQ wants it for blocking commands (no per-request
 * retry limit: commands wait while ioredis reconnects, which it does forever
 * with a capped back-off).
 */
export function redisConnection(url: string, name: string): Redis {
  return new IORedis(url, {
    maxRetriesPerRequest: null,
    connectionName: name,
    retryStrategy: (times) => Math.min(200 * times, 2000),
  });
}

/** "linger-engine 1.2.3" -> [1, 2, 3] (missing parts are 0), for saying which side is older. */
export function engineVersionParts(v: string): number[] {
  const m = /(\d+)(?:\.(\d+))?(?:\.(\d+))?/.exec(v);
  return m ? [Number(m[1]), Number(m[2] ?? 0), Number(m[3] ?? 0)] : [0, 0, 0];
}

export function compareEngineVersions(a: string, b: string): number {
  const x = engineVersionParts(a);
  const y = engineVersionParts(b);
  for (let i = 0; i < 3; i++) if (x[i] !== y[i]) return x[i] - y[i];
  return 0;
}

/** Redis URL with any password hidden, for log lines. */
export function redactRedisUrl(url: string): string {
  try {
    const u = new URL(url);
    if (u.password) u.password = "***";
    return u.toString();
  } catch {
    return "(unparsable Redis URL)";
  }
}
