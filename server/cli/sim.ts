/**
 * npm run sim -- <spec.json | model.xml> --out <dir> [--end-time T] [--grid-step S] [--threads N]
 *                [--replicates N] [--seed S] [--quiet]
 * npm run sim -- <spec.json> --export-sbml <out.xml>   (writes the circuit as SBML and exits)
 *
 * A spec file is JSON (docs/runs.md) or an SBML model (docs/sbml.md, detected by
 * content). --end-time and --grid-step are minutes, required for SBML and
 * overriding a spec's values. A run without an input program writes
 * "no input pulses" in analysis.json and datapackage.json (pulses.csv then has its header only).
 *
 * Runs a spec and writes flat files in <dir> (created if missing):
 *   summary.json          engine version, spec, threshold, totals, statsHash (as the server stores it),
 *                         per-duration pass figures;
 *                         only its "timing" field varies between identical runs
 *   analysis.json         the noise-filter figures (RunSummary of docs/metrics.md) with the settings block
 *   datapackage.json      the data dictionary: every CSV below, every column with type, unit and meaning,
 *                         the settings block and method label (Frictionless Data Package)
 *   grid-mean.csv         time, then mean_<species> and sd_<species> per grid time (fixed columns)
 *   grid-replicates.csv   replicate, time_min, every species (all replicates)
 *   replicates.csv        per replicate: events, capped, end time, output mean/variance, extrinsic factors
 *   pulses.csv            per replicate and input pulse: the figures of docs/metrics.md
 *   output-pulses.csv     per output pulse: its width and the input pulse it started in
 *   ode.csv               time_min, the mean-field solution on the grid
 *   regime.json           behaviour labels, deterministic and stochastic, with evidence (docs/regimes.md)
 *   events-<r>.csv        every firing of replicate r (when recordEventsFor > 0), and
 *   events-<r>-initial.csv its state at time 0
 * Same spec and seed give byte-identical files for any --threads (aggregates
 * are reduced in replicate/chunk order). The I/O shell of the engine: the rest
 * of sim/ stays pure.
 */
import { createWriteStream, mkdirSync, writeFileSync, type WriteStream } from "node:fs";
import path from "node:path";
import { loadSpecFile } from "./load-spec";
import {
  ENGINE_VERSION,
  gridTimes,
  reduceChunks,
  resolveThreshold,
  runSetup,
  type ChunkResult,
  type GridPartial,
} from "@/sim";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { createSimPool } from "@/server/compute/pool";
import { finaliseRun, outputPulsesCsv, pulseStatsCsv, runSettingsBlock, type ReplicateTotals } from "@/sim/analysis";
import { csvCell } from "@/shared/csv-cell";
import { cliDataPackage, factorColumn } from "./cli-dictionary";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { exportSbml } from "@/sim/sbml";
import { gridSeries, statsHashInMemory } from "@/server/compute/run-store";

interface Args {
  spec: string;
  out: string;
  threads?: number;
  replicates?: number;
  seed?: string;
  endTime?: number;
  exportSbml?: string;
  gridStep?: number;
  quiet: boolean;
}

function usage(msg?: string): never {
  if (msg) process.stderr.write(`error: ${msg}\n`);
  process.stderr.write(
    "usage: npm run sim -- <spec.json | model.xml> --out <dir> [--end-time T] [--grid-step S] [--threads N] [--replicates N] [--seed S] [--quiet]\n",
  );
  process.exit(2);
}

