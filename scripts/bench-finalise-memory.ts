/**
 * Peak memory of the finalising thread's work for a large run, in one process
 * (docs/benchmarks.md, "Peak memory"): ingest chunks as the finalising thread
 * does (stored form, hash, records kept), then the summary and the
 * per-replicate figures. "records" keeps them as objects with the frozen
 * record-based code (tests/helpers/summary-by-records.ts), "table" as columns
 * (sim/analysis/pulse-table.ts); both print the same summary hash. The same
 * 1,000 simulated replicates of docs/examples/benchmark.json are ingested
 * N / 1,000 times with their replicate numbers shifted. Peak RSS is VmHWM.
 *
 * Standalone: npx tsx scripts/bench-finalise-memory.ts records|table [N = 100000]
 */
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { loadSpecFile } from "@/server/cli/load-spec";
import { simulateChunk } from "@/sim";
import { packPulseStats, unpackPulseStats } from "@/sim/engine/pulse-columns";
import { createStatsHasher, pulseAsStored, replicateAsStored } from "@/server/compute/run-store";
import { resolveThreshold } from "@/sim/engine/resolve-threshold";
import { summarizeRun } from "@/sim/analysis/summarize-run";
import { replicateFigures } from "@/sim/regimes/replicate-figures";
import { createPulseTableBuilder } from "@/sim/analysis/pulse-table";
import { summarizeRunByRecords, replicateFiguresByRecords } from "@/tests/helpers/summary-by-records";
const mode = process.argv[2];
if (mode !== "records" && mode !== "table") throw new Error("usage: bench-finalise-memory.ts records|table [N]");
const N = Number(process.argv[3] ?? 100000);
const spec = loadSpecFile("docs/examples/benchmark.json", { replicates: N });
const C = 1000;
const base = simulateChunk(spec, 0, C, { trajectoryReplicates: 0 });
const packed = packPulseStats(base.pulses);
const threshold = resolveThreshold(spec);
const hwm = () => Number(/VmHWM:\s+(\d+)/.exec(readFileSync("/proc/self/status", "utf8"))![1]) / 1024;
const rssBase = hwm();
const hasher = createStatsHasher();
const records: ReturnType<typeof pulseAsStored>[] = [];
const table = createPulseTableBuilder();
const reps: ReturnType<typeof replicateAsStored>[] = [];
for (let k = 0; k < N / C; k++) {
  const numbers = packed.numbers.slice();
  for (let o = 0; o < numbers.length; o += 14) numbers[o] += k * C;
  const pulses = unpackPulseStats({ numbers, widths: packed.widths.slice() }).map(pulseAsStored);
  pulses.sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex);
  const rs = base.replicates.map((r) => replicateAsStored({ ...r, replicate: r.replicate + k * C }));
  hasher.addReplicates(rs);
  hasher.addPulses(pulses);
  for (const r of rs) reps.push(r);
  if (mode === "records") for (const p of pulses) records.push(p);
  else table.append(packPulseStats(pulses));
}
const t0 = performance.now();
const input = {
  replicates: reps.map((x) => ({
    replicate: x.replicate,
    events: x.events,
    capped: x.capped,
    outputMean: x.outputMean ?? NaN,
    outputVar: x.outputVar ?? NaN,
  })),
  threshold,
  noiseDurationMinutes: 10,
  endTimeMinutes: spec.endTimeMinutes,
};
const rssIngested = hwm();
const summary =
  mode === "records"
    ? summarizeRunByRecords({ ...input, pulses: records })
    : summarizeRun({ ...input, pulses: table.table() });
const figs =
  mode === "records"
    ? replicateFiguresByRecords(records, { longMinutes: summary.delayCost?.minDurationMinutes ?? null })
    : replicateFigures(table.table(), { longMinutes: summary.delayCost?.minDurationMinutes ?? null });
const seconds = (performance.now() - t0) / 1000;
const digest = hasher.digest([]);
console.log(
  JSON.stringify({
    mode,
    N,
    pulses: mode === "records" ? records.length : table.length,
    rssBaseMb: Math.round(rssBase),
    peakAfterIngestMb: Math.round(rssIngested),
    peakMb: Math.round(hwm()),
    summarySeconds: +seconds.toFixed(2),
    summaryBytes: JSON.stringify(summary).length,
    figs: figs.replicates.length,
    digest: digest.slice(0, 12),
    load: readFileSync("/proc/loadavg", "utf8").trim(),
  }),
);
console.log(
  "summary and figures sha256",
  createHash("sha256").update(JSON.stringify(summary)).update(JSON.stringify(figs)).digest("hex"),
);
