/**
 * End-to-end benchmark: replicates of the benchmark circuit (docs/examples/
 * benchmark.json, through the CLI's loader) launched through the API of a real
 * server process (own free port, temporary database, no demo data), computed by
 * the run queue with everything stored. While it computes, one signed-in client
 * sends requests, in one of two ways (`client`):
 *   "watching" (the default): as the app's run screen does while a run computes,
 *     the run's detail every 2 s and the run list every 3 s (components/data/runs.ts);
 *   "load": /api/health and the run list at 10 per second each, and the run's
 *     detail every 200 ms (for the latency figures: p95 of each).
 * Latencies are recorded either way.
 *
 * seconds: the server's own startedAt -> finishedAt of the run (queue, pool,
 *   storage and finalisation), after WARM_UP_RUNS (3) warm-up runs of WARM_UP_REPLICATES_PER_THREAD (500) per thread
 *   of the same circuit with another seed through the same server (its threads
 *   loaded and their kernel for the circuit optimised, as the engine-alone
 *   pool's are; the run itself starts from nothing it could reuse: its own
 *   threshold, ODE overlay and behaviour labels are computed afresh;
 *   databaseMb includes the warm-up runs' rows).
 * engineSeconds: the same replicates through the same engine call on a pool of
 *   the same size, warmed with the same replicates per thread (as chunks), without
 *   queue, database or HTTP (runEngineBench), measured after the server run
 *   or, with engineFirst, before it.
 * overheadRatio: seconds / engineSeconds (target: at most 1.10).
 * Default pool: every core, the server's default.
 */
import os from "node:os";
import { existsSync, rmSync, statSync } from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { loadSpecFile } from "@/server/cli/load-spec";
import { DEFAULT_BENCH_SPEC, runEngineBench, WARM_UP_REPLICATES_PER_THREAD } from "./bench-engine";
import { startServerProcess } from "@/scripts/lib/spawn-server";
import { cpuByThread, peakRssMb, processCpuSeconds, threadTimes, type CpuByThread } from "@/scripts/lib/proc-stat";

/** How the bench's client behaves while the measured run computes (see the top of this file). */
export type EndToEndClient = "watching" | "load";

export interface EndToEndResult {
  replicates: number;
  threads: number;
  client: EndToEndClient;
  /** Reaction firings of the run (the server's count). */
  events: number;
  seconds: number;
  engineSeconds: number;
  overheadRatio: number;
  healthP95Ms: number;
  listP95Ms: number;
  requests: number;
  /** The server process's peak resident memory (VmHWM: event loop, pool threads, finalising thread), MB. */
  peakRssMb: number | null;
  /**
   * What the measured run added to the database file and its WAL, MB (size after it finished minus size before
   * it started; the warm-up runs' share excluded).
   */
  databaseMb: number;
  /**
   * What it added to the pages holding data (page_count - freelist_count), MB: finalisation frees the chunks'
   * grid sums, whose pages the file keeps and the next run reuses.
   */
  databaseInUseMb: number | null;
  /**
   * CPU seconds of the whole server process (every thread) from launch to finish, and of the engine-alone
   * process for its run, and their ratio: less moved by other jobs on a shared machine than the wall-clock
   * ratio (null where /proc is missing).
   */
  serverCpuSeconds: number | null;
  engineCpuSeconds: number;
  cpuRatio: number | null;
  /** The server's CPU seconds over the same span by thread (event loop, simulation, finalising, helpers). */
  serverCpuByThread: CpuByThread | null;
  /** The engine-alone process's, for its run. */
  engineCpuByThread: CpuByThread | null;
}

/**
 * Bytes of a database in pages that hold data, MB (null when it cannot be opened). Read-only beside a running
 * server (a reader sees every committed page, WAL included); after the server stopped, checkpointed first.
 */
function inUseMb(dbPath: string, opts: { checkpoint: boolean }): number | null {
  try {
    const db = new Database(dbPath, { readonly: !opts.checkpoint });
    try {
      if (opts.checkpoint) db.pragma("wal_checkpoint(TRUNCATE)");
      const pages =
        Number(db.pragma("page_count", { simple: true })) - Number(db.pragma("freelist_count", { simple: true }));
      return (pages * Number(db.pragma("page_size", { simple: true }))) / 1e6;
    } finally {
      db.close();
    }
  } catch {
    return null;
  }
}