function parseArgs(argv: string[]): Args {
  let spec: string | undefined;
  let out: string | undefined;
  const a: Partial<Args> = { quiet: false };
  for (let i = 0; i < argv.length; i++) {
    const v = argv[i];
    const num = (name: string) => {
      const n = Number(argv[++i]);
      if (!Number.isInteger(n) || n < 1) usage(`${name} needs a whole number >= 1`);
      return n;
    };
    const minutes = (name: string) => {
      const n = Number(argv[++i]);
      if (!Number.isFinite(n) || n <= 0) usage(`${name} needs a number of minutes > 0`);
      return n;
    };
    if (v === "--out") out = argv[++i];
    else if (v === "--export-sbml") a.exportSbml = argv[++i];
    else if (v === "--end-time") a.endTime = minutes("--end-time");
    else if (v === "--grid-step") a.gridStep = minutes("--grid-step");
    else if (v === "--threads") a.threads = num("--threads");
    else if (v === "--replicates") a.replicates = num("--replicates");
    else if (v === "--seed") a.seed = argv[++i];
    else if (v === "--quiet") a.quiet = true;
    else if (v === "--help" || v === "-h") usage();
    else if (v.startsWith("--")) usage(`unknown option ${v}`);
    else if (spec === undefined) spec = v;
    else usage(`unexpected argument ${v}`);
  }
  if (!spec) usage("missing spec file");
  if (!out && !a.exportSbml) usage("missing --out <dir>");
  return { ...a, spec, out } as Args;
}

const fmt = (v: number | null | undefined) => (v === null || v === undefined || Number.isNaN(v) ? "" : String(v));

function progressBar(enabled: boolean) {
  let last = -1;
  return (done: number, total: number) => {
    if (!enabled) return;
    const pct = Math.floor((100 * done) / total);
    if (pct === last) return;
    last = pct;
    const w = 30;
    const fill = Math.round((w * done) / total);
    process.stderr.write(`\r[${"#".repeat(fill)}${" ".repeat(w - fill)}] ${pct}% ${done}/${total} replicates`);
    if (done === total) process.stderr.write("\n");
  };
}

function write(stream: WriteStream, s: string): Promise<void> {
  return new Promise((resolve) => (stream.write(s) ? resolve() : stream.once("drain", () => resolve())));
}

function close(stream: WriteStream): Promise<void> {
  return new Promise((resolve, reject) => {
    stream.once("error", reject);
    stream.end(() => resolve());
  });
}

