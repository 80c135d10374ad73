/**
 * Distributed-mode benchmark: the same run (the benchmark circuit,
 * docs/examples/benchmark.json, 10,000 replicates by default) launched through
 * the API of a real server process, computed
 *   - embedded, on the server's pool of 1 and of 2 threads;
 *   - through a local redis-server with 1 and with 2 worker processes
 *     (`npm run worker`, 1 thread each).
 * seconds: the server's startedAt -> finishedAt of the run (everything stored,
 * finalised). Every variant must give the same statsHash (checked).
 * Ratios: Redis / embedded at the same thread count, and 2 workers over 1.
 * Per-chunk queue overhead: (Redis, 1 worker - embedded, 1 thread) / chunks,
 * i.e. what moving one chunk through Redis (queue, serialise, results queue)
 * costs on top of computing it.
 * Skipped with a message when redis-server is not installed.
 */
import { loadSpecFile } from "@/server/cli/load-spec";
import { chunkLayout } from "@/sim";
import { DEFAULT_BENCH_SPEC } from "./bench-engine";
import { startServerProcess } from "@/scripts/lib/spawn-server";
import { REDIS_BIN, startRedis, startWorker, stopWorker, type WorkerProcess } from "@/scripts/lib/redis-process";

export interface RedisBenchVariant {
  label: string;
  mode: "embedded" | "redis";
  threads: number;
  seconds: number;
  statsHash: string;
}

export interface RedisBenchResult {
  replicates: number;
  chunks: number;
  variants: RedisBenchVariant[];
  sameHash: boolean;
  /** Redis with 1 worker / embedded with 1 thread. */
  ratioOneWorker: number;
  /** Redis with 2 workers / embedded with 2 threads. */
  ratioTwoWorkers: number;
  /** Redis, 1 worker / Redis, 2 workers (speed-up from the second worker). */
  speedupSecondWorker: number;
  /** Extra milliseconds per chunk through Redis (1 worker vs 1 embedded thread). */
  overheadMsPerChunk: number;
}

async function timedRun(
  env: Record<string, string>,
  replicates: number,
): Promise<{ seconds: number; statsHash: string }> {
  const spec = loadSpecFile(DEFAULT_BENCH_SPEC, { replicates });
  const server = await startServerProcess({ env: { LINGER_SEED_DEMO: "0", LINGER_TEST: "1", ...env } });
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
    const cookie = (si.headers.get("set-cookie") ?? "").split(";")[0];
    const me = await (await fetch(`${base}/api/me`, { headers: { cookie } })).json();
    const launch = await fetch(`${base}/api/labs/${me.labs[0].id}/runs`, {
      method: "POST",
      headers: { ...json, cookie },
      body: JSON.stringify({
        name: "benchmark",
        circuit: spec.circuit,
        program: spec.program,
        inputSignal: spec.inputSignal,
        settings: { ...spec, circuit: undefined, program: undefined, inputSignal: undefined },
      }),
    });
    if (launch.status !== 201) throw new Error(`launch failed: ${launch.status} ${await launch.text()}`);
    const runId = (await launch.json()).id;
    let run: any;
    for (;;) {
      run = await (await fetch(`${base}/api/runs/${runId}`, { headers: { cookie } })).json();
      if (!["queued", "running"].includes(run.status)) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    if (run.status !== "finished") throw new Error(`run ended ${run.status}: ${run.statusReason}`);
    return { seconds: (Date.parse(run.finishedAt) - Date.parse(run.startedAt)) / 1000, statsHash: run.statsHash };
  } finally {
    await server.stop();
  }
}

export async function runRedisBench(
  opts: { replicates?: number } = {},
): Promise<RedisBenchResult | { skipped: string }> {
  if (!REDIS_BIN) return { skipped: "redis-server is not installed (apt-get install redis-server)" };
  const replicates = opts.replicates ?? 10_000;
  const chunks = chunkLayout(loadSpecFile(DEFAULT_BENCH_SPEC, { replicates })).chunks.length;
  const variants: RedisBenchVariant[] = [];
  for (const threads of [1, 2]) {
    const r = await timedRun({ LINGER_POOL_SIZE: String(threads) }, replicates);
    variants.push({ label: `embedded, ${threads} thread${threads > 1 ? "s" : ""}`, mode: "embedded", threads, ...r });
  }
  const redis = await startRedis();
  try {
    for (const count of [1, 2]) {
      const workers: WorkerProcess[] = [];
      try {
        for (let i = 0; i < count; i++) workers.push(await startWorker(redis.url, { LINGER_WORKER_THREADS: "1" }));
        const r = await timedRun({ LINGER_REDIS_URL: redis.url, LINGER_POOL_SIZE: "1" }, replicates);
        variants.push({ label: `Redis, ${count} worker${count > 1 ? "s" : ""}`, mode: "redis", threads: count, ...r });
      } finally {
        await Promise.all(workers.map((w) => stopWorker(w)));
      }
    }
  } finally {
    await redis.stop();
  }
  const [e1, e2, r1, r2] = variants;
  return {
    replicates,
    chunks,
    variants,
    sameHash: variants.every((v) => v.statsHash === e1.statsHash),
    ratioOneWorker: r1.seconds / e1.seconds,
    ratioTwoWorkers: r2.seconds / e2.seconds,
    speedupSecondWorker: r1.seconds / r2.seconds,
    overheadMsPerChunk: ((r1.seconds - e1.seconds) * 1000) / chunks,
  };
}

/** The benchmark's table, for the console. */
export function formatRedisBench(r: RedisBenchResult): string {
  const f = (x: number, d = 2) => x.toFixed(d);
  const rows = r.variants.map((v) => `| ${v.label} | ${f(v.seconds)} | ${f(v.seconds / r.variants[0].seconds)}x |`);
  return [
    `Distributed mode (${r.replicates} replicates, ${r.chunks} chunks, benchmark circuit; server startedAt -> finishedAt):`,
    `| variant | seconds | vs embedded 1 thread |`,
    `| --- | --- | --- |`,
    ...rows,
    `Redis/embedded: 1 worker ${f(r.ratioOneWorker)}x, 2 workers ${f(r.ratioTwoWorkers)}x; second worker speed-up ${f(r.speedupSecondWorker)}x; ` +
      `queue overhead ${f(r.overheadMsPerChunk, 1)} ms per chunk; stats hash ${r.sameHash ? "identical in every variant" : "DIFFERS"}`,
  ].join("\n");
}

if (require.main === module) {
  const i = process.argv.indexOf("--replicates");
  const replicates = i > 0 ? Number(process.argv[i + 1]) : undefined;
  runRedisBench({ replicates })
    .then((r) => console.log("skipped" in r ? `Redis benchmark skipped: ${r.skipped}` : formatRedisBench(r)))
    .catch((e: Error) => {
      console.error(`error: ${e.message}`);
      process.exit(1);
    });
}