const fileMb = (f: string) => (existsSync(f) ? statSync(f).size / 1e6 : 0);

const p95 = (xs: number[]) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.ceil(0.95 * s.length) - 1)];
};

/** Runs through the server before the measured one (see throughServer). */
export const WARM_UP_RUNS = 3;

export async function runEndToEndBench(
  opts: {
    replicates?: number;
    threads?: number;
    /** Measure the engine alone before the server, not after (alternate it across repetitions: neither goes always second). */
    engineFirst?: boolean;
    /**
     * Before the measured run, WARM_UP_RUNS of WARM_UP_REPLICATES_PER_THREAD per thread through the same server (default true): the
     * measured run then starts on loaded, warm threads, as the engine-alone pool does after its warm-up.
     */
    warmUpRun?: boolean;
    /** How the client behaves while the measured run computes (see the top of this file); default "watching". */
    client?: EndToEndClient;
  } = {},
): Promise<EndToEndResult> {
  const replicates = opts.replicates ?? 10_000;
  const threads = opts.threads ?? Math.max(1, os.availableParallelism());
  // The engine alone on a pool of the same size, warmed as the server's threads are by its warm-up run (100
  // replicates per thread of the same circuit), so the ratio compares like with like; never while the server runs.
  const engineAlone = async () =>
    (await runEngineBench({ threads: [threads], replicates, warmUpReplicates: WARM_UP_REPLICATES_PER_THREAD }))[0];
  const first = opts.engineFirst ? await engineAlone() : null;
  const client = opts.client ?? "watching";
  const measured = await throughServer(replicates, threads, opts.warmUpRun ?? true, client);
  const engine = first ?? (await engineAlone());
  return {
    replicates,
    threads,
    client,
    ...measured,
    engineSeconds: engine.seconds,
    overheadRatio: measured.seconds / engine.seconds,
    engineCpuSeconds: engine.cpuSeconds,
    engineCpuByThread: engine.cpuByThread,
    cpuRatio: measured.serverCpuSeconds === null ? null : measured.serverCpuSeconds / engine.cpuSeconds,
  };
}

type Measured = Omit<
  EndToEndResult,
  | "replicates"
  | "threads"
  | "client"
  | "engineSeconds"
  | "overheadRatio"
  | "engineCpuSeconds"
  | "cpuRatio"
  | "engineCpuByThread"
>;

