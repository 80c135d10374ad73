/**
 * npm run bench [-- --json] [--threads N] [--replicates N] [--no-e2e] [--e2e-replicates N]
 *                 [--no-compare] [--repetitions N] [--js-reference] [--with-100k]
 *                 [--no-redis] [--redis-replicates N] [--no-regime-map] [--no-load] [--load-clients N]
 *                 [--load-seconds N] [--no-stall] [--stall-seconds N] [--no-pipeline] [--full]
 * Unless --no-pipeline (scripts/bench-pipeline.ts): `pipeline`, the speed figures as ratios against references
 * measured in the same run (1 thread vs C, 1 -> N threads vs N C processes, 10,000 replicates end to end vs the
 * engine alone; with --full also 100,000 end to end with the server's peak RSS and database size), repeated
 * (--repetitions), median and spread, with the load average. --full also adds 100,000 to `replicateScaling`.
 * Without --threads: measures 1 thread and the pool (all cores). With --json the
 * last line is one JSON object: the last measurement's
 * {model, replicates, events, seconds, eventsPerSecond, threads}, plus, when
 * more than one thread count was measured, `runs` (every measurement) and
 * `scaling` (events/s of the last over the first), and `endToEnd` (scripts/bench-e2e.ts:
 * replicates through the server's queue with everything stored, against the engine
 * alone on the same pool, and the p95 latencies of /api/health and the run list
 * meanwhile) unless --no-e2e.
 * Unless --no-compare (scripts/bench-compare.ts): `reference` (Linger on 1 thread
 * against the C reference kernel, or its JS twin with --js-reference or without
 * `cc`, alternated --repetitions times, default 3; each repetition also runs the
 * chunks in the main thread with the fast kernel and with the reference kernel,
 * so both kernels' ratios to C and fast/reference come from the same run), `replicateScaling` (1,000
 * and 10,000 replicates; 100,000 with --with-100k) and `sizeScaling` (generated
 * cascades of 5, 20 and 50 species against the benchmark circuit), printed as a
 * table of ratios.
 * Unless --no-redis (scripts/bench-redis.ts): `distributed`, the same 10,000-replicate
 * run embedded (1 and 2 threads) and through a local redis-server with 1 and 2
 * worker processes: ratios and the per-chunk queue overhead (skipped when
 * redis-server is not installed).
 * Unless --no-regime-map (scripts/bench-regimes.ts): `regimeMap`, a 20 x 20
 * deterministic-only behaviour map of the three-species timer ring, wall and CPU
 * seconds against the 30 s target.
 * Unless --no-load (scripts/bench-load.ts): `load`, p50/p95 latency of the run list, a run's detail and
 * /api/health with 50 signed-in clients (--load-clients) while two runs compute, against the targets of
 * docs/benchmarks.md; then `loadOneClient`, /api/health p95 with one client during one run of 100,000
 * replicates (target under 100 ms).
 * Unless --no-stall (scripts/bench-stall.ts): `stall`, the p95 of /api/health
 * while one lab member sends stiff and over-budget cost estimates back to back
 * (target: under 100 ms; the estimates compute in the compute thread).
 */
import os from "node:os";
import { runEngineBench, type EngineBenchResult } from "./bench-engine";
import { runEndToEndBench, type EndToEndResult } from "./bench-e2e";
import { runStallBench } from "./bench-stall";
import { compareWithReference, replicateScaling, sizeScaling } from "./bench-compare";
import { formatRedisBench, runRedisBench } from "./bench-redis";
import { formatLoadBench, runLoadBench } from "./bench-load";
import { loadSpecFile } from "@/server/cli/load-spec";
import { DEFAULT_BENCH_SPEC } from "./bench-engine";
import { runRegimeMapBench } from "./bench-regimes";
import { formatPipelineBench, runPipelineBench } from "./bench-pipeline";

