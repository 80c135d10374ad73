import { test } from "node:test";
import assert from "node:assert/strict";
import { existsSync } from "node:fs";
import { cpuByThread, formatCpuByThread, processCpuSeconds, threadTimes } from "@/scripts/lib/proc-stat";
import { THREAD_NAMES } from "@/server/compute/thread-priority";

test("CPU by thread: the main thread by id, Linger's threads by name, the rest as helpers; only the time between the snapshots", () => {
  const pid = 100;
  const before = new Map([
    [100, { name: "node", seconds: 1 }],
    [101, { name: THREAD_NAMES.sim, seconds: 2 }],
    [103, { name: "node", seconds: 0.5 }],
  ]);
  const after = new Map([
    [100, { name: "node", seconds: 1.25 }],
    [101, { name: THREAD_NAMES.sim, seconds: 5 }],
    // started between the snapshots: all of its time counts
    [102, { name: THREAD_NAMES.sim, seconds: 1.5 }],
    [103, { name: "node", seconds: 0.75 }],
    [104, { name: THREAD_NAMES.finalise, seconds: 0.5 }],
    [105, { name: THREAD_NAMES.compute, seconds: 0.125 }],
  ]);
  assert.deepEqual(cpuByThread(pid, before, after), {
    main: 0.25,
    simulation: 4.5,
    finalising: 0.5,
    compute: 0.125,
    helpers: 0.25,
  });
  assert.equal(cpuByThread(pid, null, after), null);
  assert.match(
    formatCpuByThread({ main: 0.25, simulation: 4.5, finalising: 0.5, compute: 0, helpers: 0.25 }),
    /^main 0\.25 s, simulation 4\.50 s, finalising 0\.50 s, V8\/libuv helpers 0\.25 s$/,
  );
});

test(
  "this process's threads and CPU time read from /proc",
  { skip: !existsSync("/proc/self/task") && "needs Linux /proc" },
  () => {
    const t0 = threadTimes(process.pid)!;
    assert.ok(t0.has(process.pid));
    // a busy loop on the main thread until it has used 200 ms of CPU (counted by the process, not the clock)
    let x = 0;
    const c0 = process.cpuUsage();
    const spent = () => {
      const c = process.cpuUsage(c0);
      return (c.user + c.system) / 1e6;
    };
    while (spent() < 0.2) x += Math.sqrt(x + 1);
    assert.ok(x > 0);
    const c = cpuByThread(process.pid, t0, threadTimes(process.pid))!;
    // clock ticks are 10 ms: most of the 200 ms shows on the main thread
    assert.ok(c.main >= 0.1, `main thread CPU ${c.main} s`);
    assert.ok(processCpuSeconds(process.pid)! >= c.main);
  },
);
