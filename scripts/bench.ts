/**
 * npm run bench [-- --json] [--threads N] [--replicates N]
 * Without --threads: measures 1 thread and the pool (all cores). With --json the
 * last line is one JSON object: the last measurement's
 * {model, replicates, events, seconds, eventsPerSecond, threads}, plus, when
 * more than one thread count was measured, `runs` (every measurement) and
 * `scaling` (events/s of the last over the first).
 */
import { runEngineBench, type EngineBenchResult } from "./bench-engine";

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
  if (json) console.log(JSON.stringify(out));
  else if (results.length > 1) console.log(`scaling 1 -> ${last.threads} threads: ${(out.scaling as number).toFixed(2)}x`);
}

main().catch((e: Error) => {
  console.error(`error: ${e.message}`);
  process.exit(1);
});
