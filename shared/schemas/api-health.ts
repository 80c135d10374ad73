/**
 * GET /api/health (public) and GET /api/admin/compute (site admins): where
 * chunks run and how the compute is doing. Embedded: the server's own pool.
 * Distributed (LINGER_REDIS_URL): worker processes reached through Redis, each
 * with its last heartbeat. Public health leaves out worker host names and
 * process ids; the admin route has them.
 */
import { z } from "zod";

export const WorkerInfoSchema = z.object({
  id: z.string(),
  host: z.string(),
  pid: z.number().int(),
  threads: z.number().int(),
  engineVersion: z.string(),
  /** Chunks running on it now. */
  busy: z.number().int(),
  chunksDone: z.number().int(),
  startedAt: z.string(),
  lastHeartbeat: z.string(),
});
export type WorkerInfo = z.infer<typeof WorkerInfoSchema>;

export const PublicWorkerSchema = WorkerInfoSchema.pick({
  threads: true,
  engineVersion: true,
  busy: true,
  chunksDone: true,
  lastHeartbeat: true,
});

export const ComputeStatusSchema = z.object({
  mode: z.enum(["embedded", "redis"]),
  /** Connection to Redis (null when embedded). */
  redis: z.enum(["connected", "disconnected"]).nullable(),
  /** Chunks the server hands out at once (the feeding window). */
  window: z.number().int(),
  /** Chunks handed out and not yet back. */
  inFlight: z.number().int(),
  /** Chunks queued in Redis that no worker has started (embedded: 0). */
  queueDepth: z.number().int(),
  /** Chunks back per second over the last minute. */
  chunksPerSecond: z.number(),
  workerCount: z.number().int(),
  workers: z.array(WorkerInfoSchema),
});
export type ComputeStatus = z.infer<typeof ComputeStatusSchema>;

export const PublicComputeStatusSchema = ComputeStatusSchema.extend({ workers: z.array(PublicWorkerSchema) });

export const HealthSchema = z.object({
  status: z.enum(["ok", "degraded"]),
  version: z.string(),
  database: z.object({ state: z.enum(["ok", "error"]), journalMode: z.string() }),
  pool: z.object({
    threads: z.number().int(),
    queuedRuns: z.number().int(),
    runningRuns: z.number().int(),
    busyThreads: z.number().int(),
  }),
  compute: PublicComputeStatusSchema,
});
export type Health = z.infer<typeof HealthSchema>;
