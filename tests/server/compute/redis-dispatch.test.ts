/**
 * Distributed mode against a real redis-server and real worker processes
 * (server/worker.ts forked, one piscina thread each): the same spec and seed
 * give the same statistics hash as the embedded pool, also when a worker is
 * SIGKILLed, Redis is restarted (losing its data) or the server is restarted
 * mid-run, and no chunk is ever stored twice.
 */
import { after, before, describe, test } from "node:test";
import assert from "node:assert/strict";
import { eq, sql } from "drizzle-orm";
import { schema } from "@/db/client";
import { makeTestContext, signIn, type TestApp } from "@/tests/helpers/test-app";
import { launchBody, realQueue, redisQueue, waitForRun } from "@/tests/helpers/run-helpers";
import {
  redisSkipReason,
  startRedis,
  startWorker,
  stopWorker,
  type RedisHandle,
  type WorkerProcess,
} from "@/tests/helpers/redis-server";
import { createChunkWorker } from "@/server/compute/redis-worker";
import type { RunQueue } from "@/server/compute/run-queue";

const skip = redisSkipReason();
// 3,000 replicates of the simple circuit over 200 min: 30 chunks, a few seconds of compute.
const body = () => launchBody({ template: "simple", replicates: 3000, seed: "redis-same-seed", endTimeMinutes: 200 });
const CHUNKS = 30;
// A short lock so a killed worker's chunk is retried within about 2 s (the default is 30 s).
const FAST_STALL = { LINGER_WORKER_LOCK_SECONDS: "1" };

async function launch(t: TestApp) {
  const editor = await signIn(t.app, "editor@example.org");
  const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(body());
  assert.equal(r.status, 201, JSON.stringify(r.body));
  return { editor, id: r.body.id as string };
}

/** Resolves once the run has at least n chunks stored. */
function afterChunks(queue: RunQueue, runId: string, n: number, total = 3000) {
  return new Promise<void>((res) => {
    const on = (p: { runId: string; replicatesDone: number }) => {
      if (p.runId === runId && p.replicatesDone >= (n * total) / CHUNKS) {
        queue.events.off("progress", on);
        res();
      }
    };
    queue.events.on("progress", on);
  });
}

function storedCounts(t: TestApp, runId: string) {
  const chunks = t.ctx.db
    .select({ n: sql<number>`count(*)` })
    .from(schema.runChunks)
    .where(eq(schema.runChunks.runId, runId))
    .get()!.n;
  const reps = t.ctx.db
    .select({ n: sql<number>`count(*)`, distinct: sql<number>`count(distinct replicate)` })
    .from(schema.replicateStats)
    .where(eq(schema.replicateStats.runId, runId))
    .get()!;
  return { chunks, replicates: reps.n, distinctReplicates: reps.distinct };
}

function assertStoredOnce(t: TestApp, runId: string) {
  assert.deepEqual(storedCounts(t, runId), { chunks: CHUNKS, replicates: 3000, distinctReplicates: 3000 });
}

describe("distributed mode (BullMQ on Redis)", { skip: skip ?? false }, () => {
  let embeddedHash = "";
  let redis: RedisHandle;
  const workers: WorkerProcess[] = [];

  before(async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const { editor, id } = await launch(t);
      const done = await waitForRun(editor, id);
      assert.equal(done.status, "finished");
      embeddedHash = done.statsHash;
    } finally {
      await t.close();
    }
    redis = await startRedis();
  });

  after(async () => {
    await Promise.all(workers.map((w) => stopWorker(w, "SIGKILL")));
    await redis?.stop();
  });

  test("two worker processes store the embedded pool's statistics hash", async () => {
    const pair = await Promise.all([startWorker(redis.url), startWorker(redis.url)]);
    workers.push(...pair);
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
      // Both workers took part (30 chunks, fed four or more at a time).
      const health = await editor.get("/api/health").expect(200);
      const compute = health.body.compute;
      assert.equal(compute.mode, "redis");
      assert.equal(compute.redis, "connected");
      assert.equal(compute.workers.length, 2);
      for (const w of compute.workers)
        assert.ok(w.chunksDone > 0, `a worker did no chunk: ${JSON.stringify(compute.workers)}`);
      assert.ok(Date.now() - Date.parse(compute.workers[0].lastHeartbeat) < 30_000);
    } finally {
      await t.close();
      await Promise.all(pair.map((w) => stopWorker(w)));
      workers.splice(0);
    }
  });

  test("a worker SIGKILLed mid-run: its chunk is retried after the stall timeout, stored once, same hash", async () => {
    const [a, b] = await Promise.all([startWorker(redis.url, FAST_STALL), startWorker(redis.url, FAST_STALL)]);
    workers.push(a, b);
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 3);
      a.proc.kill("SIGKILL");
      const { signal } = await a.exited;
      assert.equal(signal, "SIGKILL");
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      await stopWorker(b);
      workers.splice(0);
    }
  });

  test("Redis restarted mid-run (its data lost): the server re-queues what it waits for, same hash", async () => {
    const w = await startWorker(redis.url);
    workers.push(w);
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 3);
      await redis.restart();
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      await stopWorker(w);
      workers.splice(0);
    }
  });

  test("the server restarted mid-run: stored chunks are kept, only missing ones are queued, same hash", async () => {
    const w = await startWorker(redis.url);
    workers.push(w);
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 5);
      await t.ctx.queue.close();
      const before = storedCounts(t, id).chunks;
      assert.ok(before >= 5 && before < CHUNKS, `stored ${before} chunks before the restart`);
      t.ctx.queue = redisQueue(redis.url)(t.ctx);
      t.ctx.queue.kick();
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      await stopWorker(w);
      workers.splice(0);
    }
  });

  test("a worker with another engine version refuses the chunks with a log line; a matching worker computes them", async () => {
    const lines: string[] = [];
    const old = createChunkWorker({
      url: redis.url,
      threads: 1,
      id: "old-engine",
      engineVersion: "linger-engine 0.9.0",
      refuseDelayMs: 200,
      log: (m) => lines.push(m),
    });
    await old.ready;
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    let good: WorkerProcess | null = null;
    try {
      const { editor, id } = await launch(t);
      for (let i = 0; i < 100 && !lines.some((l) => l.startsWith("Refusing")); i++)
        await new Promise((r) => setTimeout(r, 50));
      const refusal = lines.find((l) => l.startsWith("Refusing")) ?? "";
      assert.match(
        refusal,
        new RegExp(
          `Refusing chunks of run ${id}: they need linger-engine \\S+, this worker runs linger-engine 0\\.9\\.0 \\(older\\)`,
        ),
      );
      assert.equal(old.info().chunksDone, 0);
      good = await startWorker(redis.url);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assert.equal(old.info().chunksDone, 0);
    } finally {
      await t.close();
      await old.close(0);
      if (good) await stopWorker(good);
    }
  });

  test("SIGTERM: the worker finishes or hands back its chunk and exits 0; another worker completes the run", async () => {
    const a = await startWorker(redis.url, { LINGER_WORKER_DRAIN_SECONDS: "0" });
    workers.push(a);
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 2);
      const { code } = await stopWorker(a, "SIGTERM");
      assert.equal(code, 0, a.output());
      assert.match(a.output(), /SIGTERM: finishing current chunks/);
      const b = await startWorker(redis.url);
      workers.push(b);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      await Promise.all(workers.map((w) => stopWorker(w)));
      workers.splice(0);
    }
  });
});
