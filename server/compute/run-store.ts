/**
 * Writing and reading a run's stored statistics. Chunk rows, replicate rows,
 * pulses (pulse-store.ts) and trajectories of one chunk are written in one transaction, so
 * a crash never leaves half a chunk; finalisation writes the series, summary
 * and hash in one more.
 */
import { createHash, type Hash } from "node:crypto";
import { asc, eq } from "drizzle-orm";
import type Database from "better-sqlite3";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import type { PulseStat, RunSpec } from "@/shared/schemas/run-spec";
import { PULSE_FIELDS, packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";
import { createPulseWriter, readPulseStats } from "./pulse-store";

/** A local copy: under tsx an imported binding is read through a getter at every use. */
const FIELD_COUNT = PULSE_FIELDS;

export const toBlob = (a: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);
export const fromBlob = (b: Buffer | Uint8Array | null | undefined): Float64Array => {
  if (!b) return new Float64Array(0);
  const copy = new Uint8Array(b.byteLength);
  copy.set(b);
  return new Float64Array(copy.buffer);
};

export interface StoredChunk {
  chunkIndex: number;
  replicateStart: number;
  count: number;
  events: number;
  seconds: number;
  gridSum: Float64Array;
  gridSumSq: Float64Array;
  gridCount: Float64Array;
  replicates: {
    replicate: number;
    events: number;
    capped: boolean;
    outputMean: number | null;
    outputVar: number | null;
    factors: Record<string, number>;
  }[];
  /** As records, or as the columns a worker thread sends (sim/engine/pulse-columns.ts), stored without unpacking. */
  pulses: PulseStat[] | PackedPulseStats;
  trajectories: { replicate: number; values: Float64Array }[];
}

export function speciesNames(spec: RunSpec): string[] {
  return spec.circuit.species.map((s) => s.name);
}

/** Prepared statements for the hot write path (one chunk at a time). */
export function createChunkWriter(sqlite: Database.Database, opts: { pulseFormat?: "blobs" | "rows" } = {}) {
  const writePulses = createPulseWriter(sqlite, { format: opts.pulseFormat });
  const insChunk = sqlite.prepare(
    // Idempotent, keyed by (run, chunk index): a chunk delivered twice (a worker retried after a stall) is stored once.
    `INSERT INTO run_chunks (run_id, chunk_index, replicate_start, count, events, grid_sum, grid_sum_sq, grid_count, seconds) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT (run_id, chunk_index) DO NOTHING`,
  );
  const insRep = sqlite.prepare(
    `INSERT INTO replicate_stats (run_id, replicate, events, capped, output_mean, output_var, factors) VALUES (?, ?, ?, ?, ?, ?, ?)`,
  );
  const insTraj = sqlite.prepare(
    `INSERT INTO run_trajectories (run_id, replicate, species, "values") VALUES (?, ?, ?, ?)`,
  );
  const updRun = sqlite.prepare(
    `UPDATE runs SET replicates_done = replicates_done + ?, events_total = events_total + ?, capped_replicates = capped_replicates + ?, compute_seconds = compute_seconds + ? WHERE id = ?`,
  );
  /** Stores one chunk in one transaction; false (nothing written) when the chunk was already stored. */
  const write = sqlite.transaction((runId: string, species: string[], gridLength: number, c: StoredChunk): boolean => {
    const inserted = insChunk.run(
      runId,
      c.chunkIndex,
      c.replicateStart,
      c.count,
      c.events,
      toBlob(c.gridSum),
      toBlob(c.gridSumSq),
      toBlob(c.gridCount),
      c.seconds,
    );
    if (inserted.changes === 0) return false;
    let capped = 0;
    for (const r of c.replicates) {
      if (r.capped) capped++;
      insRep.run(
        runId,
        r.replicate,
        r.events,
        r.capped ? 1 : 0,
        finiteOrNull(r.outputMean),
        finiteOrNull(r.outputVar),
        JSON.stringify(r.factors ?? {}),
      );
    }
    writePulses(runId, c.chunkIndex, c.replicateStart, c.pulses);
    for (const t of c.trajectories) {
      species.forEach((name, s) =>
        insTraj.run(runId, t.replicate, name, toBlob(t.values.slice(s * gridLength, (s + 1) * gridLength))),
      );
    }
    updRun.run(c.count, c.events, capped, c.seconds, runId);
    return true;
  });
  return { write };
}

const finiteOrNull = (x: number | null | undefined) =>
  x === null || x === undefined || !Number.isFinite(x) ? null : x;

/** Pulse statistics in (replicate, pulse) order, from wherever the run keeps them (pulse-store.ts). */
export { readPulseStats };

export function readReplicateRows(db: Db, runId: string) {
  return db
    .select()
    .from(schema.replicateStats)
    .where(eq(schema.replicateStats.runId, runId))
    .orderBy(asc(schema.replicateStats.replicate))
    .all();
}

export function readChunks(db: Db, runId: string) {
  return db
    .select()
    .from(schema.runChunks)
    .where(eq(schema.runChunks.runId, runId))
    .orderBy(asc(schema.runChunks.chunkIndex))
    .all();
}

type ReplicateRow = {
  replicate: number;
  events: number;
  capped: boolean;
  outputMean: number | null;
  outputVar: number | null;
};

/** The prefix of a version 2 statistics hash; a version 1 hash is 64 hex digits alone. */
export const STATS_HASH_V2 = "v2:";
export const statsHashVersion = (hash: string): 1 | 2 => (hash.startsWith(STATS_HASH_V2) ? 2 : 1);

/**
 * Content hash of the stored statistics: every replicate row and pulse row in index order, and the grid
 * mean/SD series (species order, mean then sd). Two runs with the same hash stored the same numbers.
 *
 * Version 2 (what runs get now, "v2:" and 64 hex digits): the numbers as doubles, so that the finalising
 * thread hashes each chunk's columns as they are instead of rendering a line of text per record (most of
 * its per-chunk work): sha256 over "linger statistics v2\n", then the sha256 of the replicate rows
 * (replicate, events, capped as 0/1, output mean, output variance per row), of the pulse rows (replicate,
 * pulse index, on, off, duration, excluded and passed as 0/1, delay, OFF delay, peak, time to peak, FWHM,
 * width count, baseline per row) and of every row's widths in row order, then each series'
 * "species/kind:" and its bytes. Doubles are little-endian, -0 is written as 0 and every null or NaN as
 * one NaN (0x7ff8000000000000): the numbers a version 1 line tells apart, this tells apart.
 * Version 1 (runs finalised before; "r ..." and "p ..." lines of text per row, canonicalReplicate and
 * canonicalPulse): still computed for a reproduction of a run whose hash is version 1, so it can be
 * compared (the finalising thread reads the rows back for it).
 */
export function computeStatsHash(
  replicates: ReplicateRow[],
  pulses: PulseStat[],
  series: { species: string; kind: string; values: Uint8Array }[],
  version: 1 | 2 = 2,
): string {
  const h = createStatsHasher(version);
  h.addReplicates(replicates);
  h.addPulses(pulses);
  return h.digest(series);
}

export type StatsHasher = ReturnType<typeof createStatsHasher>;

/**
 * computeStatsHash fed a chunk at a time (the finalising thread, as chunks are stored), in (replicate, pulse)
 * order: the digest equals computeStatsHash's. Version 2 streams each part into its own sha256 (nothing is
 * held); version 1 holds the pulse lines until the digest (they come after every replicate line).
 */
export function createStatsHasher(version: 1 | 2 = 2) {
  return version === 2 ? statsHasherV2() : statsHasherV1();
}

function statsHasherV1() {
  const h = createHash("sha256");
  /** Flat bytes (the lines are ASCII), not the string ropes `+=` builds: a large run holds millions of lines. */
  const pulseText: Buffer[] = [];
  return {
    addReplicates(rows: readonly ReplicateRow[]) {
      let text = "";
      for (const r of rows) text += canonicalReplicate(r) + "\n";
      h.update(text);
    },
    addPulses(pulses: readonly PulseStat[]) {
      let text = "";
      for (const p of pulses) text += canonicalPulse(p) + "\n";
      pulseText.push(Buffer.from(text, "utf8"));
    },
    /** Version 1 is only computed from records (a reproduction of a version 1 run reads them back). */
    addPackedPulses(): never {
      throw new Error("a version 1 statistics hash is computed from the stored rows");
    },
    digest(series: { species: string; kind: string; values: Uint8Array }[]): string {
      for (const t of pulseText) h.update(t);
      pulseText.length = 0;
      return digestSeries(h, series).digest("hex");
    },
  };
}

function statsHasherV2() {
  const replicates = createHash("sha256");
  const pulses = createHash("sha256");
  const widths = createHash("sha256");
  /**
   * addPulses of the records of packed columns (unpackPulseStats(packed).map(pulseAsStored)), without the
   * records: flags as 0/1 (1 only for 1), non-finite widths as NaN (their JSON round trip makes them null).
   */
  const addPackedPulses = (packed: PackedPulseStats) => {
    const a = packed.numbers.slice();
    for (let o = 0; o < a.length; o += FIELD_COUNT) {
      a[o + 5] = a[o + 5] === 1 ? 1 : 0;
      a[o + 6] = a[o + 6] === 1 ? 1 : 0;
    }
    const w = packed.widths.slice();
    for (let j = 0; j < w.length; j++) if (!Number.isFinite(w[j])) w[j] = NaN;
    pulses.update(canonicalBytes(a));
    widths.update(canonicalBytes(w));
  };
  return {
    addReplicates(rows: readonly ReplicateRow[]) {
      const a = new Float64Array(rows.length * 5);
      rows.forEach((r, i) => {
        a[i * 5] = r.replicate;
        a[i * 5 + 1] = r.events;
        a[i * 5 + 2] = r.capped ? 1 : 0;
        a[i * 5 + 3] = r.outputMean ?? NaN;
        a[i * 5 + 4] = r.outputVar ?? NaN;
      });
      replicates.update(canonicalBytes(a));
    },
    /** Records as readPulseStats gives them (null as NaN). */
    addPulses(records: readonly PulseStat[]) {
      // packPulseStats writes a null peak, time to peak, baseline or width as 0; here it is NaN, as in the columns
      const packed = packPulseStats(records);
      const a = packed.numbers;
      let w = 0;
      records.forEach((p, i) => {
        const o = i * FIELD_COUNT;
        if (isNull(p.peak)) a[o + 9] = NaN;
        if (isNull(p.timeToPeak)) a[o + 10] = NaN;
        if (isNull(p.baseline)) a[o + 13] = NaN;
        for (const x of p.widths)
          if (isNull(x)) packed.widths[w++] = NaN;
          else w++;
      });
      addPackedPulses(packed);
    },
    addPackedPulses,
    digest(series: { species: string; kind: string; values: Uint8Array }[]): string {
      const h = createHash("sha256").update("linger statistics v2\n");
      h.update(replicates.digest()).update(pulses.digest()).update(widths.digest());
      return STATS_HASH_V2 + digestSeries(h, series).digest("hex");
    },
  };
}

/** The grid series into a hash: mean and SD of each species (the ODE overlay is not a statistic), sorted. */
function digestSeries(h: Hash, series: { species: string; kind: string; values: Uint8Array }[]): Hash {
  const sorted = series
    .filter((s) => s.kind !== "ode")
    .sort((a, b) =>
      a.species < b.species ? -1 : a.species > b.species ? 1 : a.kind < b.kind ? -1 : a.kind > b.kind ? 1 : 0,
    );
  for (const s of sorted) h.update(`${s.species}/${s.kind}:`).update(s.values);
  return h;
}

/** A figure read back from SQLite as null (the record types say number). */
const isNull = (x: unknown) => x === null || x === undefined;

const LITTLE_ENDIAN = new Uint8Array(new Float64Array([1]).buffer)[7] === 0x3f;

/** Doubles as little-endian bytes, -0 as 0 and every NaN as 0x7ff8000000000000 (in place: a's own copy). */
function canonicalBytes(a: Float64Array): Uint8Array {
  const bits = new Uint32Array(a.buffer, a.byteOffset, a.length * 2);
  const hi = LITTLE_ENDIAN ? 1 : 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i];
    if (x !== x) {
      bits[2 * i + hi] = 0x7ff80000;
      bits[2 * i + 1 - hi] = 0;
    } else if (x === 0) a[i] = 0;
  }
  if (LITTLE_ENDIAN) return new Uint8Array(a.buffer, a.byteOffset, a.byteLength);
  const out = new Uint8Array(a.byteLength);
  const view = new DataView(out.buffer);
  for (let i = 0; i < a.length; i++) view.setFloat64(i * 8, a[i], true);
  return out;
}

