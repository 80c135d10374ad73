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
// 1,200 replicates of the simple circuit over 200 min: 12 chunks, a few seconds of compute.
const REPLICATES = 1200;
const CHUNKS = 12;
const body = () =>
  launchBody({ template: "simple", replicates: REPLICATES, seed: "redis-same-seed", endTimeMinutes: 200 });
// Shared workers: a short lock so a killed worker's chunk is retried within about 2 s (the default is 30 s),
// and no drain time so SIGTERM hands a running chunk back at once.
const WORKER_ENV = { LINGER_WORKER_LOCK_SECONDS: "1", LINGER_WORKER_DRAIN_SECONDS: "0" };

async function launch(t: TestApp) {
  const editor = await signIn(t.app, "editor@example.org");
  const r = await editor.post(`/api/labs/${t.demoLab!.id}/runs`).send(body());
  assert.equal(r.status, 201, JSON.stringify(r.body));
  return { editor, id: r.body.id as string };
}

/** Resolves once the run has at least n chunks stored; rejects if it ends first or after 60 s. */
function afterChunks(queue: RunQueue, runId: string, n: number, total = REPLICATES) {
  return new Promise<void>((res, rej) => {
    const stop = () => {
      clearTimeout(timer);
      queue.events.off("progress", on);
      queue.events.off("ended", ended);
    };
    const on = (p: { runId: string; replicatesDone: number }) => {
      if (p.runId === runId && p.replicatesDone >= (n * total) / CHUNKS) {
        stop();
        res();
      }
    };
    const ended = (e: { runId: string; status: string }) => {
      if (e.runId !== runId) return;
      stop();
      rej(new Error(`run ${runId} ended ${e.status} before ${n} chunks were stored`));
    };
    const timer = setTimeout(() => {
      stop();
      rej(new Error(`run ${runId}: fewer than ${n} chunks stored after 60 s`));
    }, 60_000);
    queue.events.on("progress", on);
    queue.events.on("ended", ended);
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
  assert.deepEqual(storedCounts(t, runId), { chunks: CHUNKS, replicates: REPLICATES, distinctReplicates: REPLICATES });
}

/** A two-point sweep (100 replicates per point) launched and waited for; the points' stats hashes in order. */
async function sweepHashes(t: TestApp): Promise<string[]> {
  const editor = await signIn(t.app, "editor@example.org");
  const base = launchBody({ replicates: 100, seed: "redis-sweep-seed", endTimeMinutes: 300 });
  const r = await editor.post(`/api/labs/${t.demoLab!.id}/sweeps`).send({
    name: "hold strength",
    base: { circuit: base.circuit, program: base.program, inputSignal: base.inputSignal, settings: base.settings },
    axes: [{ parameter: "K(makeZ,hldB)", grid: { from: 50, to: 200, count: 2, scale: "log" } }],
  });
  assert.equal(r.status, 201, JSON.stringify(r.body));
  const t0 = Date.now();
  let sweep: any;
  for (;;) {
    sweep = (await editor.get(`/api/sweeps/${r.body.id}`)).body;
    if (!["queued", "running"].includes(sweep.status)) break;
    if (Date.now() - t0 > 60_000) throw new Error(`sweep still ${sweep.status} after 60 s`);
    await new Promise((res) => setTimeout(res, 100));
  }
  assert.equal(sweep.status, "finished");
  return Promise.all(sweep.points.map(async (p: any) => (await editor.get(`/api/runs/${p.runId}`)).body.statsHash));
}

describe("distributed mode (BullMQ on Redis)", { skip: skip ?? false, timeout: 300_000 }, () => {
  let embeddedHash = "";
  let embeddedSweep: string[] = [];
  let redis: RedisHandle;
  /** The two shared worker processes (started in the first test, replaced when a test stops one). */
  let workers: WorkerProcess[] = [];
  const replace = async (gone: WorkerProcess) => {
    workers = workers.filter((w) => w !== gone);
    workers.push(await startWorker(redis.url, WORKER_ENV));
  };

  before(async () => {
    const t = await makeTestContext({ queue: realQueue(1) });
    try {
      const { editor, id } = await launch(t);
      const done = await waitForRun(editor, id);
      assert.equal(done.status, "finished");
      embeddedHash = done.statsHash;
      embeddedSweep = await sweepHashes(t);
    } finally {
      await t.close();
    }
    redis = await startRedis();
  });

  after(async () => {
    await Promise.all(workers.map((w) => stopWorker(w, "SIGKILL")));
    await redis?.stop();
  });

  test("a worker with another engine version refuses the chunks with a log line; matching workers compute them", async () => {
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
    try {
      const { editor, id } = await launch(t);
      for (let i = 0; i < 200 && !lines.some((l) => l.startsWith("Refusing")); i++)
        await new Promise((r) => setTimeout(r, 50));
      const refusal = lines.find((l) => l.startsWith("Refusing")) ?? "";
      assert.match(
        refusal,
        new RegExp(
          `Refusing chunks of run ${id}: they need linger-engine \\S+, this worker runs linger-engine 0\\.9\\.0 \\(older\\)`,
        ),
      );
      assert.equal(old.info().chunksDone, 0);
      workers = await Promise.all([startWorker(redis.url, WORKER_ENV), startWorker(redis.url, WORKER_ENV)]);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assert.equal(old.info().chunksDone, 0);
    } finally {
      await t.close();
      await old.close(0);
    }
  });

  test("two worker processes store the embedded pool's statistics hash, each computing part of the run", async () => {
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      // Wait for both heartbeats, and note what each worker had done before this run.
      let before = new Map<string, number>();
      for (let i = 0; i < 100 && before.size < 2; i++) {
        await new Promise((r) => setTimeout(r, 100));
        before = new Map(t.ctx.queue.stats().dispatch.workers.map((w) => [w.id, w.chunksDone]));
      }
      assert.equal(before.size, 2, "two heartbeats");
      const { editor, id } = await launch(t);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
      // Heartbeats carry the counts: wait for the next ones (every 5 s) to show this run's chunks.
      const didWork = () =>
        t.ctx.queue
          .stats()
          .dispatch.workers.filter((w) => w.chunksDone > (before.get(w.id) ?? 0))
          .map((w) => w.id);
      for (let i = 0; i < 120 && didWork().length < 2; i++) await new Promise((r) => setTimeout(r, 100));
      assert.deepEqual(didWork().sort(), [...before.keys()].sort(), "each worker computed part of this run");
      const health = await editor.get("/api/health").expect(200);
      const compute = health.body.compute;
      assert.equal(compute.mode, "redis");
      assert.equal(compute.redis, "connected");
      assert.equal(compute.workerCount, 2);
      assert.ok(Date.now() - Date.parse(compute.workers[0].lastHeartbeat) < 30_000);
      assert.ok(compute.chunksPerSecond > 0);
    } finally {
      await t.close();
    }
  });

  test("a worker SIGKILLed mid-run: its chunk is retried after the stall timeout, stored once, same hash", async () => {
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    const victim = workers[0];
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 3);
      victim.proc.kill("SIGKILL");
      const { signal } = await victim.exited;
      assert.equal(signal, "SIGKILL");
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      await replace(victim);
    }
  });

  test("Redis restarted mid-run (its data lost): the server queues again what it waits for, same hash", async () => {
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
    }
  });

  test("the server restarted mid-run: stored chunks are kept, only missing ones are queued, same hash", async () => {
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 4);
      await t.ctx.queue.close();
      const stored = storedCounts(t, id).chunks;
      assert.ok(stored >= 4 && stored < CHUNKS, `stored ${stored} chunks before the restart`);
      t.ctx.queue = redisQueue(redis.url)(t.ctx);
      t.ctx.queue.kick();
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
    }
  });

  test("a sweep's points go through Redis too, with the embedded pool's hashes", async () => {
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    try {
      const hashes = await sweepHashes(t);
      assert.equal(hashes.length, 2);
      assert.ok(
        hashes.every((h) => /^v2:[0-9a-f]{64}$/.test(h)),
        JSON.stringify(hashes),
      );
      assert.deepEqual(hashes, embeddedSweep);
    } finally {
      await t.close();
    }
  });

  test("SIGTERM: the worker hands back its chunk and exits 0; the other worker completes the run", async () => {
    const t = await makeTestContext({ queue: redisQueue(redis.url) });
    const leaving = workers[0];
    try {
      const { editor, id } = await launch(t);
      await afterChunks(t.ctx.queue, id, 2);
      const { code } = await stopWorker(leaving, "SIGTERM");
      assert.equal(code, 0, leaving.output());
      assert.match(leaving.output(), /SIGTERM: finishing current chunks/);
      const done = await waitForRun(editor, id, 60_000);
      assert.equal(done.status, "finished");
      assert.equal(done.statsHash, embeddedHash);
      assertStoredOnce(t, id);
    } finally {
      await t.close();
      workers = workers.filter((w) => w !== leaving);
    }
  });
});
