import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync } from "node:fs";
import { getPriority } from "node:os";
import path from "node:path";
import { Piscina } from "piscina";
import { lowerThreadPriority } from "@/server/compute/thread-priority";

const linux = existsSync("/proc/thread-self");

/** Runs the helper in a fresh thread of a piscina pool started the way server/compute/pool.ts starts one. */
async function inWorker(env: {
  LINGER_WORKER_NICE?: string;
}): Promise<{ tid: number | null; priority: number | null }> {
  const pool = new Piscina({
    filename: path.join(__dirname, "../../helpers/priority-worker.ts"),
    execArgv: ["--import", "tsx"],
    minThreads: 1,
    maxThreads: 1,
  });
  try {
    return await pool.run(env);
  } finally {
    await pool.destroy();
  }
}

test(
  "a simulation thread lowers its own priority (nice 10 by default) and the process's main thread keeps its own",
  { skip: !linux && "needs Linux /proc/thread-self" },
  async () => {
    const before = getPriority(process.pid);
    const r = await inWorker({});
    assert.notEqual(r.tid, null);
    assert.notEqual(r.tid, process.pid);
    assert.equal(r.priority, Math.max(before, 10));
    assert.equal(getPriority(process.pid), before);
  },
);

test(
  "LINGER_WORKER_NICE sets the value; 0 or a value outside 1-19 leaves the priority alone; the main thread is never lowered",
  { skip: !linux && "needs Linux /proc/thread-self" },
  async () => {
    const r = await inWorker({ LINGER_WORKER_NICE: "15" });
    assert.equal(r.priority, Math.max(getPriority(process.pid), 15));
    assert.equal((await inWorker({ LINGER_WORKER_NICE: "0" })).tid, null);
    assert.equal((await inWorker({ LINGER_WORKER_NICE: "25" })).tid, null);
    assert.equal(lowerThreadPriority({}), null);
  },
);
