/**
 * Finalising a run off the HTTP event loop. Two kinds of task, in one thread:
 *
 * - "ingest" (sent by the run queue after each chunk is stored): the chunk's
 *   replicate totals, pulse columns and grid sums, reduced as they arrive, in
 *   chunk order (chunks that come early wait for the ones before them): grid
 *   sums added, replicate rows and pulse columns hashed (statistics hash
 *   version 2: run-store.ts computeStatsHash), the
 *   records kept in the form SQLite gives them back, as columns of numbers
 *   (sim/analysis/pulse-table.ts; an object per record was most of the memory
 *   of a 100,000-replicate run). So finalisation does not
 *   read back and hash every row at the end.
 * - "finalise": when every chunk of the run was ingested, from that state;
 *   otherwise (a run resumed after a restart, or a thread that started afresh)
 *   from the run's stored chunks and rows in SQLite (a read-only connection;
 *   WAL lets the server keep writing), the same reduction in the same order.
 *   Then the ODE overlay, the summary of the pulse statistics, the behaviour
 *   labels (deterministic and stochastic, docs/regimes.md) and the hash. Either
 *   way the result is byte for byte the same (tests/server/compute/finalise-ingest.test.ts);
 *   the server writes it in one transaction.
 * - "prepare" (sent when a run's first chunk goes out): the part of the
 *   finalisation that needs only the spec (threshold, ODE overlay, the
 *   behaviour labels' ensembles and mean-field work: sim/analysis/finalise-run.ts
 *   prepareFinalise), done while the replicates compute; "finalise" from
 *   ingested chunks then only summarises. With the threshold known, each
 *   ingested chunk's summary samples are also sorted as it comes
 *   (createRunSummaryBuilder), so the summary at the end only merges them.
 *   Same bytes as without either.
 * - "drop": forget a run's ingested state (cancelled or failed).
 */