/**
 * The grid series a finalised run stores: per species (spec order) its mean,
 * its SD and, when solved, its ODE overlay, each a slice of the reduced grid.
 * The server's finalisation and the CLI build the hashed series with this.
 */
export function gridSeries(
  spec: RunSpec,
  mean: Float64Array,
  sd: Float64Array,
  ode: Float64Array | null,
): { species: string; kind: "mean" | "sd" | "ode"; values: Uint8Array }[] {
  const n = mean.length / Math.max(1, spec.circuit.species.length);
  const out: { species: string; kind: "mean" | "sd" | "ode"; values: Uint8Array }[] = [];
  const slice = (a: Float64Array, s: number) => new Uint8Array(toBlob(a.slice(s * n, (s + 1) * n)));
  spec.circuit.species.forEach((sp, s) => {
    out.push({ species: sp.name, kind: "mean", values: slice(mean, s) });
    out.push({ species: sp.name, kind: "sd", values: slice(sd, s) });
    if (ode) out.push({ species: sp.name, kind: "ode", values: slice(ode, s) });
  });
  return out;
}

const nanToNull = (x: number | null | undefined) => (x === null || x === undefined || Number.isNaN(x) ? null : x);

/** A replicate's totals as SQLite gives them back (non-finite output moments become null). */
export function replicateAsStored(r: {
  replicate: number;
  events: number;
  capped: boolean;
  outputMean: number | null;
  outputVar: number | null;
}) {
  return {
    replicate: r.replicate,
    events: r.events,
    capped: r.capped,
    outputMean: finiteOrNull(r.outputMean),
    outputVar: finiteOrNull(r.outputVar),
  };
}

