/**
 * Configuration from the environment, parsed once at boot. A bad value stops
 * the server with a message naming the variable.
 */
import { z } from "zod";
import { availableParallelism } from "node:os";

const bool = (fallback: boolean) =>
  z
    .enum(["0", "1", "true", "false", "yes", "no"])
    .optional()
    .transform((v) => (v === undefined ? fallback : ["1", "true", "yes"].includes(v)));

/** Like bool, but undefined when the variable is not set (so "explicitly on" can be told apart from the default). */
const optionalBool = z
  .enum(["0", "1", "true", "false", "yes", "no"])
  .optional()
  .transform((v) => (v === undefined ? undefined : ["1", "true", "yes"].includes(v)));

/** True for addresses only this machine can reach: localhost, 127.0.0.0/8, ::1. */
export function isLoopbackHost(host: string): boolean {
  const h = host
    .trim()
    .toLowerCase()
    .replace(/^\[|\]$/g, "");
  return h === "localhost" || h === "::1" || /^127(\.\d{1,3}){3}$/.test(h) || h === "::ffff:127.0.0.1";
}

export const EnvSchema = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(8080),
  /** Listen address: only this machine by default; set 0.0.0.0 (or an interface address) to serve others. */
  HOST: z.string().min(1).default("127.0.0.1"),
  DATABASE_URL: z.string().min(1).default("./data/linger.db"),
  LINGER_BASE_URL: z.string().url().optional(),
  LINGER_SESSION_SECRET: z.string().min(16, "must be at least 16 characters").optional(),
  LINGER_DEMO_PASSWORD: z.string().min(8, "must be at least 8 characters").default("linger-demo-2026"),
  /** Demo accounts have published passwords: seeded by default only when HOST is loopback; "1" forces, "0" skips. */
  LINGER_SEED_DEMO: optionalBool,
  LINGER_SECURE_COOKIES: bool(false),
  LINGER_POOL_SIZE: z.coerce.number().int().min(1).max(64).optional(),
  /** Nice value of simulation threads (Linux; 0 leaves their priority alone): see server/compute/thread-priority.ts. */
  LINGER_WORKER_NICE: z.coerce.number().int().min(0).max(19).optional(),
  /** SMTP URL of a real mail server; without it a local fake SMTP server keeps mail in the outbox. */
  LINGER_SMTP_URL: z.string().optional(),
  LINGER_MAIL_FROM: z.string().default("Linger <linger@example.org>"),
  /** Serve the exported web build from this folder. */
  LINGER_WEB_DIST: z.string().default("dist"),
  /** Wall-time cap per chunk of replicates, in seconds. */
  LINGER_CHUNK_WALL_SECONDS: z.coerce.number().gt(0).default(600),
  /** Computing time one request may use for threshold, estimate and control ODEs (off the event loop); past it, 422. */
  LINGER_COMPUTE_WALL_SECONDS: z.coerce.number().gt(0).default(10),
  LINGER_LOG_REQUESTS: bool(false),
  /** Distributed mode: chunks go to worker processes through this Redis (redis:// or rediss://, with the password). */
  LINGER_REDIS_URL: z
    .string()
    .regex(/^rediss?:\/\//, "must start with redis:// or rediss://")
    .optional(),
  /** Distributed mode: chunks out at once (queued or running on workers); default twice the live workers' threads, at least 4. */
  LINGER_QUEUE_WINDOW: z.coerce.number().int().min(1).max(10000).optional(),
  /** Set by the test runner: quieter logs. */
  LINGER_TEST: bool(false),
});

export type Env = Omit<z.infer<typeof EnvSchema>, "LINGER_SEED_DEMO"> & {
  LINGER_SEED_DEMO: boolean;
  /** Set when demo seeding was skipped because HOST is not loopback and LINGER_SEED_DEMO=1 was not given. */
  seedRefused: string | null;
  poolSize: number;
  baseUrl: string;
};

export function parseEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const parsed = EnvSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid configuration:\n${lines.join("\n")}`);
  }
  const env = parsed.data;
  // Every core simulates: the event loop only receives typed arrays and writes them (docs/benchmarks.md).
  const poolSize = env.LINGER_POOL_SIZE ?? Math.max(1, availableParallelism());
  const baseUrl = (env.LINGER_BASE_URL ?? `http://localhost:${env.PORT}`).replace(/\/$/, "");
  const loopback = isLoopbackHost(env.HOST);
  const seed = env.LINGER_SEED_DEMO ?? loopback;
  const seedRefused =
    env.LINGER_SEED_DEMO === undefined && !loopback
      ? `Demo accounts (published passwords) are not seeded: HOST=${env.HOST} is reachable from other machines. Set LINGER_SEED_DEMO=1 to seed them anyway.`
      : null;
  return { ...env, LINGER_SEED_DEMO: seed, seedRefused, poolSize, baseUrl };
}

/** The chunk worker's configuration (`npm run worker`): the Redis URL and its own pool. */
export const WorkerEnvSchema = z.object({
  LINGER_REDIS_URL: z
    .string({ error: "is required: the Redis the server queues chunks on, e.g. redis://:PASSWORD@host:6379" })
    .regex(/^rediss?:\/\//, "must start with redis:// or rediss://"),
  /** Simulation threads of this worker (default: the machine's cores). */
  LINGER_WORKER_THREADS: z.coerce.number().int().min(1).max(256).optional(),
  /** Chunk lock: a killed worker's chunks are retried after about twice this (default 30 s). */
  LINGER_WORKER_LOCK_SECONDS: z.coerce.number().gt(0).default(30),
  /** On SIGTERM, how long current chunks may finish before they are handed back (default 30 s). */
  LINGER_WORKER_DRAIN_SECONDS: z.coerce.number().min(0).default(30),
  LINGER_WORKER_HEARTBEAT_SECONDS: z.coerce.number().gt(0).default(5),
});

export type WorkerEnv = z.infer<typeof WorkerEnvSchema> & { threads: number };

export function parseWorkerEnv(source: NodeJS.ProcessEnv = process.env): WorkerEnv {
  const parsed = WorkerEnvSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid worker configuration:\n${lines.join("\n")}`);
  }
  return { ...parsed.data, threads: parsed.data.LINGER_WORKER_THREADS ?? availableParallelism() };
}
