/**
 * The speed figures that matter for a run, each as a ratio against a reference
 * measured in the same run, repeated (median and spread) with the machine's
 * load printed beside them, because this machine is shared:
 *
 *   engine, 1 thread          Linger events/s over the C reference (scripts/bench/reference.ts;
 *                             its JS twin without `cc`), benchmark circuit, 1,000 replicates
 *   1 -> N threads            Linger on a pool of N over a pool of 1, against N C processes at once
 *                             over one (N = cores); and on larger runs: the engine-alone runs of the
 *                             end-to-end figures below (10,000 and 100,000 replicates on a pool of N)
 *                             over the 1-thread rate of the same run (its median)
 *   10,000 end to end         replicates through a real server (everything stored, run finalised)
 *                             over the engine alone on a pool of the same size (target <= 1.10),
 *                             one client watching the run as the app does (scripts/bench-e2e.ts)
 *   10,000 under API load     once more with a client sending 20 requests/s (health and run list):
 *                             the ratio under load and the p95 latencies (without --full)
 *   100,000 end to end        (--full only) the same with 100,000 replicates under that load: seconds,
 *                             against the C reference's time for the same events on N processes; peak
 *                             RSS of the server and database size per 100,000 replicates
 *
 * Standalone: npx tsx scripts/bench-pipeline.ts [--full] [--repetitions N] [--js-reference]
 */
