/**
 * Builds the long-lived services from the configuration: database (migrated),
 * mailer, compute pool and run queue; seeds demo data unless switched off.
 */
import { openDatabase } from "../db/client";
import type { AppContext } from "./context";
import { parseEnv, type Env } from "./env";
import { APP_VERSION } from "./version";
import { createMailer } from "./services/mail.service";
import { createIdleQueue } from "./services/run-queue";
import { seedDemo } from "./services/demo-seed";

export interface Booted {
  ctx: AppContext;
  shutdown(): Promise<void>;
}

export async function boot(env: Env = parseEnv()): Promise<Booted> {
  const handle = openDatabase(env.DATABASE_URL);
  const mailer = await createMailer(env, { db: handle.db });
  const queue = createIdleQueue();
  const ctx: AppContext = { db: handle.db, sqlite: handle.sqlite, env, version: APP_VERSION, mailer, queue, poolSize: env.poolSize };
  if (env.LINGER_SEED_DEMO) await seedDemo(ctx);
  queue.kick();
  return {
    ctx,
    async shutdown() {
      await queue.close();
      await mailer.close();
      handle.close();
    },
  };
}
