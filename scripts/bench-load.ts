/**
 * Load benchmark: a real server process (own port, temporary database, no demo
 * data) whose lab holds `pastRuns` finished runs (copies of one computed run,
 * so list items carry real headline figures), while `computing` runs of the
 * benchmark circuit (docs/examples/benchmark.json) compute. Meanwhile
 * `clients` signed-in clients (one session each) loop over the run list (first
 * page), a run's detail and /api/health, pausing `pauseMs` between requests.
 * Reports each endpoint's p50 and p95 latency against its target
 * (docs/benchmarks.md: p95 under 200 ms for list, detail and health), with the
 * conditions: load average (os.loadavg, as `uptime` prints it) before and after,
 * cores and the worker-pool size. `only: "health"` with one client and one large
 * run is the second figure of docs/benchmarks.md (health p95 under 100 ms).
 */
import os from "node:os";
import http from "node:http";
import Database from "better-sqlite3";
import { loadSpecFile } from "@/server/cli/load-spec";
import { DEFAULT_BENCH_SPEC } from "./bench-engine";
import { startServerProcess } from "@/scripts/lib/spawn-server";
import { threadCpuMs } from "@/scripts/lib/proc-stat";

export interface LoadEndpoint {
  endpoint: string;
  targetP95Ms: number;
  p50Ms: number;
  p95Ms: number;
  requests: number;
  errors: number;
  /**
   * The server's HTTP thread CPU time per request of this endpoint alone, in ms: measured before the
   * runs start, with no other client, over `costRequests` requests (4 at a time) after a warm-up.
   * Load-independent to within the 10 ms tick of /proc over the whole batch. NaN without /proc.
   */
  cpuMsPerRequest: number;
  /**
   * The same for the whole server process (every thread: the HTTP thread, libuv's pool where zlib
   * compresses, V8's GC helpers; nothing computes then).
   */
  processCpuMsPerRequest: number;
  /** The answer's size (JSON, before compression) in bytes. */
  bytes: number;
}
export interface LoadResult {
  clients: number;
  computing: number;
  replicates: number;
  pastRuns: number;
  seconds: number;
  endpoints: LoadEndpoint[];
  /** 1, 5 and 15 minute load averages when the measurement started and ended. */
  loadAverageBefore: number[];
  loadAverageAfter: number[];
  cores: number;
  poolSize: number;
  /**
   * The server's HTTP thread (its main thread) CPU time per request, in ms: its CPU time over the
   * measurement minus what it spent in a quiet window of the same runs computing just before (queue
   * work), divided by the requests answered. Far less sensitive to machine load than latency. NaN
   * where /proc is missing.
   */
  serverCpuMsPerRequest: number;
  /** The same thread's CPU share (ms per s) in the quiet window (no clients, runs computing). */
  serverBackgroundCpuMsPerS: number;
  /** The load generator's own CPU time (this process, every thread) per request, in ms. */
  clientCpuMsPerRequest: number;
}

/** CPU time (user + system) of one thread of a process, in ms, from /proc; NaN without /proc. */
/**
 * The measured requests: node:http with a keep-alive agent (one connection per client, as a browser
 * keeps one), asking for gzip like a browser does; the body is read to its end, not decompressed (the
 * client's own work). fetch cost the load generator about 1.5 ms CPU per request on the same 2 cores as
 * the server (docs/benchmarks.md); this is what the server answers either way.
 */
function timedGet(agent: http.Agent, url: string, cookie: string): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = http.get(url, { agent, headers: { cookie, "accept-encoding": "gzip, deflate" } }, (res) => {
      res.on("data", () => {});
      res.on("end", () => resolve(res.statusCode ?? 0));
      res.on("error", reject);
    });
    req.on("error", reject);
  });
}

const quantile = (xs: number[], q: number) => {
  if (!xs.length) return NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
};

