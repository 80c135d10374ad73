/**
 * An app for API tests, without a port: a fresh database file in a temp
 * folder (migrations applied), the fake-SMTP mailer (mail lands in the outbox
 * table), demo accounts seeded with DEMO_PASSWORD, and the idle run queue
 * unless a `queue` factory is given. Build it with `createApp(ctx)` exactly as
 * the server does; drive it with supertest.
 *
 *   const t = await makeTestContext();
 *   const owner = await signIn(t.app, "owner@example.org");
 *   await owner.get("/api/me").expect(200);
 *   await t.close();
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import assert from "node:assert/strict";
import request from "supertest";
import { asc, eq } from "drizzle-orm";
import type { Express } from "express";
import { openDatabase, schema } from "@/db/client";
import { createApp } from "@/server/app";
import type { AppContext } from "@/server/context";
import { parseEnv } from "@/server/env";
import { APP_VERSION } from "@/server/version";
import { createMailer, mailSettled, nullMailer, type Mailer } from "@/server/services/mail.service";
import { createIdleQueue, type RunQueue } from "@/server/compute/run-queue";
import { createComputeService } from "@/server/compute/compute-service";
import { seedDemo, seedDemoAccounts } from "@/server/demo/seed";
import "@/server/demo/content";
import { DEMO_PASSWORD } from "./test-server";

export { DEMO_PASSWORD };
export const TEST_BASE_URL = "http://linger.test";

export interface TestContextOptions {
  /** Environment overrides (strings, as in process.env). process.env itself is not read. */
  env?: Record<string, string>;
  /** "accounts" (default): demo lab and accounts only; "full": every registered demo seeder; "none": empty instance. */
  seed?: "accounts" | "full" | "none";
  /** Build the run queue once the context exists (default: the idle queue). */
  queue?: (ctx: AppContext) => RunQueue | Promise<RunQueue>;
  /** "fake" (default): local fake SMTP server writing to the outbox; "null": drop mail; or a mailer of your own. */
  mailer?: "fake" | "null" | Mailer;
}

export interface TestApp {
  ctx: AppContext;
  app: Express;
  dir: string;
  dbPath: string;
  /** Ids of the demo lab and its owner when seeded. */
  demoLab: { id: string; ownerId: string } | null;
  /** Mail in the outbox, oldest first, optionally only to one address. */
  outbox(to?: string): { to: string; from: string; subject: string; text: string }[];
  /** Waits until queued mail (password reset) has reached the outbox. */
  settleMail(): Promise<void>;
  close(): Promise<void>;
}

export async function makeTestContext(opts: TestContextOptions = {}): Promise<TestApp> {
  const dir = mkdtempSync(join(tmpdir(), "linger-test-"));
  const dbPath = join(dir, "linger.db");
  const seed = opts.seed ?? "accounts";
  const env = parseEnv({
    DATABASE_URL: dbPath,
    LINGER_BASE_URL: TEST_BASE_URL,
    LINGER_DEMO_PASSWORD: DEMO_PASSWORD,
    LINGER_SESSION_SECRET: "test-secret-0123456789abcdef",
    LINGER_POOL_SIZE: "1",
    LINGER_SEED_DEMO: seed === "none" ? "0" : "1",
    LINGER_WEB_DIST: join(dir, "no-web-build"),
    ...opts.env,
  } as unknown as NodeJS.ProcessEnv);
  const handle = openDatabase(dbPath);
  const mailer =
    opts.mailer === "null"
      ? nullMailer
      : opts.mailer && typeof opts.mailer === "object"
        ? opts.mailer
        : await createMailer(env, { db: handle.db });
  const ctx: AppContext = {
    db: handle.db,
    sqlite: handle.sqlite,
    env,
    version: APP_VERSION,
    mailer,
    queue: createIdleQueue(),
    poolSize: env.poolSize,
    compute: createComputeService({ wallSeconds: env.LINGER_COMPUTE_WALL_SECONDS }),
  };
  if (opts.queue) ctx.queue = await opts.queue(ctx);
  let demoLab: TestApp["demoLab"] = null;
  if (seed === "accounts") demoLab = await seedDemoAccounts(ctx);
  if (seed === "full") {
    await seedDemo(ctx);
    demoLab = await seedDemoAccounts(ctx);
  }
  const app = createApp(ctx);
  let closed = false;
  return {
    ctx,
    app,
    dir,
    dbPath,
    demoLab,
    outbox(to?: string) {
      const o = schema.outbox;
      return ctx.db
        .select({ to: o.to, from: o.from, subject: o.subject, text: o.text })
        .from(o)
        .where(to ? eq(o.to, to) : undefined)
        .orderBy(asc(o.id))
        .all();
    },
    settleMail: () => mailSettled(mailer),
    async close() {
      if (closed) return;
      closed = true;
      await ctx.queue.close();
      await mailSettled(mailer);
      await mailer.close();
      handle.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Signs in through the API and returns a supertest agent carrying the session cookie. */
export async function signIn(app: Express, email: string, password: string = DEMO_PASSWORD) {
  const agent = request.agent(app);
  const r = await agent.post("/api/auth/sign-in").send({ email, password });
  assert.equal(r.status, 200, `sign-in as ${email} answered ${r.status}: ${JSON.stringify(r.body)}`);
  return agent;
}

/** The token of the first link to `path` (e.g. "/reset") in a mail text. */
export function tokenFromMail(text: string, path: string): string {
  const m = new RegExp(`${TEST_BASE_URL.replace(/[.]/g, "\\.")}${path}\\?token=([A-Za-z0-9_%-]+)`).exec(text);
  assert.ok(m, `no ${path} link in mail:\n${text}`);
  return decodeURIComponent(m[1]);
}