export async function throughServer(
  replicates: number,
  threads: number,
  warmUpRun: boolean,
  client: EndToEndClient = "watching",
): Promise<Measured> {
  const spec = loadSpecFile(DEFAULT_BENCH_SPEC, { replicates });
  let measured: Measured | undefined;
  let inUse0: number | null = null;
  const server = await startServerProcess({
    env: { LINGER_SEED_DEMO: "0", LINGER_POOL_SIZE: String(threads), LINGER_TEST: "1" },
  });
  try {
    const base = server.url;
    const json = { "content-type": "application/json" };
    const email = "bench@example.org";
    const password = "bench-password-123";
    const up = await fetch(`${base}/api/auth/sign-up`, {
      method: "POST",
      headers: json,
      body: JSON.stringify({ email, password, displayName: "Bench" }),
    });
    if (!up.ok) throw new Error(`sign-up failed: ${up.status} ${await up.text()}`);
    const si = await fetch(`${base}/api/auth/sign-in`, {
      method: "POST",
      headers: json,
      body: JSON.stringify({ email, password }),
    });
    if (!si.ok) throw new Error(`sign-in failed: ${si.status}`);
    const cookie = (si.headers.get("set-cookie") ?? "").split(";")[0];
    const me = await (await fetch(`${base}/api/me`, { headers: { cookie } })).json();
    const labId = me.labs[0].id;

    const launchRun = async (name: string, s: typeof spec): Promise<string> => {
      const launch = await fetch(`${base}/api/labs/${labId}/runs`, {
        method: "POST",
        headers: { ...json, cookie },
        body: JSON.stringify({
          name,
          circuit: s.circuit,
          program: s.program,
          inputSignal: s.inputSignal,
          settings: { ...s, circuit: undefined, program: undefined, inputSignal: undefined },
        }),
      });
      if (launch.status !== 201) throw new Error(`launch failed: ${launch.status} ${await launch.text()}`);
      return (await launch.json()).id;
    };
    const waitForEnd = async (id: string, everyMs = 200) => {
      for (;;) {
        const r = await (await fetch(`${base}/api/runs/${id}`, { headers: { cookie } })).json();
        if (!["queued", "running"].includes(r.status)) return r;
        await new Promise((res) => setTimeout(res, everyMs));
      }
    };
    if (warmUpRun) {
      // A server that has been up a while: its threads have loaded their code (tsx compiles it in each thread,
      // seconds of CPU after the server listens) and V8 has optimised what every run goes through, as the
      // engine-alone pool's threads are before timing. One run is not enough for the finalising and main
      // threads: with --trace-opt, 1,000-replicate runs on a fresh server compiled 435, 67, 29, 33, 18 and 17
      // functions (4 Dec 2026); so three runs, each of WARM_UP_REPLICATES_PER_THREAD per thread.
      for (let i = 0; i < WARM_UP_RUNS; i++) {
        const warm = await waitForEnd(
          await launchRun(`warm-up ${i + 1}`, {
            ...spec,
            seed: `${spec.seed}.warm-up-${i + 1}`,
            replicates: WARM_UP_REPLICATES_PER_THREAD * threads,
          }),
        );
        if (warm.status !== "finished") throw new Error(`warm-up run ended ${warm.status}: ${warm.statusReason}`);
      }
    }
    const fileMb0 = fileMb(server.dbPath) + fileMb(`${server.dbPath}-wal`);
    inUse0 = inUseMb(server.dbPath, { checkpoint: false });
    const cpu0 = processCpuSeconds(server.child.pid);
    const threads0 = threadTimes(server.child.pid!);
    const runId = await launchRun("benchmark", spec);

    const health: number[] = [];
    const list: number[] = [];
    const timed = async (url: string, into: number[]) => {
      const t0 = performance.now();
      const r = await fetch(url, { headers: { cookie } });
      await r.arrayBuffer();
      into.push(performance.now() - t0);
    };
    let done = false;
    // Requests at a fixed period (bounded by the run's end and by a hard count): under "load" health and the run
    // list each 10 per second; "watching" the run list every 3 s (the run's detail is waitForEnd's poll).
    const every = async (periodMs: number, urls: [string, number[]][]) => {
      for (let i = 0; !done && i < 100_000; i++) {
        const tick = performance.now();
        await Promise.all(urls.map(([url, into]) => timed(url, into)));
        const wait = periodMs - (performance.now() - tick);
        if (wait > 0) await new Promise((r) => setTimeout(r, wait));
      }
    };
    const runList = `${base}/api/labs/${labId}/runs`;
    const load =
      client === "load"
        ? every(100, [
            [`${base}/api/health`, health],
            [runList, list],
          ])
        : every(3000, [[runList, list]]);
    const run = await waitForEnd(runId, client === "load" ? 200 : 2000);
    done = true;
    await load;
    if (run.status !== "finished") throw new Error(`run ended ${run.status}: ${run.statusReason}`);
    const cpu1 = processCpuSeconds(server.child.pid);
    const threads1 = threadTimes(server.child.pid!);
    measured = {
      serverCpuSeconds: cpu0 === null || cpu1 === null ? null : cpu1 - cpu0,
      serverCpuByThread: cpuByThread(server.child.pid!, threads0, threads1),
      seconds: (Date.parse(run.finishedAt) - Date.parse(run.startedAt)) / 1000,
      healthP95Ms: p95(health),
      listP95Ms: p95(list),
      requests: health.length + list.length,
      events: run.eventsTotal,
      peakRssMb: peakRssMb(server.child.pid),
      databaseMb: fileMb(server.dbPath) + fileMb(`${server.dbPath}-wal`) - fileMb0,
      databaseInUseMb: null,
    };
  } finally {
    await server.stop({ keepFiles: true });
    const inUse1 = measured === undefined ? null : inUseMb(server.dbPath, { checkpoint: true });
    if (measured !== undefined && inUse0 !== null && inUse1 !== null) measured.databaseInUseMb = inUse1 - inUse0;
    rmSync(path.dirname(server.dbPath), { recursive: true, force: true });
  }
  return measured;
}