export async function runLoadBench(
  opts: {
    clients?: number;
    computing?: number;
    replicates?: number;
    pastRuns?: number;
    seconds?: number;
    pauseMs?: number;
    /** Measure only these endpoints (default: list, detail and health). */
    only?: "health";
    /** Target p95 in ms for every endpoint measured (default 200). */
    targetMs?: number;
    /** Simulation threads (default: the server's own default, every core). */
    poolSize?: number;
    /** Requests per endpoint for the CPU cost per request (default 400). */
    costRequests?: number;
  } = {},
): Promise<LoadResult> {
  const clients = opts.clients ?? 50;
  const computing = opts.computing ?? 2;
  const pastRuns = opts.pastRuns ?? 150;
  const seconds = opts.seconds ?? 20;
  const pauseMs = opts.pauseMs ?? 250;
  const spec = loadSpecFile(DEFAULT_BENCH_SPEC, { replicates: opts.replicates ?? 50_000 });
  const poolSize = opts.poolSize ?? Math.max(1, os.availableParallelism());
  const target = opts.targetMs ?? 200;
  const agent = new http.Agent({ keepAlive: true, maxSockets: Infinity });
  const server = await startServerProcess({
    env: { LINGER_SEED_DEMO: "0", LINGER_POOL_SIZE: String(poolSize), LINGER_TEST: "1" },
  });
  try {
    const base = server.url;
    const json = { "content-type": "application/json" };
    const email = "load@example.org";
    const password = "load-bench-password";
    // The first account of an empty instance is created and signed in at once.
    const up = await fetch(`${base}/api/auth/sign-up`, {
      method: "POST",
      headers: json,
      body: JSON.stringify({ email, password, displayName: "Load" }),
    });
    if (up.status !== 201) throw new Error(`sign-up failed: ${up.status} ${await up.text()}`);
    const session = async () => {
      const si = await fetch(`${base}/api/auth/sign-in`, {
        method: "POST",
        headers: json,
        body: JSON.stringify({ email, password }),
      });
      if (!si.ok) throw new Error(`sign-in failed: ${si.status}`);
      return (si.headers.get("set-cookie") ?? "").split(";")[0];
    };
    const cookie = await session();
    const me = await (await fetch(`${base}/api/me`, { headers: { cookie } })).json();
    const labId = me.labs[0].id;
    const launch = async (name: string, replicates: number) => {
      const r = await fetch(`${base}/api/labs/${labId}/runs`, {
        method: "POST",
        headers: { ...json, cookie },
        body: JSON.stringify({
          name,
          circuit: spec.circuit,
          program: spec.program,
          inputSignal: spec.inputSignal,
          settings: { ...spec, replicates, circuit: undefined, program: undefined, inputSignal: undefined },
        }),
      });
      if (r.status !== 201) throw new Error(`launch failed: ${r.status} ${await r.text()}`);
      return (await r.json()).id as string;
    };
    const waitEnd = async (id: string) => {
      for (;;) {
        const run = await (await fetch(`${base}/api/runs/${id}`, { headers: { cookie } })).json();
        if (!["queued", "running"].includes(run.status)) return run;
        await new Promise((r) => setTimeout(r, 200));
      }
    };
    // One small computed run, copied as the lab's past runs.
    const model = await launch("past run", 200);
    if ((await waitEnd(model)).status !== "finished") throw new Error("the model run did not finish");
    const db = new Database(server.dbPath);
    try {
      const row = db.prepare("SELECT * FROM runs WHERE id = ?").get(model) as Record<string, unknown>;
      const cols = Object.keys(row);
      const insert = db.prepare(
        `INSERT INTO runs (${cols.map((c) => `"${c}"`).join(",")}) VALUES (${cols.map((c) => `@${c}`).join(",")})`,
      );
      db.transaction(() => {
        for (let i = 0; i < pastRuns; i++)
          insert.run({
            ...row,
            id: `run_load${String(i).padStart(5, "0")}`,
            name: `past run ${i + 1}`,
            created_at: (row.created_at as number) - (i + 1) * 60_000,
          });
      })();
    } finally {
      db.close();
    }
    const urls = [
      { endpoint: "GET /api/labs/:labId/runs (first page)", url: `${base}/api/labs/${labId}/runs`, target },
      { endpoint: "GET /api/runs/:id", url: `${base}/api/runs/${model}`, target },
      { endpoint: "GET /api/health", url: `${base}/api/health`, target },
    ].filter((u) => !opts.only || u.endpoint === "GET /api/health");
    // CPU cost per request of each endpoint, alone, before anything computes.
    const costRequests = opts.costRequests ?? 400;
    const cpuMs: number[] = [];
    const processCpuMs: number[] = [];
    const bytes: number[] = [];
    for (const u of urls) {
      bytes.push((await (await fetch(u.url, { headers: { cookie } })).arrayBuffer()).byteLength);
      const batch = async (n: number) => {
        let left = n;
        await Promise.all(
          Array.from({ length: 4 }, async () => {
            while (left-- > 0) {
              const status = await timedGet(agent, u.url, cookie);
              if (status !== 200) throw new Error(`${u.endpoint}: ${status}`);
            }
          }),
        );
      };
      await batch(40);
      const c0 = threadCpuMs(server.child.pid!);
      const p0 = threadCpuMs(server.child.pid!, "process");
      await batch(costRequests);
      cpuMs.push((threadCpuMs(server.child.pid!) - c0) / costRequests);
      processCpuMs.push((threadCpuMs(server.child.pid!, "process") - p0) / costRequests);
    }
    const running: string[] = [];
    for (let i = 0; i < computing; i++) running.push(await launch(`computing ${i + 1}`, spec.replicates));
    const cookies = await Promise.all(Array.from({ length: clients }, () => session()));

    const pid = server.child.pid!;
    // Quiet window: the runs compute, no client asks anything; the HTTP thread's CPU rate here is the queue's.
    const quietMs = 3000;
    const quietCpu0 = threadCpuMs(pid);
    const quiet0 = performance.now();
    await new Promise((r) => setTimeout(r, quietMs));
    const backgroundPerMs = (threadCpuMs(pid) - quietCpu0) / (performance.now() - quiet0);
    const loadAverageBefore = os.loadavg();
    const serverCpu0 = threadCpuMs(pid);
    const clientCpu0 = process.cpuUsage();
    const window0 = performance.now();
    const times = urls.map(() => [] as number[]);
    const errors = urls.map(() => 0);
    const stopAt = performance.now() + seconds * 1000;
    const stillComputing = async () => {
      const r = await (await fetch(`${base}/api/runs/${running[0]}`, { headers: { cookie } })).json();
      return ["queued", "running"].includes(r.status);
    };
    await Promise.all(
      cookies.map(async (c, k) => {
        for (let i = k; performance.now() < stopAt; i++) {
          const j = i % urls.length;
          const t0 = performance.now();
          const status = await timedGet(agent, urls[j].url, c);
          times[j].push(performance.now() - t0);
          if (status !== 200) errors[j]++;
          await new Promise((res) => setTimeout(res, pauseMs));
        }
      }),
    );
    const windowMs = performance.now() - window0;
    const serverCpu = threadCpuMs(pid) - serverCpu0 - backgroundPerMs * windowMs;
    const clientCpu = process.cpuUsage(clientCpu0);
    const requests = times.reduce((n, t) => n + t.length, 0);
    if (computing > 0 && !(await stillComputing()))
      console.warn("warning: the computing runs ended before the measurement did; raise --load-replicates");
    return {
      clients,
      computing,
      replicates: spec.replicates,
      pastRuns,
      seconds,
      loadAverageBefore,
      loadAverageAfter: os.loadavg(),
      cores: os.cpus().length,
      poolSize,
      serverCpuMsPerRequest: serverCpu / requests,
      serverBackgroundCpuMsPerS: backgroundPerMs * 1000,
      clientCpuMsPerRequest: (clientCpu.user + clientCpu.system) / 1000 / requests,
      endpoints: urls.map((u, j) => ({
        endpoint: u.endpoint,
        targetP95Ms: u.target,
        p50Ms: quantile(times[j], 0.5),
        p95Ms: quantile(times[j], 0.95),
        requests: times[j].length,
        errors: errors[j],
        cpuMsPerRequest: cpuMs[j],
        processCpuMsPerRequest: processCpuMs[j],
        bytes: bytes[j],
      })),
    };
  } finally {
    agent.destroy();
    await server.stop();
  }
}

