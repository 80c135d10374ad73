/**
 * Builds the long-lived services from the configuration: database (migrated),
 * mailer, compute pool and run queue; seeds demo data unless switched off.
 */
import { openDatabase } from "@/db/client";
import type { AppContext } from "./context";
import { parseEnv, type Env } from "./env";
import { APP_VERSION } from "./version";
import { createMailer, mailSettled } from "@/server/services/mail.service";
import { createRunQueue } from "@/server/compute/run-queue";
import { createSimPool } from "@/server/compute/pool";
import { createInProcessDispatcher } from "@/server/compute/dispatch";
import { createRedisDispatcher } from "@/server/compute/redis-dispatch";
import { closeComputePool, createComputeService } from "@/server/compute/compute-service";
import { onRunEnded } from "@/server/compute/run-events";
import { purgeDeleted } from "@/server/services/runs.service";
import { seedDemo } from "@/server/demo/seed";
import "@/server/demo/content";

export interface Booted {
  ctx: AppContext;
  shutdown(): Promise<void>;
}

export async function boot(env: Env = parseEnv()): Promise<Booted> {
  const handle = openDatabase(env.DATABASE_URL);
  const mailer = await createMailer(env, { db: handle.db });
  // Chunks run on this process's pool, or on worker processes through Redis when LINGER_REDIS_URL is set.
  const dispatcher = env.LINGER_REDIS_URL
    ? createRedisDispatcher({ url: env.LINGER_REDIS_URL, window: env.LINGER_QUEUE_WINDOW })
    : createInProcessDispatcher(createSimPool({ threads: env.poolSize }));
  const ctx = {
    db: handle.db,
    sqlite: handle.sqlite,
    env,
    version: APP_VERSION,
    mailer,
    poolSize: env.poolSize,
    compute: createComputeService({ wallSeconds: env.LINGER_COMPUTE_WALL_SECONDS }),
  } as AppContext;
  ctx.queue = createRunQueue({
    db: handle.db,
    sqlite: handle.sqlite,
    dispatcher,
    chunkWallMs: env.LINGER_CHUNK_WALL_SECONDS * 1000,
    onRunEnded: (runId, status) => onRunEnded(ctx, runId, status),
    log: env.LINGER_TEST ? () => {} : undefined,
  });
  const queue = ctx.queue;
  if (env.seedRefused) console.warn(`[boot] ${env.seedRefused}`);
  if (env.LINGER_SEED_DEMO) await seedDemo(ctx);
  queue.kick();
  // Deleted runs and trace sets stay restorable for the undo period, then go for good.
  purgeDeleted(ctx);
  const purge = setInterval(() => purgeDeleted(ctx), 6 * 3600_000);
  purge.unref();
  return {
    ctx,
    async shutdown() {
      clearInterval(purge);
      await queue.close();
      await closeComputePool();
      await mailSettled(mailer);
      await mailer.close();
      handle.close();
    },
  };
}