import Database from "better-sqlite3";
import { drizzle } from "drizzle-orm/better-sqlite3";
import { eq } from "drizzle-orm";
import * as schema from "@/db/schema";
import type { Db } from "@/db/client";
import type { RunSpec } from "@/shared/schemas/run-spec";
import type { RunSummary } from "@/shared/schemas/analysis";
import { OdeBudget, createGridReducer, withOdeBudget, type GridPartial } from "@/sim";
import type { ReplicateFigures } from "@/sim/regimes/replicate-figures";
import type { RunRegime } from "@/sim/regimes";
import { completeFinalise, finaliseRun, prepareFinalise, type PreparedFinalise } from "@/sim/analysis";
import { PULSE_FIELDS, packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";
import { createPulseTableBuilder } from "@/sim/analysis/pulse-table";
import { createRunSummaryBuilder, type RunSummaryBuilder } from "@/sim/analysis/summarize-run";
import {
  computeStatsHash,
  createStatsHasher,
  fromBlob,
  gridSeries,
  readChunks,
  readPulseStats,
  readReplicateRows,
  replicateAsStored,
  statsHashVersion,
} from "@/server/compute/run-store";
import { THREAD_NAMES, nameThisThread } from "./thread-priority";

nameThisThread(THREAD_NAMES.finalise);

export interface FinaliseTask {
  kind?: "finalise";
  dbPath: string;
  runId: string;
  /** Tests: ignore any ingested state and read everything from SQLite. */
  fromDatabase?: boolean;
}

export interface IngestTask {
  kind: "ingest";
  runId: string;
  chunkIndex: number;
  /** Chunks in the run's layout. */
  chunks: number;
  spec: Pick<RunSpec, "replicates" | "endTimeMinutes" | "gridStepMinutes">;
  replicates: { replicate: number; events: number; capped: boolean; outputMean: number; outputVar: number }[];
  pulses: PackedPulseStats;
  gridSum: Float64Array;
  gridSumSq: Float64Array;
  gridCount: Float64Array;
}

export interface PrepareTask {
  kind: "prepare";
  runId: string;
  /** Chunks in the run's layout. */
  chunks: number;
  spec: RunSpec;
}

export interface DropTask {
  kind: "drop";
  runId: string;
}

export type FinaliserTask = FinaliseTask | IngestTask | PrepareTask | DropTask;

export interface FinaliseResult {
  series: { species: string; kind: "mean" | "sd" | "ode"; values: Uint8Array }[];
  summary: RunSummary;
  statsHash: string;
  capped: boolean;
  odeNote: string | null;
  regime: RunRegime;
  replicateFigures: ReplicateFigures;
  /** Where the rows came from: the chunks ingested as they were stored, or SQLite. */
  source: "ingested" | "database";
  /** The spec's part (threshold, ODE overlay, behaviour ensembles) was computed ahead by a "prepare" task. */
  preparedAhead: boolean;
  /** The summary's samples were sorted as the chunks were ingested (the finalisation only merged them). */
  summarisedAhead: boolean;
}

/** Computing time and ODE steps the ODE work of one finalisation (overlay, threshold, regime) may take. */
const FINALISE_ODE_WALL_MS = 120_000;
const FINALISE_ODE_STEPS = 20_000_000;

type StoredReplicate = ReturnType<typeof replicateAsStored>;

/** A run's rows reduced so far, in chunk order. */
interface Reduction {
  chunks: number;
  /** The next chunk index to reduce; earlier ones are in. */
  next: number;
  waiting: Map<number, IngestTask>;
  grid: ReturnType<typeof createGridReducer>;
  hasher: ReturnType<typeof createStatsHasher>;
  replicates: StoredReplicate[];
  /** The pulse records as columns (sim/analysis/pulse-table.ts), not an object each: most of a large run's memory. */
  pulses: ReturnType<typeof createPulseTableBuilder>;
  /**
   * The summary's samples sorted as chunks come (sim/analysis/summarize-run.ts createRunSummaryBuilder), when
   * the run's threshold was prepared before its first chunk; null when not (the summary is made at the end).
   */
  summary?: RunSummaryBuilder | null;
  /** prepareFinalise's result for the run's spec (or what it threw), when a "prepare" task came. */
  prepared?: { spec: RunSpec; value: PreparedFinalise } | { spec: RunSpec; error: Error };
}

const reductions = new Map<string, Reduction>();

function newReduction(spec: IngestTask["spec"], chunks: number): Reduction {
  return {
    chunks,
    next: 0,
    waiting: new Map(),
    grid: createGridReducer(spec),
    hasher: createStatsHasher(),
    replicates: [],
    pulses: createPulseTableBuilder(),
  };
}

/**
 * One chunk into the reduction: its pulse columns put in (replicate, pulse) order, hashed as columns and
 * kept as SQLite gives the records back, without an object per record (the same hash and numbers as
 * sorting unpackPulseStats(pulses).map(pulseAsStored) and packing them: tests/server/compute/pulse-lines.test.ts),
 * and the summary's samples of the chunk sorted (createRunSummaryBuilder).
 */
function reduceOne(r: Reduction, replicates: StoredReplicate[], pulses: PackedPulseStats, grid: GridPartial) {
  replicates.sort((a, b) => a.replicate - b.replicate);
  const ordered = inRecordOrder(pulses);
  r.grid.add(grid);
  r.hasher.addReplicates(replicates);
  r.hasher.addPackedPulses(ordered);
  for (const x of replicates) r.replicates.push(x);
  const from = r.pulses.length;
  r.pulses.append(packedAsStored(ordered));
  if (r.summary === undefined) {
    // from the first chunk on, or never: the builder must see every record
    const prepared = r.prepared && "value" in r.prepared ? r.prepared : undefined;
    r.summary = prepared
      ? createRunSummaryBuilder({
          windowMinutes: prepared.value.threshold.windowMinutes,
          endTimeMinutes: prepared.spec.endTimeMinutes,
        })
      : null;
  }
  r.summary?.add(r.pulses.table(), from, r.pulses.length);
}

/** Local copies: under tsx an imported binding is read through a getter at every use. */
const FIELDS = PULSE_FIELDS;

/**
 * The records of packed columns in the order reduceOne's sort of their objects gives (by replicate, then
 * pulse index; a stable sort, so ties keep their order): as they are when already in it (a chunk from a
 * worker is), otherwise the same comparator sorts their indices, which Array.prototype.sort permutes as
 * it would the objects.
 */
export function inRecordOrder(p: PackedPulseStats): PackedPulseStats {
  const a = p.numbers;
  const n = a.length / FIELDS;
  const cmp = (i: number, j: number) => a[i * FIELDS] - a[j * FIELDS] || a[i * FIELDS + 1] - a[j * FIELDS + 1];
  let sorted = true;
  for (let k = 1; k < n && sorted; k++) if (!(cmp(k - 1, k) <= 0)) sorted = false;
  if (sorted) return p;
  const order = Array.from({ length: n }, (_, i) => i).sort(cmp);
  const start = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) start[i + 1] = start[i] + a[i * FIELDS + 12];
  const numbers = new Float64Array(a.length);
  const widths = new Float64Array(p.widths.length);
  let w = 0;
  order.forEach((i, k) => {
    numbers.set(a.subarray(i * FIELDS, (i + 1) * FIELDS), k * FIELDS);
    widths.set(p.widths.subarray(start[i], start[i + 1]), w);
    w += start[i + 1] - start[i];
  });
  return { numbers, widths };
}