export function formatLoadBench(r: LoadResult): string {
  const f = (x: number) => x.toFixed(0);
  return [
    `Load: ${r.clients} signed-in client(s) for ${r.seconds} s, ${r.computing} run(s) of ${r.replicates.toLocaleString("en-US")} replicates computing, ${r.pastRuns} past runs in the lab; ` +
      `load average ${r.loadAverageBefore.map((x) => x.toFixed(2)).join(" ")} before, ${r.loadAverageAfter.map((x) => x.toFixed(2)).join(" ")} after; ${r.cores} cores, pool of ${r.poolSize}:`,
    "| endpoint | target p95 | p50 | p95 | requests | errors | server CPU per request alone (HTTP thread / process) | bytes |",
    "| --- | --- | --- | --- | --- | --- | --- | --- |",
    ...r.endpoints.map(
      (e) =>
        `| ${e.endpoint} | < ${e.targetP95Ms} ms | ${f(e.p50Ms)} ms | ${f(e.p95Ms)} ms | ${e.requests} | ${e.errors} | ${e.cpuMsPerRequest.toFixed(2)} / ${e.processCpuMsPerRequest.toFixed(2)} ms | ${e.bytes} |`,
    ),
    `Server HTTP thread under load: ${r.serverCpuMsPerRequest.toFixed(2)} ms CPU per request, all endpoints (after ${r.serverBackgroundCpuMsPerS.toFixed(0)} ms/s of queue work measured with no clients); ` +
      `load generator: ${r.clientCpuMsPerRequest.toFixed(2)} ms CPU per request.`,
  ].join("\n");
}

if (import.meta.url === `file://${process.argv[1]}`) {
  // --cost-only: only the CPU cost per request of each endpoint (no runs computing, no load phase).
  const costOnly = process.argv.includes("--cost-only");
  runLoadBench(costOnly ? { computing: 0, seconds: 0 } : {})
    .then((r) => console.log(formatLoadBench(r)))
    .catch((e: Error) => {
      console.error(`error: ${e.message}`);
      process.exit(1);
    });
}
