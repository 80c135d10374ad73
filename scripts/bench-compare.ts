/**
 * The engine against a fixed reference in the same run (scripts/bench/reference.ts:
 * a C direct method for the benchmark circuit compiled with cc -O2, or its JS
 * twin), and how a run's cost grows with the number of replicates and with the
 * circuit's size, so a run's cost can be predicted from the benchmark's.
 * Everything on a pool of 1 thread, started and warmed beforehand.
 */
import { RunSpecSchema, type RunSpec } from "@/shared/schemas/run-spec";
import type { CircuitInput } from "@/shared/schemas/circuit";
import { createSimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";
import { simulateChunk } from "@/sim";
import { createReference, type ReferenceResult } from "./bench/reference";

export interface CompareRepetition {
  reference: ReferenceResult;
  lingerEventsPerSecond: number;
  lingerEvents: number;
  /** Linger's events/s over the reference's, this repetition. */
  ratio: number;
  /** The chunks run in this (main) thread with the fast kernel (the default) and with the reference kernel. */
  fastKernelEventsPerSecond: number;
  referenceKernelEventsPerSecond: number;
  /** fast kernel / C (or JS) reference, reference kernel / C reference, fast / reference kernel, this repetition. */
  fastKernelRatio: number;
  referenceKernelRatio: number;
  fastOverReferenceKernel: number;
  /** The same on CPU seconds of this process (less sensitive to other processes on the machine). */
  fastOverReferenceKernelCpu: number;
}

export interface ReferenceComparison {
  referenceKind: ReferenceResult["kind"];
  /** Event counts of Linger and the reference agree (same generator states, same arithmetic). */
  sameEvents: boolean;
  repetitions: CompareRepetition[];
  ratioMin: number;
  ratioMedian: number;
  ratioMax: number;
  /** Min / median / max over repetitions of the in-thread ratios. */
  fastKernel: { min: number; median: number; max: number };
  referenceKernel: { min: number; median: number; max: number };
  fastOverReference: { min: number; median: number; max: number };
  fastOverReferenceCpu: { min: number; median: number; max: number };
}

export interface ScalingRow {
  label: string;
  replicates: number;
  species: number;
  reactions: number;
  events: number;
  seconds: number;
  eventsPerSecond: number;
  microsecondsPerReplicate: number;
  /** Seconds over (seconds of the first row scaled by replicates): 1 = linear in replicates. */
  relativeCostPerReplicate?: number;
  /** Events/s over the benchmark circuit's events/s in the same run. */
  eventsPerSecondRatio?: number;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const spread = (xs: number[]) => ({ min: Math.min(...xs), median: median(xs), max: Math.max(...xs) });

/** The spec's chunks of 100 replicates run in this thread with one kernel variant: events per wall and per CPU second. */
function inThread(spec: RunSpec, kernel: "fast" | "reference"): { wall: number; cpu: number } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  let events = 0;
  for (let start = 0; start < spec.replicates; start += 100)
    events += simulateChunk(spec, start, Math.min(100, spec.replicates - start), { kernel }).events;
  const cpu = process.cpuUsage(c0);
  return { wall: events / ((performance.now() - t0) / 1000), cpu: events / ((cpu.user + cpu.system) / 1e6) };
}

async function timed(spec: RunSpec, pool: ReturnType<typeof createSimPool>) {
  const t0 = performance.now();
  const { events } = await runAllChunks(spec, { pool });
  const seconds = (performance.now() - t0) / 1000;
  return { events, seconds };
}

/**
 * Alternates the reference, Linger on a pool of 1 thread, and the same chunks
 * in this thread with the fast and the reference kernel, `repetitions` times
 * on the benchmark spec.
 */
export async function compareWithReference(
  spec: RunSpec,
  opts: { repetitions?: number; forceJs?: boolean } = {},
): Promise<ReferenceComparison> {
  const ref = createReference(spec, { forceJs: opts.forceJs });
  const pool = createSimPool({ threads: 1 });
  const repetitions: CompareRepetition[] = [];
  try {
    await pool.warmUp(spec);
    ref.run(); // warm (JS twin: tier-up; C: page cache)
    const warm = { ...spec, replicates: 300 };
    inThread(warm, "fast");
    inThread(warm, "reference");
    for (let i = 0; i < (opts.repetitions ?? 3); i++) {
      const reference = ref.run();
      const l = await timed(spec, pool);
      const fk = inThread(spec, "fast");
      const rk = inThread(spec, "reference");
      const fastKernelEventsPerSecond = fk.wall;
      const referenceKernelEventsPerSecond = rk.wall;
      const lingerEventsPerSecond = l.events / l.seconds;
      repetitions.push({
        reference,
        lingerEvents: l.events,
        lingerEventsPerSecond,
        ratio: lingerEventsPerSecond / reference.eventsPerSecond,
        fastKernelEventsPerSecond,
        referenceKernelEventsPerSecond,
        fastKernelRatio: fastKernelEventsPerSecond / reference.eventsPerSecond,
        referenceKernelRatio: referenceKernelEventsPerSecond / reference.eventsPerSecond,
        fastOverReferenceKernel: fastKernelEventsPerSecond / referenceKernelEventsPerSecond,
        fastOverReferenceKernelCpu: fk.cpu / rk.cpu,
      });
    }
  } finally {
    ref.dispose();
    await pool.destroy();
  }
  const ratios = repetitions.map((r) => r.ratio);
  return {
    referenceKind: ref.kind,
    sameEvents: repetitions.every((r) => r.lingerEvents === r.reference.events),
    repetitions,
    ratioMin: Math.min(...ratios),
    ratioMedian: median(ratios),
    ratioMax: Math.max(...ratios),
    fastKernel: spread(repetitions.map((r) => r.fastKernelRatio)),
    referenceKernel: spread(repetitions.map((r) => r.referenceKernelRatio)),
    fastOverReference: spread(repetitions.map((r) => r.fastOverReferenceKernel)),
    fastOverReferenceCpu: spread(repetitions.map((r) => r.fastOverReferenceKernelCpu)),
  };
}

function row(label: string, spec: RunSpec, events: number, seconds: number): ScalingRow {
  return {
    label,
    replicates: spec.replicates,
    species: spec.circuit.species.length,
    reactions: spec.circuit.reactions.length,
    events,
    seconds,
    eventsPerSecond: events / seconds,
    microsecondsPerReplicate: (seconds / spec.replicates) * 1e6,
  };
}

/** Time for each replicate count (seed and circuit of the benchmark). */
export async function replicateScaling(spec: RunSpec, counts: number[]): Promise<ScalingRow[]> {
  const pool = createSimPool({ threads: 1 });
  const rows: ScalingRow[] = [];
  try {
    await pool.warmUp(spec);
    for (const n of counts) {
      const s = { ...spec, replicates: n };
      const { events, seconds } = await timed(s, pool);
      rows.push(row(`${n} replicates`, s, events, seconds));
    }
  } finally {
    await pool.destroy();
  }
  for (const r of rows) r.relativeCostPerReplicate = r.seconds / r.replicates / (rows[0].seconds / rows[0].replicates);
  return rows;
}

/**
 * A generated cascade of n species: S drives the first (0 -> P0 at 10 S), each
 * next one is made at 10 P^2/(50^2 + P^2) of the one before (Hill activation),
 * every species decays at 0.1/min; the benchmark's input program.
 */
export function cascadeSpec(base: RunSpec, n: number, replicates: number): RunSpec {
  const name = (i: number) => `P${i}`;
  const circuit: CircuitInput = {
    name: `Cascade of ${n}`,
    species: Array.from({ length: n }, (_, i) => ({ name: name(i), initialCount: 0 })),
    signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
    reactions: Array.from({ length: n }, (_, i) => [
      i === 0
        ? {
            name: `make${name(i)}`,
            products: [{ species: name(i), count: 1 }],
            rate: { kind: "constant" as const, ratePerMinute: 10 },
            scaledBy: "S",
          }
        : {
            name: `make${name(i)}`,
            products: [{ species: name(i), count: 1 }],
            rate: {
              kind: "regulated" as const,
              maxRatePerMinute: 10,
              regulators: [{ source: name(i - 1), effect: "activates" as const, halfMax: 50, hill: 2 }],
            },
          },
      {
        name: `deg${name(i)}`,
        reactants: [{ species: name(i), count: 1 }],
        rate: { kind: "massAction" as const, ratePerMinute: 0.1 },
      },
    ]).flat(),
    outputSpecies: name(n - 1),
  };
  return RunSpecSchema.parse({ ...base, circuit, inputSignal: "S", replicates });
}

/** Events/s on generated cascades of each size against the benchmark circuit, same run, same replicates. */
export async function sizeScaling(base: RunSpec, sizes: number[], replicates: number): Promise<ScalingRow[]> {
  const specs: [string, RunSpec][] = [
    ["benchmark (3 species)", { ...base, replicates }],
    ...sizes.map((n): [string, RunSpec] => [`cascade, ${n} species`, cascadeSpec(base, n, replicates)]),
  ];
  const rows: ScalingRow[] = [];
  for (const [label, s] of specs) {
    const pool = createSimPool({ threads: 1 });
    try {
      await pool.warmUp(s);
      const { events, seconds } = await timed(s, pool);
      rows.push(row(label, s, events, seconds));
    } finally {
      await pool.destroy();
    }
  }
  for (const r of rows) r.eventsPerSecondRatio = r.eventsPerSecond / rows[0].eventsPerSecond;
  return rows;
}