export async function runCli(argv: string[]): Promise<void> {
  const args = parseArgs(argv);
  const spec = loadSpecFile(args.spec, {
    replicates: args.replicates,
    seed: args.seed,
    endTimeMinutes: args.endTime,
    gridStepMinutes: args.gridStep,
  });
  if (args.exportSbml) {
    const program = spec.program === undefined ? null : runSetup(spec).sharedProgram;
    if (spec.program !== undefined && program === null)
      usage("an input program drawn per replicate cannot be exported to SBML (its switch times differ per replicate)");
    writeFileSync(
      args.exportSbml,
      exportSbml(
        spec.circuit,
        program && spec.inputSignal !== undefined
          ? { signal: spec.inputSignal, switchTimes: program.switchTimes, levels: program.levels }
          : undefined,
      ),
    );
    if (!args.quiet)
      process.stderr.write(
        `wrote ${args.exportSbml} (SBML Level 3 Version 2; ${program ? "input program as events" : "no input program"})\n`,
      );
    return;
  }
  const noInput = spec.program === undefined;
  mkdirSync(args.out, { recursive: true });
  const setup = runSetup(spec);
  const species = setup.model.speciesNames;
  const grid = gridTimes(spec);
  const ng = grid.length;
  const threshold = resolveThreshold(spec);
  const started = new Date();
  const t0 = performance.now();

  const gridCsv = createWriteStream(path.join(args.out, "grid-replicates.csv"));
  const repCsv = createWriteStream(path.join(args.out, "replicates.csv"));
  const pulseCsv = createWriteStream(path.join(args.out, "pulses.csv"));
  const widthCsv = createWriteStream(path.join(args.out, "output-pulses.csv"));
  const factorRefs = spec.extrinsic.map((v) => v.parameter);
  const factorColumns = factorRefs.map(factorColumn);
  await write(gridCsv, `replicate,time_min,${species.join(",")}\n`);
  await write(
    repCsv,
    `replicate,events,capped,end_time_min,output_mean_molecules,output_variance_molecules2${factorColumns.map((c) => `,${c}`).join("")}\n`,
  );
  // Header only when there are no input pulses: the table's shape does not change (the dictionary says why it is empty).
  await write(pulseCsv, pulseStatsCsv([]));
  await write(widthCsv, outputPulsesCsv([]));
  const partials: GridPartial[] = [];
  const byBin = new Map<
    number,
    { pulses: number; excluded: number; passed: number; delaySum: number; delays: number }
  >();
  let capped = 0;
  let events = 0;
  const allPulses: PulseStat[] = [];
  const allReplicates: ReplicateTotals[] = [];
  const recordedReplicates: number[] = [];

  const onChunk = async (r: ChunkResult) => {
    partials.push({ gridSum: r.gridSum, gridSumSq: r.gridSumSq, gridCount: r.gridCount });
    events += r.events;
    for (const t of r.trajectories) {
      let s = "";
      for (let g = 0; g < ng; g++) {
        s += `${t.replicate},${grid[g]}`;
        for (let i = 0; i < species.length; i++) s += `,${fmt(t.values[i * ng + g])}`;
        s += "\n";
      }
      await write(gridCsv, s);
    }
    let s = "";
    for (const rep of r.replicates) {
      if (rep.capped) capped++;
      allReplicates.push({
        replicate: rep.replicate,
        events: rep.events,
        capped: rep.capped,
        outputMean: rep.outputMean,
        outputVar: rep.outputVar,
      });
      s += `${rep.replicate},${rep.events},${rep.capped},${rep.endTime},${fmt(rep.outputMean)},${fmt(rep.outputVar)}${factorRefs.map((f) => `,${fmt(rep.factors[f])}`).join("")}\n`;
    }
    await write(repCsv, s);
    const chunkPulses = r.pulses as PulseStat[];
    for (const p of chunkPulses) {
      allPulses.push(p);
      const b = byBin.get(p.durationBin) ?? { pulses: 0, excluded: 0, passed: 0, delaySum: 0, delays: 0 };
      b.pulses++;
      if (p.excluded) b.excluded++;
      else if (p.passed) {
        b.passed++;
        if (p.delay !== null) {
          b.delaySum += p.delay;
          b.delays++;
        }
      }
      byBin.set(p.durationBin, b);
    }
    if (!noInput) {
      await write(pulseCsv, pulseStatsCsv(chunkPulses, false));
      await write(widthCsv, outputPulsesCsv(chunkPulses, false));
    }
    for (const e of r.recordedEvents ?? []) {
      const names = setup.model.reactions.map((x) => x.name);
      let es = "time_min,reaction\n";
      for (let k = 0; k < e.times.length; k++) es += `${e.times[k]},${csvCell(names[e.reactions[k]])}\n`;
      writeFileSync(path.join(args.out, `events-${e.replicate}.csv`), es);
      let init = "species,count\n";
      species.forEach((n, i) => (init += `${csvCell(n)},${e.initial[i]}\n`));
      writeFileSync(path.join(args.out, `events-${e.replicate}-initial.csv`), init);
      recordedReplicates.push(e.replicate);
    }
  };

  const pool = args.threads !== undefined ? createSimPool({ threads: args.threads }) : null;
  try {
    await runAllChunks(spec, {
      pool,
      keepAllGrid: true,
      onChunk,
      onProgress: progressBar(!args.quiet && process.stderr.isTTY === true),
    });
  } finally {
    await pool?.destroy();
  }
  await Promise.all([close(gridCsv), close(repCsv), close(pulseCsv), close(widthCsv)]);
  const seconds = (performance.now() - t0) / 1000;

  const { mean, sd } = reduceChunks(spec, partials);
  let meanCsv = `time${species.map((n) => `,mean_${n},sd_${n}`).join("")}\n`;
  for (let g = 0; g < ng; g++) {
    meanCsv += String(grid[g]);
    for (let i = 0; i < species.length; i++) meanCsv += `,${fmt(mean[i * ng + g])},${fmt(sd[i * ng + g])}`;
    meanCsv += "\n";
  }
  writeFileSync(path.join(args.out, "grid-mean.csv"), meanCsv);
  // the same finalisation as the server's (sim/analysis/finalise-run.ts)
  const {
    ode,
    odeNote,
    summary: analysis,
    regime,
  } = finaliseRun({
    spec,
    pulses: allPulses,
    replicates: allReplicates,
    threshold,
  });
  if (ode) {
    let odeCsv = `time_min,${species.join(",")}\n`;
    for (let g = 0; g < ng; g++) odeCsv += `${grid[g]}${species.map((_, i) => `,${ode[i * ng + g]}`).join("")}\n`;
    writeFileSync(path.join(args.out, "ode.csv"), odeCsv);
  }

  const bins = [...byBin.entries()].sort((a, b) => a[0] - b[0]);
  const settings = runSettingsBlock(spec, threshold);
  const summary = {
    engineVersion: ENGINE_VERSION,
    method: spec.method === "tauLeap" ? "tauLeap (approximate)" : "direct (exact)",
    methodLabel: settings.method,
    settings,
    circuit: spec.circuit.name,
    replicates: spec.replicates,
    seed: spec.seed,
    events,
    cappedReplicates: capped,
    // The same value the server stores and shows for this spec and seed (docs/runs.md, "Statistics hash").
    statsHash: statsHashInMemory(allReplicates, allPulses, gridSeries(spec, mean, sd, null)),
    threshold,
    perDuration: bins.map(([durationBin, b]) => ({
      durationBin,
      pulses: b.pulses,
      excluded: b.excluded,
      passed: b.passed,
      passFraction: b.pulses - b.excluded > 0 ? b.passed / (b.pulses - b.excluded) : null,
      meanDelay: b.delays > 0 ? b.delaySum / b.delays : null,
    })),
    files: [
      "summary.json",
      "analysis.json",
      "grid-mean.csv",
      "grid-replicates.csv",
      "replicates.csv",
      "pulses.csv",
      "output-pulses.csv",
      ...(ode ? ["ode.csv"] : []),
      "regime.json",
      "datapackage.json",
    ],
    ...(odeNote ? { odeNote: `no ode.csv: the mean-field model could not be solved (${odeNote})` } : {}),
    spec,
    timing: {
      startedAt: started.toISOString(),
      seconds,
      threads: args.threads ?? 1,
      eventsPerSecond: events / seconds,
    },
  };
  writeFileSync(path.join(args.out, "summary.json"), JSON.stringify(summary, null, 2) + "\n");
  writeFileSync(
    path.join(args.out, "analysis.json"),
    JSON.stringify(noInput ? { note: "no input pulses", ...analysis } : analysis, null, 2) + "\n",
  );
  writeFileSync(path.join(args.out, "regime.json"), JSON.stringify(regime, null, 2) + "\n");
  const dictionary = cliDataPackage({
    title: spec.circuit.name,
    settings,
    species,
    factors: factorRefs.map((ref, i) => ({ ref, column: factorColumns[i] })),
    recordedReplicates,
    noInput,
    hasOde: ode !== null,
  });
  writeFileSync(path.join(args.out, "datapackage.json"), JSON.stringify(dictionary, null, 2) + "\n");
  if (!args.quiet)
    process.stderr.write(
      `${spec.replicates} replicates, ${events} events in ${seconds.toFixed(2)} s${capped > 0 ? `, ${capped} stopped at the event cap` : ""}; wrote ${args.out}\n`,
    );
}

if (require.main === module) {
  runCli(process.argv.slice(2)).catch((e: Error) => {
    process.stderr.write(`error: ${e.message}\n`);
    process.exit(1);
  });
}