async function main() {
  const argv = process.argv.slice(2);
  const json = argv.includes("--json");
  const num = (flag: string) => {
    const i = argv.indexOf(flag);
    if (i < 0) return undefined;
    const n = Number(argv[i + 1]);
    if (!Number.isInteger(n) || n < 1) throw new Error(`${flag} needs a whole number >= 1`);
    return n;
  };
  const threads = num("--threads");
  const replicates = num("--replicates");
  const line = (r: EngineBenchResult) =>
    `${r.threads} thread${r.threads > 1 ? "s" : ""}: ${r.replicates} replicates, ${r.events} events in ${r.seconds.toFixed(3)} s = ${(r.eventsPerSecond / 1e6).toFixed(2)} M events/s (CPU ${r.cpuSeconds.toFixed(3)} s)`;
  const results = await runEngineBench({
    threads: threads !== undefined ? [threads] : undefined,
    replicates,
    onResult: (r) => {
      if (!json) console.log(line(r));
    },
  });
  const last = results[results.length - 1];
  const out: Record<string, unknown> = {
    model: last.model,
    replicates: last.replicates,
    events: last.events,
    seconds: last.seconds,
    eventsPerSecond: last.eventsPerSecond,
    threads: last.threads,
    engineVersion: last.engineVersion,
  };
  if (results.length > 1) {
    out.runs = results;
    out.scaling = last.eventsPerSecond / results[0].eventsPerSecond;
  }
  if (!argv.includes("--no-e2e")) {
    const e2e = await runEndToEndBench({ replicates: num("--e2e-replicates") ?? 10_000, threads });
    out.endToEnd = e2e;
    if (!json)
      console.log(
        `end to end (${e2e.threads} thread${e2e.threads > 1 ? "s" : ""}): ${e2e.replicates} replicates stored in ${e2e.seconds.toFixed(2)} s vs engine alone ${e2e.engineSeconds.toFixed(2)} s ` +
          `= ${e2e.overheadRatio.toFixed(3)}x, a client watching the run as the app does (${e2e.requests} requests; the latency figures are the pipeline's, under load)`,
      );
  }
  if (!argv.includes("--no-pipeline")) {
    const pipeline = await runPipelineBench({
      full: argv.includes("--full"),
      repetitions: num("--repetitions"),
      forceJs: argv.includes("--js-reference"),
      endToEnd:
        (out.endToEnd as EndToEndResult | undefined)?.replicates === 10_000
          ? (out.endToEnd as EndToEndResult)
          : undefined,
      log: json ? undefined : (l) => console.log(l),
    });
    out.pipeline = pipeline;
    if (!json) console.log("\n" + formatPipelineBench(pipeline));
  }
  if (!argv.includes("--no-stall")) {
    const st = await runStallBench({ seconds: num("--stall-seconds") ?? 20 });
    out.stall = st;
    if (!json)
      console.log(
        `stall check: /api/health p95 ${st.healthP95Ms.toFixed(1)} ms, max ${st.healthMaxMs.toFixed(1)} ms over ${st.healthRequests} requests ` +
          `while estimates ran back to back for ${st.seconds} s (${st.estimates.map((e) => `${e.count} x ${e.status}`).join(", ")}; compute budget ${st.computeWallSeconds} s)`,
      );
  }
  if (!argv.includes("--no-compare")) {
    const spec = loadSpecFile(DEFAULT_BENCH_SPEC, {});
    const cmp = await compareWithReference(spec, {
      repetitions: num("--repetitions"),
      forceJs: argv.includes("--js-reference"),
    });
    const reps = await replicateScaling(
      spec,
      argv.includes("--with-100k") || argv.includes("--full") ? [1000, 10_000, 100_000] : [1000, 10_000],
    );
    const sizes = await sizeScaling(spec, [5, 20, 50], 200);
    out.reference = cmp;
    out.replicateScaling = reps;
    out.sizeScaling = sizes;
    if (!json) {
      const f = (x: number, d = 2) => x.toFixed(d);
      console.log(
        `\nLinger (pool of 1 thread, ${spec.replicates} replicates) against ${cmp.referenceKind}, same run, ${cmp.repetitions.length} repetitions alternated:`,
      );
      console.log(
        `| repetition | reference M events/s | Linger pool M events/s | ratio | fast kernel, in thread | ratio | reference kernel, in thread | ratio | fast / reference kernel |\n| --- | --- | --- | --- | --- | --- | --- | --- | --- |`,
      );
      cmp.repetitions.forEach((r, i) =>
        console.log(
          `| ${i + 1} | ${f(r.reference.eventsPerSecond / 1e6)} | ${f(r.lingerEventsPerSecond / 1e6)} | ${f(r.ratio)}x | ` +
            `${f(r.fastKernelEventsPerSecond / 1e6)} | ${f(r.fastKernelRatio)}x | ${f(r.referenceKernelEventsPerSecond / 1e6)} | ${f(r.referenceKernelRatio)}x | ${f(r.fastOverReferenceKernel)}x |`,
        ),
      );
      const mmm = (m: { min: number; median: number; max: number }) => `${f(m.min)} / ${f(m.median)} / ${f(m.max)}x`;
      console.log(
        `ratio min/median/max: pool ${f(cmp.ratioMin)} / ${f(cmp.ratioMedian)} / ${f(cmp.ratioMax)}x; fast kernel in thread ${mmm(cmp.fastKernel)}; ` +
          `reference kernel in thread ${mmm(cmp.referenceKernel)}; fast / reference kernel ${mmm(cmp.fastOverReference)} (on CPU seconds ${mmm(cmp.fastOverReferenceCpu)}); ` +
          `event counts ${cmp.sameEvents ? "identical" : "DIFFER"} (${cmp.repetitions[0].lingerEvents}); load average ${os
            .loadavg()
            .map((l) => l.toFixed(1))
            .join(" ")}`,
      );
      console.log(`\nCost with replicates (1 thread, benchmark circuit):`);
      console.log(
        `| replicates | events | seconds | us/replicate | cost per replicate vs first row |\n| --- | --- | --- | --- | --- |`,
      );
      for (const r of reps)
        console.log(
          `| ${r.replicates} | ${r.events} | ${f(r.seconds)} | ${f(r.microsecondsPerReplicate, 0)} | ${f(r.relativeCostPerReplicate!)}x |`,
        );
      console.log(`\nCost with circuit size (1 thread, ${sizes[0].replicates} replicates each, benchmark program):`);
      console.log(
        `| circuit | species | reactions | events/replicate | us/replicate | events/s vs benchmark |\n| --- | --- | --- | --- | --- | --- |`,
      );
      for (const r of sizes)
        console.log(
          `| ${r.label} | ${r.species} | ${r.reactions} | ${Math.round(r.events / r.replicates)} | ${f(r.microsecondsPerReplicate, 0)} | ${f(r.eventsPerSecondRatio!)}x |`,
        );
    }
  }
  if (!argv.includes("--no-redis")) {
    const dist = await runRedisBench({ replicates: num("--redis-replicates") ?? 10_000 });
    out.distributed = dist;
    if (!json)
      console.log("\n" + ("skipped" in dist ? `Distributed mode skipped: ${dist.skipped}` : formatRedisBench(dist)));
  }
  if (!argv.includes("--no-regime-map")) {
    const m = runRegimeMapBench();
    out.regimeMap = m;
    if (!json)
      console.log(
        `\nDeterministic-only regime map (${Math.sqrt(m.points)} x ${Math.sqrt(m.points)}, ${m.species}-species timer ring, 1 thread): ` +
          `${m.seconds.toFixed(2)} s wall, ${m.cpuSeconds.toFixed(2)} s CPU = ${m.ratioToTarget.toFixed(2)}x the ${m.targetSeconds} s target; ` +
          Object.entries(m.labels)
            .map(([k, v]) => `${k} ${v}`)
            .join(", "),
      );
  }
  if (!argv.includes("--no-load")) {
    const load = await runLoadBench({ clients: num("--load-clients"), seconds: num("--load-seconds") });
    out.load = load;
    if (!json) console.log("\n" + formatLoadBench(load));
    // One client during one large run: /api/health only (target p95 under 100 ms).
    const one = await runLoadBench({
      clients: 1,
      computing: 1,
      replicates: 100_000,
      only: "health",
      targetMs: 100,
      pauseMs: 100,
      seconds: num("--load-seconds"),
    });
    out.loadOneClient = one;
    if (!json) console.log("\n" + formatLoadBench(one));
  }
  if (json) console.log(JSON.stringify(out));
  else if (results.length > 1)
    console.log(`scaling 1 -> ${last.threads} threads: ${(out.scaling as number).toFixed(2)}x`);
}

main().catch((e: Error) => {
  console.error(`error: ${e.message}`);
  process.exit(1);
});
