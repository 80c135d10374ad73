import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync, readFileSync, readdirSync } from "node:fs";
import { getPriority } from "node:os";
import path from "node:path";
import { Piscina } from "piscina";
import { THREAD_NAMES, lowerThreadPriority, nameThisThread } from "@/server/compute/thread-priority";
import { createSimPool } from "@/server/compute/pool";
import { loadSpecFile } from "@/server/cli/load-spec";
import { DEFAULT_BENCH_SPEC } from "@/scripts/bench-engine";

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

test(
  "the simulation pool's threads are named linger-sim (for top -H and the benchmark's CPU by thread); the main thread keeps its name",
  { skip: !linux && "needs Linux /proc/thread-self" },
  async () => {
    const names = () =>
      readdirSync("/proc/self/task").map((tid) => readFileSync(`/proc/self/task/${tid}/comm`, "utf8").trim());
    const mainName = readFileSync(`/proc/self/task/${process.pid}/comm`, "utf8").trim();
    assert.equal(nameThisThread("not-main"), false);
    const before = names().filter((n) => n === THREAD_NAMES.sim).length;
    const pool = createSimPool({ threads: 2 });
    try {
      await pool.warmUp(loadSpecFile(DEFAULT_BENCH_SPEC, { replicates: 10 }), { replicates: 0 });
      assert.equal(names().filter((n) => n === THREAD_NAMES.sim).length - before, 2);
    } finally {
      await pool.destroy();
    }
    assert.equal(readFileSync(`/proc/self/task/${process.pid}/comm`, "utf8").trim(), mainName);
  },
);