import os from "node:os";
import { execFileSync } from "node:child_process";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { loadSpecFile } from "@/server/cli/load-spec";
import { createSimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { DEFAULT_BENCH_SPEC, WARM_UP_REPLICATES_PER_THREAD } from "./bench-engine";
import { runEndToEndBench, type EndToEndResult } from "./bench-e2e";
import { createReference } from "./bench/reference";
import { formatCpuByThread } from "@/scripts/lib/proc-stat";

export interface Spread {
  median: number;
  min: number;
  max: number;
  values: number[];
}

export interface PipelineBench {
  conditions: { cores: number; loadBefore: number[]; loadAfter: number[]; node: string; reference: string };
  threads: number;
  repetitions: number;
  /** Linger 1 thread events/s over the reference's, per repetition. */
  engineVsReference: Spread;
  lingerEventsPerSecond1: Spread;
  referenceEventsPerSecond: Spread;
  /** Pool of N over pool of 1 (events/s). */
  lingerScaling: Spread;
  /**
   * The engine-alone runs of the end-to-end figures (pool of N: 10,000 replicates, and 100,000 with --full), events/s
   * over the median 1-thread rate above: 1 -> N threads on larger runs.
   */
  lingerScalingLarge: { replicates: number; ratios: number[] }[];
  /** N reference processes at once over one (null without cc). */
  referenceScaling: Spread | null;
  endToEnd10k: { overheadRatio: Spread; runs: EndToEndResult[] };
  /** 10,000 replicates with the client at 20 requests/s (without --full: the 100k run is under that load). */
  endToEnd10kUnderLoad: EndToEndResult | null;
  endToEnd100k: {
    run: EndToEndResult;
    /** The C reference's seconds for the same events on N processes at once (events / (N-process events/s)). */
    referenceSeconds: number | null;
    ratioToReference: number | null;
    databaseMbPer100k: number;
  } | null;
}

export function spread(values: number[]): Spread {
  const s = [...values].sort((a, b) => a - b);
  const median = s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
  return { median, min: s[0], max: s[s.length - 1], values };
}

const loadavg = () => os.loadavg().map((x) => Math.round(x * 100) / 100);

async function lingerEventsPerSecond(spec: RunSpec, pool: ReturnType<typeof createSimPool>) {
  const t0 = performance.now();
  const { events } = await runAllChunks(spec, { pool });
  return { events, eventsPerSecond: events / ((performance.now() - t0) / 1000) };
}

export async function runPipelineBench(
  opts: {
    full?: boolean;
    repetitions?: number;
    forceJs?: boolean;
    /** An end-to-end result already measured in this run (10,000 replicates, same pool, a watching client): counted as a repetition. */
    endToEnd?: EndToEndResult;
    log?: (line: string) => void;
  } = {},
): Promise<PipelineBench> {
  const log = opts.log ?? (() => {});
  const repetitions = opts.repetitions ?? 3;
  const threads = Math.max(1, os.availableParallelism());
  const loadBefore = loadavg();
  const spec = loadSpecFile(DEFAULT_BENCH_SPEC, {});
  const ref = createReference(spec, { forceJs: opts.forceJs });
  const pools = [createSimPool({ threads: 1 }), createSimPool({ threads })];
  const ratio: number[] = [];
  const l1: number[] = [];
  const r1: number[] = [];
  const lScale: number[] = [];
  const rScale: number[] = [];
  let refRate = NaN;
  let refRateN = NaN;
  try {
    // Every thread of both pools optimised for the circuit before any timing, so the ratios are steady-state ones.
    await Promise.all(pools.map((p) => p.warmUp(spec, { replicates: WARM_UP_REPLICATES_PER_THREAD })));
    ref.run();
    for (let i = 0; i < repetitions; i++) {
      const r = ref.run();
      const one = await lingerEventsPerSecond(spec, pools[0]);
      const many = await lingerEventsPerSecond(spec, pools[1]);
      const rN = await ref.runConcurrent(threads);
      ratio.push(one.eventsPerSecond / r.eventsPerSecond);
      l1.push(one.eventsPerSecond);
      r1.push(r.eventsPerSecond);
      lScale.push(many.eventsPerSecond / one.eventsPerSecond);
      if (rN) rScale.push(rN.eventsPerSecond / r.eventsPerSecond);
      log(
        `  repetition ${i + 1}: reference ${(r.eventsPerSecond / 1e6).toFixed(2)} M events/s, Linger 1 thread ${(one.eventsPerSecond / 1e6).toFixed(2)}, ` +
          `${threads} threads ${(many.eventsPerSecond / 1e6).toFixed(2)}${rN ? `, ${threads} C processes ${(rN.eventsPerSecond / 1e6).toFixed(2)}` : ""}`,
      );
    }
    refRate = spread(r1).median;
    refRateN = rScale.length ? spread(rScale).median * refRate : NaN;
  } finally {
    ref.dispose();
    await Promise.all(pools.map((p) => p.destroy()));
  }

  const e2eRuns: EndToEndResult[] = opts.endToEnd ? [opts.endToEnd] : [];
  const e2eReps = Math.max(2, Math.min(repetitions, 3));
  while (e2eRuns.length < e2eReps) {
    // The engine-alone half goes first in every other repetition, so neither half always runs on a warmer machine.
    const r = await runEndToEndBench({ replicates: 10_000, threads, engineFirst: e2eRuns.length % 2 === 1 });
    log(
      `  10,000 end to end: ${r.seconds.toFixed(2)} s vs engine alone ${r.engineSeconds.toFixed(2)} s = ${r.overheadRatio.toFixed(3)}x` +
        (r.cpuRatio === null
          ? ""
          : `; CPU ${r.serverCpuSeconds!.toFixed(2)} s vs ${r.engineCpuSeconds.toFixed(2)} s = ${r.cpuRatio.toFixed(3)}x`),
    );
    if (r.serverCpuByThread && r.engineCpuByThread)
      log(
        `    CPU by thread: server ${formatCpuByThread(r.serverCpuByThread)}; engine alone ${formatCpuByThread(r.engineCpuByThread)}`,
      );
    e2eRuns.push(r);
  }
  let endToEnd10kUnderLoad: EndToEndResult | null = null;
  if (!opts.full) {
    endToEnd10kUnderLoad = await runEndToEndBench({ replicates: 10_000, threads, client: "load" });
    log(
      `  10,000 end to end under API load: ${endToEnd10kUnderLoad.seconds.toFixed(2)} s vs engine alone ${endToEnd10kUnderLoad.engineSeconds.toFixed(2)} s = ${endToEnd10kUnderLoad.overheadRatio.toFixed(3)}x`,
    );
  }

  let endToEnd100k: PipelineBench["endToEnd100k"] = null;
  if (opts.full) {
    const run = await runEndToEndBench({ replicates: 100_000, threads, client: "load" });
    const events = run.events;
    const referenceSeconds = Number.isFinite(refRateN) ? events / refRateN : null;
    endToEnd100k = {
      run,
      referenceSeconds,
      ratioToReference: referenceSeconds ? run.seconds / referenceSeconds : null,
      databaseMbPer100k: run.databaseMb,
    };
  }
  const oneThread = spread(l1).median;
  const over1 = (runs: EndToEndResult[]) => runs.map((r) => r.events / r.engineSeconds / oneThread);
  const lingerScalingLarge = [
    { replicates: 10_000, ratios: over1([...e2eRuns, ...(endToEnd10kUnderLoad ? [endToEnd10kUnderLoad] : [])]) },
    ...(endToEnd100k ? [{ replicates: 100_000, ratios: over1([endToEnd100k.run]) }] : []),
  ];
  let referenceName: string = ref.kind;
  if (ref.kind.startsWith("C")) {
    try {
      referenceName += `, ${execFileSync("cc", ["--version"], { encoding: "utf8" }).split("\n")[0]}`;
    } catch {
      /* the version is only informative */
    }
  }
  return {
    conditions: { cores: threads, loadBefore, loadAfter: loadavg(), node: process.version, reference: referenceName },
    threads,
    repetitions,
    engineVsReference: spread(ratio),
    lingerEventsPerSecond1: spread(l1),
    referenceEventsPerSecond: spread(r1),
    lingerScaling: spread(lScale),
    lingerScalingLarge,
    referenceScaling: rScale.length ? spread(rScale) : null,
    endToEnd10k: { overheadRatio: spread(e2eRuns.map((r) => r.overheadRatio)), runs: e2eRuns },
    endToEnd10kUnderLoad,
    endToEnd100k,
  };
}

const f = (x: number, d = 2) => x.toFixed(d);
const mega = (s: Spread): Spread => ({
  median: s.median / 1e6,
  min: s.min / 1e6,
  max: s.max / 1e6,
  values: s.values.map((v) => v / 1e6),
});
const range = (s: Spread, d = 2, unit = "x") => `${f(s.median, d)}${unit} (${f(s.min, d)}-${f(s.max, d)})`;

export function formatPipelineBench(b: PipelineBench): string {
  const c = b.conditions;
  const lines = [
    `Speed against references measured in this run (median (min-max) of ${b.repetitions} repetitions; ` +
      `${c.cores} cores, load average ${c.loadBefore.join(" ")} before, ${c.loadAfter.join(" ")} after; ${c.node}; reference ${c.reference}):`,
    `| figure | Linger | reference | ratio |`,
    `| --- | --- | --- | --- |`,
    `| engine, 1 thread, benchmark circuit | ${range(mega(b.lingerEventsPerSecond1), 2, "")} M events/s | ${range(
      mega(b.referenceEventsPerSecond),
      2,
      "",
    )} M events/s | ${range(b.engineVsReference)} (target >= 0.6x) |`,
    `| 1 -> ${b.threads} threads | ${range(b.lingerScaling)} | ${b.referenceScaling ? `${b.threads} C processes: ${range(b.referenceScaling)}` : "n/a (no cc)"} | ${
      b.referenceScaling ? `${f(b.lingerScaling.median / b.referenceScaling.median)} of the reference's scaling` : "-"
    } (target >= 1.7x) |`,
    ...b.lingerScalingLarge.map(
      (l) =>
        `| 1 -> ${b.threads} threads, ${l.replicates.toLocaleString("en")} replicates (the engine-alone runs below over the 1-thread rate) | ${l.ratios.map((x) => `${f(x)}x`).join(", ")} | | (target >= 1.7x) |`,
    ),
    `| 10,000 replicates through the server / engine alone (${b.threads} threads) | ${b.endToEnd10k.runs
      .map((r) => `${f(r.seconds)} s`)
      .join(", ")} | engine alone ${b.endToEnd10k.runs.map((r) => `${f(r.engineSeconds)} s`).join(", ")} | ${range(
      b.endToEnd10k.overheadRatio,
      3,
    )} (target <= 1.10; a client watching the run as the app does) |`,
  ];
  const u = b.endToEnd10kUnderLoad;
  if (u)
    lines.push(
      `| the same under API load (20 requests/s) | ${f(u.seconds)} s | engine alone ${f(u.engineSeconds)} s | ${f(u.overheadRatio, 3)}x (report) |`,
    );
  const e = b.endToEnd100k;
  if (e)
    lines.push(
      `| 100,000 replicates through the server, stored and finalised (${b.threads} threads) | ${f(e.run.seconds, 1)} s (engine alone ${f(e.run.engineSeconds, 1)} s: ${f(e.run.overheadRatio, 3)}x) | ${
        e.referenceSeconds !== null
          ? `${b.threads} C processes: ${f(e.referenceSeconds, 1)} s for the same events`
          : "n/a"
      } | ${e.ratioToReference !== null ? `${f(e.ratioToReference)}x the reference's time` : "-"} (target < 60 s) |`,
    );
  else lines.push(`| 100,000 replicates through the server | (run with --full) | | |`);
  const last = e?.run ?? u ?? b.endToEnd10k.runs[b.endToEnd10k.runs.length - 1];
  lines.push(
    `API while computing (${last.replicates} replicates): p95 /api/health ${f(last.healthP95Ms, 1)} ms, run list ${f(last.listP95Ms, 1)} ms (target < 100 ms); ` +
      `server peak RSS ${last.peakRssMb === null ? "n/a" : `${f(last.peakRssMb, 0)} MB`}; the run added ${f(last.databaseMb, 1)} MB to the database file for ${last.replicates} replicates` +
      ` (${f((last.databaseMb * 100_000) / last.replicates, 0)} MB per 100,000` +
      (last.databaseInUseMb === null
        ? ")"
        : `; ${f(last.databaseInUseMb, 1)} MB of data after finalisation, ${f((last.databaseInUseMb * 100_000) / last.replicates, 0)} MB per 100,000: the rest is the chunks' grid sums, freed and reused by the next run)`),
  );
  if (last.serverCpuByThread && last.engineCpuByThread)
    lines.push(
      `CPU by thread (${last.replicates} replicates): server ${formatCpuByThread(last.serverCpuByThread)}; engine alone ${formatCpuByThread(last.engineCpuByThread)}`,
    );
  return lines.join("\n");
}

if (require.main === module) {
  const argv = process.argv.slice(2);
  const i = argv.indexOf("--repetitions");
  runPipelineBench({
    full: argv.includes("--full"),
    repetitions: i >= 0 ? Number(argv[i + 1]) : undefined,
    forceJs: argv.includes("--js-reference"),
    log: (l) => console.log(l),
  })
    .then((b) => {
      console.log(formatPipelineBench(b));
      if (argv.includes("--json")) console.log(JSON.stringify(b));
    })
    .catch((e: Error) => {
      console.error(`error: ${e.message}`);
      process.exit(1);
    });
}