/**
 * packPulseStats(unpackPulseStats(p).map(pulseAsStored)) without the objects: flags as 0/1 (1 only for 1),
 * peak, time to peak and baseline NaN as 0 (pulseAsStored makes them null, which a Float64Array holds as
 * 0), widths after their JSON round trip (-0 as 0, a non-finite one as 0); the other figures as they are.
 */
export function packedAsStored(p: PackedPulseStats): PackedPulseStats {
  const numbers = p.numbers.slice();
  const n = numbers.length / FIELDS;
  for (let i = 0; i < n; i++) {
    const o = i * FIELDS;
    numbers[o + 5] = numbers[o + 5] === 1 ? 1 : 0;
    numbers[o + 6] = numbers[o + 6] === 1 ? 1 : 0;
    if (numbers[o + 9] !== numbers[o + 9]) numbers[o + 9] = 0;
    if (numbers[o + 10] !== numbers[o + 10]) numbers[o + 10] = 0;
    if (numbers[o + 13] !== numbers[o + 13]) numbers[o + 13] = 0;
  }
  const widths = p.widths.slice();
  for (let j = 0; j < widths.length; j++) {
    const x = widths[j];
    widths[j] = Number.isFinite(x) ? x + 0 : 0;
  }
  return { numbers, widths };
}

function ingest(task: IngestTask): void {
  let r = reductions.get(task.runId);
  if (!r) reductions.set(task.runId, (r = newReduction(task.spec, task.chunks)));
  if (task.chunkIndex < r.next || r.waiting.has(task.chunkIndex)) return; // delivered twice: counted once
  r.waiting.set(task.chunkIndex, task);
  for (let t = r.waiting.get(r.next); t; t = r.waiting.get(r.next)) {
    r.waiting.delete(r.next);
    reduceOne(r, t.replicates.map(replicateAsStored), t.pulses, t);
    r.next++;
  }
}

function prepare(task: PrepareTask): void {
  let r = reductions.get(task.runId);
  if (!r) reductions.set(task.runId, (r = newReduction(task.spec, task.chunks)));
  if (r.prepared) return;
  const budget = finaliseBudget();
  try {
    r.prepared = { spec: task.spec, value: withOdeBudget(budget, () => prepareFinalise(task.spec)) };
  } catch (e) {
    r.prepared = { spec: task.spec, error: e as Error };
  }
}

/** The ODE budget of one finalisation (prepared ahead or not). */
function finaliseBudget(): OdeBudget {
  const deadline = Date.now() + FINALISE_ODE_WALL_MS;
  return new OdeBudget({
    maxSteps: FINALISE_ODE_STEPS,
    checkpoint: () => Date.now() < deadline,
    wallSeconds: FINALISE_ODE_WALL_MS / 1000,
  });
}