/** A pulse record as readPulseStats gives it back: NaN figures become null, widths go through JSON. */
export function pulseAsStored(p: PulseStat): PulseStat {
  return {
    ...p,
    delay: nanToNull(p.delay),
    offDelay: nanToNull(p.offDelay),
    widths: p.widths.length ? (JSON.parse(JSON.stringify(p.widths)) as number[]) : [],
    peak: nanToNull(p.peak) as number,
    timeToPeak: nanToNull(p.timeToPeak) as number,
    fwhm: nanToNull(p.fwhm),
    baseline: nanToNull(p.baseline) as number,
  };
}

/**
 * The statistics hash of results still in memory (the CLI), equal to the hash
 * the server stores for the same spec and seed: values are normalised the way
 * SQLite stores them (non-finite output moments and NaN pulse figures become
 * null) and rows are put in (replicate, pulse) order before computeStatsHash.
 */
export function statsHashInMemory(
  replicates: {
    replicate: number;
    events: number;
    capped: boolean;
    outputMean: number | null;
    outputVar: number | null;
  }[],
  pulses: PulseStat[],
  series: { species: string; kind: string; values: Uint8Array }[],
): string {
  const reps = replicates.map(replicateAsStored).sort((a, b) => a.replicate - b.replicate);
  const ps = pulses.map(pulseAsStored).sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex);
  return computeStatsHash(reps, ps, series);
}

