/**
 * Where 1 -> N threads loses (bench only): runs the benchmark circuit on pools of 1 and N threads with every
 * chunk traced (its thread, start and end on a clock shared by the threads, and the thread's CPU time), and
 * prints, per run, each thread's idle time between chunks, the wait before its first chunk, the tail (the
 * time from the thread's last chunk to the run's last one) and the main thread's CPU share, each as a
 * fraction of the run's wall time. Wall times lie under load; the structure (gaps, tail) still shows.
 *
 *   npx tsx scripts/bench-chunk-trace.ts [--replicates 1000] [--chunk-size 100] [--repetitions 5] [--threads N]
 */
import os from "node:os";
import { loadSpecFile } from "@/server/cli/load-spec";
import { createSimPool, type SimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { threadCpuMs } from "@/server/compute/sim-worker";
import { DEFAULT_BENCH_SPEC } from "./bench-engine";

const now = () => performance.timeOrigin + performance.now();

export interface TraceSummary {
  threads: number;
  chunkSize: number;
  chunks: number;
  wallMs: number;
  /** Sum of chunk CPU over sum of chunk wall (below 1: the threads were descheduled). */
  chunkCpuOverWall: number | null;
  perThread: { threadId: number; chunks: number; busyMs: number; firstWaitMs: number; gapMs: number; tailMs: number }[];
  /** CPU of the process's other threads (V8's GC and compiler helpers, libuv) during the run, over wall time. */
  otherCpuShare: number | null;
  /** Main thread CPU during the run over the run's wall time. */
  mainCpuShare: number | null;
  /** Max over threads of the tail, over the run's wall time. */
  tailFraction: number;
  /** Sum over threads of gaps + first wait + tail, over threads x wall time. */
  idleFraction: number;
}

export async function tracedRun(
  spec: ReturnType<typeof loadSpecFile>,
  pool: SimPool,
  chunkSize?: number,
): Promise<TraceSummary & { events: number }> {
  const m0 = threadCpuMs();
  const p0 = process.cpuUsage();
  const t0 = now();
  const r = await runAllChunks(spec, { pool, trace: true, chunkSize });
  const t1 = now();
  const m1 = threadCpuMs();
  const pc = process.cpuUsage(p0);
  const processCpuMs = (pc.user + pc.system) / 1000;
  const traces = r.traces ?? [];
  const wallMs = t1 - t0;
  const byThread = new Map<number, typeof traces>();
  for (const t of traces) byThread.set(t.threadId, [...(byThread.get(t.threadId) ?? []), t]);
  const lastEnd = Math.max(...traces.map((t) => t.endMs));
  const perThread = [...byThread.entries()].map(([threadId, ts]) => {
    ts.sort((a, b) => a.startMs - b.startMs);
    let gap = 0;
    for (let i = 1; i < ts.length; i++) gap += Math.max(0, ts[i].startMs - ts[i - 1].endMs);
    return {
      threadId,
      chunks: ts.length,
      busyMs: ts.reduce((s, t) => s + t.endMs - t.startMs, 0),
      firstWaitMs: ts[0].startMs - t0,
      gapMs: gap,
      // to the run's end as the main thread saw it (last chunk received)
      tailMs: t1 - ts[ts.length - 1].endMs,
    };
  });
  // a thread of the pool that got no chunk idled the whole run
  for (let i = perThread.length; i < pool.threads; i++)
    perThread.push({ threadId: -1, chunks: 0, busyMs: 0, firstWaitMs: wallMs, gapMs: 0, tailMs: 0 });
  const cpu = traces.every((t) => t.cpuMs !== null) ? traces.reduce((s, t) => s + t.cpuMs!, 0) : null;
  const busy = traces.reduce((s, t) => s + t.endMs - t.startMs, 0);
  void lastEnd;
  return {
    events: r.events,
    threads: pool.threads,
    chunkSize: chunkSize ?? 0,
    chunks: r.chunks,
    wallMs,
    chunkCpuOverWall: cpu === null ? null : cpu / busy,
    perThread,
    otherCpuShare: cpu === null || m0 === null || m1 === null ? null : (processCpuMs - cpu - (m1 - m0)) / wallMs,
    mainCpuShare: m0 === null || m1 === null ? null : (m1 - m0) / wallMs,
    tailFraction: Math.max(...perThread.map((p) => p.tailMs)) / wallMs,
    idleFraction: perThread.reduce((s, p) => s + p.gapMs + p.firstWaitMs + p.tailMs, 0) / (pool.threads * wallMs),
  };
}

const f = (x: number, d = 3) => x.toFixed(d);

export function formatTrace(s: TraceSummary & { events: number }): string {
  return (
    `${s.threads} thr, chunk ${s.chunkSize || "default"} (${s.chunks} chunks): wall ${f(s.wallMs, 0)} ms, ` +
    `${f(s.events / s.wallMs / 1e3, 2)} M ev/s, idle ${f(s.idleFraction)}, tail ${f(s.tailFraction)}, ` +
    `main CPU ${s.mainCpuShare === null ? "n/a" : f(s.mainCpuShare)}, other CPU ${s.otherCpuShare === null ? "n/a" : f(s.otherCpuShare)}, chunk CPU/wall ${s.chunkCpuOverWall === null ? "n/a" : f(s.chunkCpuOverWall)} | ` +
    s.perThread
      .map(
        (p) =>
          `t${p.threadId}: ${p.chunks} tasks busy ${f(p.busyMs, 0)} first ${f(p.firstWaitMs, 1)} gaps ${f(p.gapMs, 1)} tail ${f(p.tailMs, 1)}`,
      )
      .join("; ")
  );
}

if (require.main === module) {
  const argv = process.argv.slice(2);
  const arg = (name: string) => {
    const i = argv.indexOf(name);
    return i >= 0 ? Number(argv[i + 1]) : undefined;
  };
  const replicates = arg("--replicates") ?? 1000;
  const repetitions = arg("--repetitions") ?? 5;
  const threads = arg("--threads") ?? os.availableParallelism();
  const sizes = argv.includes("--chunk-size") ? [arg("--chunk-size")!] : [undefined];
  (async () => {
    const spec = loadSpecFile(DEFAULT_BENCH_SPEC, { replicates });
    // 1 thread; N threads with whole chunks (as before chunk parts); N threads with small runs' chunks in parts
    const pools = [
      createSimPool({ threads: 1 }),
      createSimPool({ threads, chunkParts: false }),
      createSimPool({ threads }),
    ];
    try {
      await Promise.all(pools.map((p) => p.warmUp(spec)));
      for (const p of pools) await runAllChunks(spec, { pool: p });
      console.log(
        `load average ${os
          .loadavg()
          .map((x) => x.toFixed(2))
          .join(" ")}, ${replicates} replicates`,
      );
      for (let i = 0; i < repetitions; i++)
        for (const size of sizes) {
          const one = await tracedRun(spec, pools[0], size);
          const whole = await tracedRun(spec, pools[1], size);
          const parts = await tracedRun(spec, pools[2], size);
          console.log(formatTrace(one));
          console.log("whole chunks: " + formatTrace(whole));
          console.log("in parts:     " + formatTrace(parts));
          console.log(
            `  -> 1 -> ${threads}: whole chunks ${f(one.wallMs / whole.wallMs, 2)}x, in parts ${f(one.wallMs / parts.wallMs, 2)}x`,
          );
        }
      console.log(
        `load average ${os
          .loadavg()
          .map((x) => x.toFixed(2))
          .join(" ")}`,
      );
    } finally {
      await Promise.all(pools.map((p) => p.destroy()));
    }
  })().catch((e: Error) => {
    console.error(e);
    process.exit(1);
  });
}