/** The whole reduction from SQLite: the stored chunks in chunk order, then every row in index order. */
function reduceFromDatabase(db: Db, spec: RunSpec, runId: string, chunks: number): Reduction {
  const r = newReduction(spec, chunks);
  for (const c of readChunks(db, runId))
    r.grid.add({
      gridSum: fromBlob(c.gridSum as Buffer),
      gridSumSq: fromBlob(c.gridSumSq as Buffer),
      gridCount: fromBlob(c.gridCount as Buffer),
    });
  r.replicates = readReplicateRows(db, runId).map(replicateAsStored);
  const pulses = readPulseStats(db, runId);
  r.hasher.addReplicates(r.replicates);
  r.hasher.addPulses(pulses);
  r.pulses.append(packPulseStats(pulses));
  r.next = chunks;
  return r;
}

function finalise(task: FinaliseTask): FinaliseResult {
  const ingested = reductions.get(task.runId);
  reductions.delete(task.runId);
  const sqlite = new Database(task.dbPath, { readonly: true, fileMustExist: true });
  try {
    sqlite.pragma("busy_timeout = 5000");
    const db = drizzle(sqlite, { schema }) as unknown as Db;
    const run = db.select().from(schema.runs).where(eq(schema.runs.id, task.runId)).get();
    if (!run) throw new Error(`run ${task.runId} not found`);
    const spec = run.spec as RunSpec;
    const stored = (
      sqlite.prepare("SELECT count(*) AS n FROM run_chunks WHERE run_id = ?").get(task.runId) as { n: number }
    ).n;
    const complete =
      !task.fromDatabase && ingested !== undefined && ingested.next === ingested.chunks && stored === ingested.chunks;
    const r = complete ? ingested : reduceFromDatabase(db, spec, task.runId, stored);
    const { mean, sd } = r.grid.result();
    // Prepared ahead for this very spec (the stored one), or everything now.
    const prepared = complete && r.prepared && sameSpec(r.prepared.spec, spec) ? r.prepared : undefined;
    const input = {
      spec,
      pulses: r.pulses.table(),
      summaryParts: prepared && r.summary ? r.summary : undefined,
      replicates: r.replicates.map((x) => ({
        replicate: x.replicate,
        events: x.events,
        capped: x.capped,
        outputMean: x.outputMean ?? NaN,
        outputVar: x.outputVar ?? NaN,
      })),
    };
    if (prepared && "error" in prepared) throw prepared.error;
    const { ode, odeNote, summary, regime, replicateFigures } = prepared
      ? completeFinalise(prepared.value, input)
      : withOdeBudget(finaliseBudget(), () => finaliseRun(input));
    const series = gridSeries(spec, mean, sd, ode);
    return {
      series,
      summary,
      regime,
      replicateFigures,
      statsHash:
        run.expectedStatsHash && statsHashVersion(run.expectedStatsHash) === 1
          ? // a reproduction of a run hashed by version 1: the same version, from the rows as stored
            computeStatsHash(readReplicateRows(db, task.runId), readPulseStats(db, task.runId), series, 1)
          : r.hasher.digest(series),
      capped: r.replicates.some((x) => x.capped),
      odeNote,
      source: complete ? "ingested" : "database",
      preparedAhead: prepared !== undefined,
      summarisedAhead: input.summaryParts !== undefined,
    };
  } finally {
    sqlite.close();
  }
}

const sameSpec = (a: RunSpec, b: RunSpec) => JSON.stringify(a) === JSON.stringify(b);

export default function finaliser(task: FinaliserTask): FinaliseResult | null {
  if (task.kind === "prepare") {
    prepare(task);
    return null;
  }
  if (task.kind === "ingest") {
    ingest(task);
    return null;
  }
  if (task.kind === "drop") {
    reductions.delete(task.runId);
    return null;
  }
  return finalise(task);
}