/** The hash of a run's stored statistics as they are in the database (version 2 unless asked; computeStatsHash). */
export function statsHash(db: Db, runId: string, version: 1 | 2 = 2): string {
  const series = db.select().from(schema.runSeries).where(eq(schema.runSeries.runId, runId)).all();
  return computeStatsHash(
    readReplicateRows(db, runId),
    readPulseStats(db, runId),
    series.map((s) => ({ species: s.species, kind: s.kind, values: s.values as Buffer })),
    version,
  );
}

export const canonicalReplicate = (r: {
  replicate: number;
  events: number;
  capped: boolean;
  outputMean: number | null;
  outputVar: number | null;
}) => `r ${r.replicate} ${r.events} ${r.capped ? 1 : 0} ${r.outputMean} ${r.outputVar}`;
export const canonicalPulse = (p: PulseStat) =>
  `p ${p.replicate} ${p.pulseIndex} ${p.on} ${p.off} ${p.durationBin} ${p.excluded ? 1 : 0} ${p.passed ? 1 : 0} ${p.delay} ${p.offDelay} ${JSON.stringify(p.widths)} ${p.peak} ${p.timeToPeak} ${p.fwhm} ${p.baseline}`;

/** The first difference between two runs' stored statistics, or null when identical. */
export function firstDifference(db: Db, a: string, b: string): string | null {
  const ra = readReplicateRows(db, a),
    rb = readReplicateRows(db, b);
  if (ra.length !== rb.length) return `replicate count differs: ${ra.length} vs ${rb.length}`;
  for (let i = 0; i < ra.length; i++) {
    const x = canonicalReplicate(ra[i]),
      y = canonicalReplicate(rb[i]);
    if (x !== y) return `replicate ${ra[i].replicate}: events/output differ (${x.slice(2)} vs ${y.slice(2)})`;
  }
  const pa = readPulseStats(db, a),
    pb = readPulseStats(db, b);
  if (pa.length !== pb.length) return `pulse row count differs: ${pa.length} vs ${pb.length}`;
  const fields: (keyof PulseStat)[] = [
    "on",
    "off",
    "durationBin",
    "excluded",
    "passed",
    "delay",
    "offDelay",
    "widths",
    "peak",
    "timeToPeak",
    "fwhm",
    "baseline",
  ];
  for (let i = 0; i < pa.length; i++) {
    for (const f of fields) {
      const x = JSON.stringify(pa[i][f]),
        y = JSON.stringify(pb[i][f]);
      if (x !== y) return `replicate ${pa[i].replicate}, pulse ${pa[i].pulseIndex}: ${f} is ${x} vs ${y}`;
    }
  }
  return null;
}
