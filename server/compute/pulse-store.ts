/**
 * Where a run's per-pulse statistics live, and the only code that writes or
 * reads them. A stored chunk's pulses are one BLOB in `pulse_chunks` (written
 * in the chunk's transaction, run-store.ts): the typed-array columns a
 * simulation thread already sends (sim/engine/pulse-columns.ts), laid out
 * column by column so a reader can look at one column without building records.
 * Runs stored before that table keep their rows in `pulse_stats`; a run's pulses
 * are in one of the two, never both (a run that already has rows keeps getting
 * rows, so a run resumed across the upgrade stays whole). Every reader here gives
 * the same values, in the same order, from either.
 *
 * BLOB layout (native byte order, like the other Float64 BLOBs), n pulses in
 * (replicate, pulse) order, W output-pulse widths in all:
 *   Uint32 n, Uint32 W;
 *   Float64 columns of n: on, off, durationBin, delay, offDelay, peak, timeToPeak, fwhm, baseline
 *     (null as NaN, -0 as 0: what SQLite's REAL columns give back);
 *   Float64 widths of W (every pulse's, in pulse order);
 *   Int32 columns of n: replicate, pulseIndex, widthCount;
 *   Uint8 column of n: flags (1 excluded, 2 passed).
 * 85 bytes a pulse plus 8 a width, against about 300 for a pulse_stats row and its two indexes.
 */
import type Database from "better-sqlite3";
import { and, asc, count, desc, eq, sql } from "drizzle-orm";
import type { Db } from "@/db/client";
import { schema } from "@/db/client";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { PULSE_FIELDS, packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";

/** A local copy: an imported constant is read through a getter at every use under tsx (DEVELOPERS.md). */
const FIELDS = PULSE_FIELDS;

const F64_COLUMNS = [
  "on",
  "off",
  "durationBin",
  "delay",
  "offDelay",
  "peak",
  "timeToPeak",
  "fwhm",
  "baseline",
] as const;
type F64Column = (typeof F64_COLUMNS)[number];
/** Where each Float64 column sits in a packed record (pulse-columns.ts). */
const PACKED_AT: Record<F64Column, number> = {
  on: 2,
  off: 3,
  durationBin: 4,
  delay: 7,
  offDelay: 8,
  peak: 9,
  timeToPeak: 10,
  fwhm: 11,
  baseline: 13,
};
const EXCLUDED = 1;
const PASSED = 2;

/** One chunk's pulses as columns (views on the BLOB, or on a copy of it when it is not 8-byte aligned). */
export interface PulseChunkColumns {
  n: number;
  f64: Record<F64Column, Float64Array>;
  widths: Float64Array;
  replicate: Int32Array;
  pulseIndex: Int32Array;
  widthCount: Int32Array;
  flags: Uint8Array;
}

const blobBytes = (n: number, w: number) => 8 + 8 * (F64_COLUMNS.length * n + w) + 12 * n + n;

/** The BLOB of one chunk's pulses (records or packed columns), sorted into (replicate, pulse) order. */
export function encodePulseChunk(pulses: readonly PulseStat[] | PackedPulseStats): Buffer {
  const packed = isPacked(pulses) ? pulses : packPulseStats(pulses);
  const a = packed.numbers;
  const n = a.length / FIELDS;
  const w = packed.widths.length;
  // Where each record's widths start, and the (replicate, pulse) order (the pool sends chunks in it already).
  const wStart = new Int32Array(n + 1);
  let sorted = true;
  for (let i = 0; i < n; i++) {
    wStart[i + 1] = wStart[i] + a[i * FIELDS + 12];
    if (i > 0) {
      const dr = a[i * FIELDS] - a[(i - 1) * FIELDS];
      if (dr < 0 || (dr === 0 && a[i * FIELDS + 1] < a[(i - 1) * FIELDS + 1])) sorted = false;
    }
  }
  let order: Int32Array | null = null;
  if (!sorted) {
    const idx = Array.from({ length: n }, (_, i) => i);
    idx.sort((x, y) => a[x * FIELDS] - a[y * FIELDS] || a[x * FIELDS + 1] - a[y * FIELDS + 1]);
    order = Int32Array.from(idx);
  }
  const buf = Buffer.alloc(blobBytes(n, w));
  const cols = viewColumns(buf, n, w);
  new Uint32Array(buf.buffer, buf.byteOffset, 2).set([n, w]);
  for (const c of F64_COLUMNS) {
    const col = cols.f64[c];
    const at = PACKED_AT[c];
    for (let k = 0; k < n; k++) {
      const x = a[(order ? order[k] : k) * FIELDS + at];
      col[k] = x === 0 ? 0 : x;
    }
  }
  let wo = 0;
  for (let k = 0; k < n; k++) {
    const i = order ? order[k] : k;
    const o = i * FIELDS;
    cols.replicate[k] = int32(a[o]);
    cols.pulseIndex[k] = int32(a[o + 1]);
    const nw = int32(a[o + 12]);
    cols.widthCount[k] = nw;
    cols.flags[k] = (a[o + 5] === 1 ? EXCLUDED : 0) | (a[o + 6] === 1 ? PASSED : 0);
    for (let j = wStart[i]; j < wStart[i] + nw; j++) {
      const x = packed.widths[j];
      // as JSON gives back the widths list of a pulse_stats row: -0 as 0, non-finite as null (NaN here)
      cols.widths[wo++] = !Number.isFinite(x) ? NaN : x === 0 ? 0 : x;
    }
  }
  return buf;
}

export function decodePulseChunk(blob: Buffer | Uint8Array): PulseChunkColumns {
  let b = blob;
  if (b.byteOffset % 8 !== 0) b = new Uint8Array(blob); // typed-array views need alignment
  const [n, w] = new Uint32Array(b.buffer, b.byteOffset, 2);
  if (b.byteLength !== blobBytes(n, w))
    throw new Error(`pulse chunk of ${b.byteLength} bytes does not hold ${n} pulses`);
  return viewColumns(b, n, w);
}

function viewColumns(b: Uint8Array, n: number, w: number): PulseChunkColumns {
  let at = b.byteOffset + 8;
  const f64 = {} as Record<F64Column, Float64Array>;
  for (const c of F64_COLUMNS) {
    f64[c] = new Float64Array(b.buffer, at, n);
    at += 8 * n;
  }
  const widths = new Float64Array(b.buffer, at, w);
  at += 8 * w;
  const i32 = () => {
    const v = new Int32Array(b.buffer, at, n);
    at += 4 * n;
    return v;
  };
  const replicate = i32();
  const pulseIndex = i32();
  const widthCount = i32();
  const flags = new Uint8Array(b.buffer, at, n);
  return { n, f64, widths, replicate, pulseIndex, widthCount, flags };
}

const isPacked = (p: readonly PulseStat[] | PackedPulseStats): p is PackedPulseStats => !Array.isArray(p);
function int32(x: number): number {
  if ((x | 0) !== x) throw new Error(`pulse column value ${x} is not a 32-bit integer`);
  return x;
}
const nanNull = (x: number) => (Number.isNaN(x) ? null : x);

/** Record i of a chunk; wAt is where its widths start. Values as readPulseStats gives them from rows. */
function recordAt(c: PulseChunkColumns, i: number, wAt: number): PulseStat {
  const nw = c.widthCount[i];
  const ws: number[] = new Array(nw);
  for (let j = 0; j < nw; j++) ws[j] = nanNull(c.widths[wAt + j]) as number;
  const f = c.f64;
  return {
    replicate: c.replicate[i],
    pulseIndex: c.pulseIndex[i],
    on: f.on[i],
    off: f.off[i],
    durationBin: f.durationBin[i],
    excluded: (c.flags[i] & EXCLUDED) !== 0,
    passed: (c.flags[i] & PASSED) !== 0,
    delay: nanNull(f.delay[i]),
    offDelay: nanNull(f.offDelay[i]),
    widths: ws,
    peak: f.peak[i],
    timeToPeak: f.timeToPeak[i],
    fwhm: nanNull(f.fwhm[i]),
    baseline: f.baseline[i],
  };
}

/** Where each pulse's widths start in a chunk's widths column. */
function widthStarts(c: PulseChunkColumns): Int32Array {
  const s = new Int32Array(c.n + 1);
  for (let i = 0; i < c.n; i++) s[i + 1] = s[i] + c.widthCount[i];
  return s;
}

// ------------------------------------------------------------------ writing

/** Prepared statements for storing one chunk's pulses inside the chunk's transaction. */
export function createPulseWriter(sqlite: Database.Database, opts: { format?: "blobs" | "rows" } = {}) {
  const insBlob = sqlite.prepare(
    `INSERT INTO pulse_chunks (run_id, chunk_index, replicate_start, pulse_count, data) VALUES (?, ?, ?, ?, ?)`,
  );
  const hasRows = sqlite.prepare(`SELECT 1 FROM pulse_stats WHERE run_id = ? LIMIT 1`).pluck();
  const insPulse = sqlite.prepare(
    `INSERT INTO pulse_stats (run_id, replicate, pulse_index, "on", off, duration_bin, excluded, passed, delay, off_delay, width, widths, peak, time_to_peak, fwhm, baseline) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  /** One pulse_stats row per pulse: the format of runs stored before pulse_chunks (and of runs that began in it). */
  const writeRows = (runId: string, pulses: readonly PulseStat[] | PackedPulseStats) => {
    const a = isPacked(pulses) ? pulses.numbers : packPulseStats(pulses).numbers;
    const allWidths = isPacked(pulses) ? pulses.widths : packPulseStats(pulses).widths;
    const n = a.length / FIELDS;
    let w = 0;
    for (let i = 0; i < n; i++) {
      const o = i * FIELDS;
      const nw = a[o + 12];
      let widths: string | null = null;
      let first: number | null = null;
      if (nw > 0) {
        const ws: number[] = new Array(nw);
        for (let j = 0; j < nw; j++) ws[j] = allWidths[w + j];
        widths = JSON.stringify(ws);
        first = ws[0];
      }
      w += nw;
      insPulse.run(
        runId,
        a[o],
        a[o + 1],
        a[o + 2],
        a[o + 3],
        a[o + 4],
        a[o + 5],
        a[o + 6],
        nanNull(a[o + 7]),
        nanNull(a[o + 8]),
        first,
        widths,
        a[o + 9],
        a[o + 10],
        nanNull(a[o + 11]),
        a[o + 13],
      );
    }
  };
  /** Call inside the chunk's transaction, once per newly stored chunk. */
  return (
    runId: string,
    chunkIndex: number,
    replicateStart: number,
    pulses: readonly PulseStat[] | PackedPulseStats,
  ) => {
    if (opts.format === "rows" || hasRows.get(runId) !== undefined) return writeRows(runId, pulses);
    const data = encodePulseChunk(pulses);
    insBlob.run(runId, chunkIndex, replicateStart, new Uint32Array(data.buffer, data.byteOffset, 1)[0], data);
  };
}

// ------------------------------------------------------------------ reading

function chunkBlobs(db: Db, runId: string): Buffer[] {
  return db.$client
    .prepare(`SELECT data FROM pulse_chunks WHERE run_id = ? ORDER BY replicate_start, chunk_index`)
    .pluck()
    .all(runId) as Buffer[];
}

/** Whether a run's pulses are stored as chunk BLOBs (else as pulse_stats rows, or it has none). */
export function hasPulseChunks(db: Db, runId: string): boolean {
  return db.$client.prepare(`SELECT 1 FROM pulse_chunks WHERE run_id = ? LIMIT 1`).pluck().get(runId) !== undefined;
}

/** Every pulse record of a run in (replicate, pulse) order. Runs can hold millions. */
export function readPulseStats(db: Db, runId: string): PulseStat[] {
  const blobs = chunkBlobs(db, runId);
  if (blobs.length === 0) return readPulseRows(db, runId);
  const chunks = blobs.map(decodePulseChunk);
  const out: PulseStat[] = new Array(chunks.reduce((s, c) => s + c.n, 0));
  let k = 0;
  for (const c of chunks) {
    let w = 0;
    for (let i = 0; i < c.n; i++) {
      out[k++] = recordAt(c, i, w);
      w += c.widthCount[i];
    }
  }
  return out;
}

/**
 * Every pulse of a run as packed columns (sim/engine/pulse-columns.ts), equal to
 * packPulseStats(readPulseStats(db, runId)) but built from the chunk BLOBs without
 * a record object per pulse (a null figure as NaN, a null width as 0, as packing gives them).
 */
export function readPulseColumns(db: Db, runId: string): PackedPulseStats {
  const blobs = chunkBlobs(db, runId);
  if (blobs.length === 0) return packPulseStats(readPulseRows(db, runId));
  const chunks = blobs.map(decodePulseChunk);
  let n = 0,
    w = 0;
  for (const c of chunks) {
    n += c.n;
    w += c.widths.length;
  }
  const numbers = new Float64Array(n * FIELDS);
  const widths = new Float64Array(w);
  let k = 0,
    wo = 0;
  for (const c of chunks) {
    for (const col of F64_COLUMNS) {
      const src = c.f64[col];
      const at = PACKED_AT[col];
      for (let i = 0; i < c.n; i++) numbers[(k + i) * FIELDS + at] = src[i];
    }
    for (let i = 0; i < c.n; i++) {
      const o = (k + i) * FIELDS;
      numbers[o] = c.replicate[i];
      numbers[o + 1] = c.pulseIndex[i];
      numbers[o + 5] = (c.flags[i] & EXCLUDED) !== 0 ? 1 : 0;
      numbers[o + 6] = (c.flags[i] & PASSED) !== 0 ? 1 : 0;
      numbers[o + 12] = c.widthCount[i];
    }
    for (let j = 0; j < c.widths.length; j++) {
      const x = c.widths[j];
      widths[wo++] = Number.isNaN(x) ? 0 : x;
    }
    k += c.n;
  }
  return { numbers, widths };
}

function readPulseRows(db: Db, runId: string): PulseStat[] {
  const rows = db.$client
    .prepare(
      `SELECT replicate, pulse_index, "on", off, duration_bin, excluded, passed, delay, off_delay, widths, peak, time_to_peak, fwhm, baseline
         FROM pulse_stats WHERE run_id = ? ORDER BY replicate, pulse_index`,
    )
    .raw()
    .all(runId) as [
    number,
    number,
    number,
    number,
    number,
    number,
    number,
    number | null,
    number | null,
    string | null,
    number,
    number,
    number | null,
    number,
  ][];
  const out: PulseStat[] = new Array(rows.length);
  for (let i = 0; i < rows.length; i++) {
    const r = rows[i];
    out[i] = {
      replicate: r[0],
      pulseIndex: r[1],
      on: r[2],
      off: r[3],
      durationBin: r[4],
      excluded: r[5] === 1,
      passed: r[6] === 1,
      delay: r[7],
      offDelay: r[8],
      widths: r[9] === null ? [] : (JSON.parse(r[9]) as number[]),
      peak: r[10],
      timeToPeak: r[11],
      fwhm: r[12],
      baseline: r[13],
    };
  }
  return out;
}

/**
 * The figures trace matching needs, pulse by pulse (excluded ones included: the
 * caller leaves them out). Rows come in the order SQLite's duration index gives
 * them (duration bin, then insertion), chunk BLOBs in (replicate, pulse) order:
 * the matching reads only order-free figures of them (sorted samples, per-bin
 * counts; runFigures puts the bins in ascending order).
 */
export function forEachPulseFigure(
  db: Db,
  runId: string,
  fn: (p: { durationBin: number; excluded: boolean; passed: boolean; delay: number | null; widths: number[] }) => void,
): void {
  const blobs = chunkBlobs(db, runId);
  if (blobs.length === 0) {
    const stmt = db.$client.prepare(
      "select duration_bin as durationBin, excluded, passed, delay, widths from pulse_stats where run_id = ?",
    );
    for (const r of stmt.iterate(runId) as Iterable<{
      durationBin: number;
      excluded: number;
      passed: number;
      delay: number | null;
      widths: string | null;
    }>)
      fn({
        durationBin: r.durationBin,
        excluded: !!r.excluded,
        passed: !!r.passed,
        delay: r.delay,
        widths: r.widths ? (JSON.parse(r.widths) as number[]) : [],
      });
    return;
  }
  for (const blob of blobs) {
    const c = decodePulseChunk(blob);
    let w = 0;
    for (let i = 0; i < c.n; i++) {
      const nw = c.widthCount[i];
      const ws: number[] = new Array(nw);
      for (let j = 0; j < nw; j++) ws[j] = nanNull(c.widths[w + j]) as number;
      w += nw;
      fn({
        durationBin: c.f64.durationBin[i],
        excluded: (c.flags[i] & EXCLUDED) !== 0,
        passed: (c.flags[i] & PASSED) !== 0,
        delay: nanNull(c.f64.delay[i]),
        widths: ws,
      });
    }
  }
}

/** The input pulses (on, off) of a run's first replicate that has pulses, in pulse order. */
export function firstReplicateSchedule(db: Db, runId: string): { on: number; off: number }[] {
  const first = db.$client
    .prepare(
      `SELECT data FROM pulse_chunks WHERE run_id = ? AND pulse_count > 0 ORDER BY replicate_start, chunk_index LIMIT 1`,
    )
    .pluck()
    .get(runId) as Buffer | undefined;
  if (!first)
    return db.$client
      .prepare(
        'select "on", "off" from pulse_stats where run_id = ? and replicate = (select min(replicate) from pulse_stats where run_id = ?) order by pulse_index',
      )
      .all(runId, runId) as { on: number; off: number }[];
  const c = decodePulseChunk(first);
  const out: { on: number; off: number }[] = [];
  for (let i = 0; i < c.n && c.replicate[i] === c.replicate[0]; i++) out.push({ on: c.f64.on[i], off: c.f64.off[i] });
  return out;
}

// ------------------------------------------------------------------ the paged browse

export const PULSE_SORT_KEYS = [
  "replicate",
  "pulseIndex",
  "durationBin",
  "delay",
  "offDelay",
  "width",
  "peak",
  "timeToPeak",
  "fwhm",
] as const;
export type PulseSortKey = (typeof PULSE_SORT_KEYS)[number];

export interface PulsePageQuery {
  sort: PulseSortKey;
  dir: "asc" | "desc";
  page: number;
  pageSize: number;
  durationBin?: number;
  passed?: "yes" | "no";
}

export interface PulsePageRow {
  replicate: number;
  pulseIndex: number;
  on: number;
  off: number;
  durationBin: number;
  excluded: boolean;
  passed: boolean;
  delay: number | null;
  offDelay: number | null;
  width: number | null;
  peak: number;
  timeToPeak: number;
  fwhm: number | null;
}

/**
 * One page of a run's pulses, filtered by duration bin and pass, sorted by one
 * figure (nulls last either way, then replicate and pulse), with the filtered total.
 * Unfiltered in (replicate, pulse) order, only the chunks the page covers are read.
 */
export function readPulsePage(db: Db, runId: string, q: PulsePageQuery): { total: number; rows: PulsePageRow[] } {
  const metas = db.$client
    .prepare(
      `SELECT chunk_index AS chunkIndex, pulse_count AS pulseCount FROM pulse_chunks WHERE run_id = ? ORDER BY replicate_start, chunk_index`,
    )
    .all(runId) as { chunkIndex: number; pulseCount: number }[];
  if (metas.length === 0) return readPulseRowsPage(db, runId, q);
  const offset = (q.page - 1) * q.pageSize;
  const natural = q.sort === "replicate" && q.dir === "asc";
  if (natural && q.durationBin === undefined && q.passed === undefined) {
    const total = metas.reduce((s, m) => s + m.pulseCount, 0);
    const rows: PulsePageRow[] = [];
    const blobOf = db.$client.prepare(`SELECT data FROM pulse_chunks WHERE run_id = ? AND chunk_index = ?`).pluck();
    let start = 0;
    for (const m of metas) {
      const end = start + m.pulseCount;
      if (end > offset && rows.length < q.pageSize) {
        const c = decodePulseChunk(blobOf.get(runId, m.chunkIndex) as Buffer);
        const ws = widthStarts(c);
        for (let i = Math.max(0, offset - start); i < c.n && rows.length < q.pageSize; i++)
          rows.push(pageRow(c, i, ws));
      }
      start = end;
      if (rows.length >= q.pageSize) break;
    }
    return { total, rows };
  }
  // Filtered or sorted by a figure: look at every chunk's columns, build rows only for the page.
  const chunks = chunkBlobs(db, runId).map(decodePulseChunk);
  const hitChunk: number[] = [];
  const hitIndex: number[] = [];
  chunks.forEach((c, ci) => {
    const bins = c.f64.durationBin;
    for (let i = 0; i < c.n; i++) {
      if (q.durationBin !== undefined && bins[i] !== q.durationBin) continue;
      const f = c.flags[i];
      if (q.passed === "yes" && (f & PASSED) === 0) continue;
      if (q.passed === "no" && (f & (PASSED | EXCLUDED)) !== 0) continue;
      hitChunk.push(ci);
      hitIndex.push(i);
    }
  });
  const starts = chunks.map(widthStarts);
  let order = hitChunk.map((_, k) => k);
  if (!natural) {
    const keys = new Float64Array(order.length); // NaN for null
    for (let k = 0; k < order.length; k++) {
      const c = chunks[hitChunk[k]],
        i = hitIndex[k];
      keys[k] =
        q.sort === "replicate"
          ? c.replicate[i]
          : q.sort === "pulseIndex"
            ? c.pulseIndex[i]
            : q.sort === "width"
              ? c.widthCount[i] > 0
                ? c.widths[starts[hitChunk[k]][i]]
                : NaN
              : c.f64[q.sort][i];
    }
    const sign = q.dir === "asc" ? 1 : -1;
    // Nulls last either way, then the hits' own (replicate, pulse) order: a total order, so the page is the
    // one SQLite's ORDER BY gave.
    const cmp = (x: number, y: number) => {
      const a = keys[x],
        b = keys[y];
      if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) ? (Number.isNaN(b) ? x - y : 1) : -1;
      return a === b ? x - y : a < b ? -sign : sign;
    };
    order = firstInOrder(order, offset + q.pageSize, cmp);
  }
  const rows = order
    .slice(offset, offset + q.pageSize)
    .map((k) => pageRow(chunks[hitChunk[k]], hitIndex[k], starts[hitChunk[k]]));
  return { total: hitChunk.length, rows };
}

/**
 * The first k of xs in cmp's order (a total order), sorted: a bounded max-heap when
 * k is small against xs (the first pages of a sorted browse), else a full sort.
 */
export function firstInOrder(xs: number[], k: number, cmp: (a: number, b: number) => number): number[] {
  if (k * 8 >= xs.length) return xs.sort(cmp).slice(0, k);
  const heap: number[] = [];
  const down = (i: number) => {
    for (;;) {
      const l = 2 * i + 1,
        r = l + 1;
      let m = i;
      if (l < heap.length && cmp(heap[l], heap[m]) > 0) m = l;
      if (r < heap.length && cmp(heap[r], heap[m]) > 0) m = r;
      if (m === i) return;
      [heap[i], heap[m]] = [heap[m], heap[i]];
      i = m;
    }
  };
  for (const x of xs) {
    if (heap.length < k) {
      heap.push(x);
      for (let i = heap.length - 1; i > 0;) {
        const p = (i - 1) >> 1;
        if (cmp(heap[i], heap[p]) <= 0) break;
        [heap[i], heap[p]] = [heap[p], heap[i]];
        i = p;
      }
    } else if (k > 0 && cmp(x, heap[0]) < 0) {
      heap[0] = x;
      down(0);
    }
  }
  return heap.sort(cmp);
}

function pageRow(c: PulseChunkColumns, i: number, ws: Int32Array): PulsePageRow {
  const f = c.f64;
  return {
    replicate: c.replicate[i],
    pulseIndex: c.pulseIndex[i],
    on: f.on[i],
    off: f.off[i],
    durationBin: f.durationBin[i],
    excluded: (c.flags[i] & EXCLUDED) !== 0,
    passed: (c.flags[i] & PASSED) !== 0,
    delay: nanNull(f.delay[i]),
    offDelay: nanNull(f.offDelay[i]),
    width: c.widthCount[i] > 0 ? nanNull(c.widths[ws[i]]) : null,
    peak: f.peak[i],
    timeToPeak: f.timeToPeak[i],
    fwhm: nanNull(f.fwhm[i]),
  };
}

const ROW_SORT = {
  replicate: schema.pulseStats.replicate,
  pulseIndex: schema.pulseStats.pulseIndex,
  durationBin: schema.pulseStats.durationBin,
  delay: schema.pulseStats.delay,
  offDelay: schema.pulseStats.offDelay,
  width: schema.pulseStats.width,
  peak: schema.pulseStats.peak,
  timeToPeak: schema.pulseStats.timeToPeak,
  fwhm: schema.pulseStats.fwhm,
} as const;

function readPulseRowsPage(db: Db, runId: string, q: PulsePageQuery): { total: number; rows: PulsePageRow[] } {
  const conds = [eq(schema.pulseStats.runId, runId)];
  if (q.durationBin !== undefined) conds.push(eq(schema.pulseStats.durationBin, q.durationBin));
  if (q.passed === "yes") conds.push(eq(schema.pulseStats.passed, true));
  if (q.passed === "no") conds.push(eq(schema.pulseStats.passed, false), eq(schema.pulseStats.excluded, false));
  const where = and(...conds);
  const total = db.select({ n: count() }).from(schema.pulseStats).where(where).get()!.n;
  const col = ROW_SORT[q.sort];
  const rows = db
    .select()
    .from(schema.pulseStats)
    .where(where)
    // nulls (censored) last either way, then a stable tie-break
    .orderBy(
      sql`${col} IS NULL`,
      q.dir === "asc" ? asc(col) : desc(col),
      asc(schema.pulseStats.replicate),
      asc(schema.pulseStats.pulseIndex),
    )
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize)
    .all();
  return {
    total,
    rows: rows.map((r) => ({
      replicate: r.replicate,
      pulseIndex: r.pulseIndex,
      on: r.on,
      off: r.off,
      durationBin: r.durationBin,
      excluded: r.excluded,
      passed: r.passed,
      delay: r.delay,
      offDelay: r.offDelay,
      width: r.width,
      peak: r.peak,
      timeToPeak: r.timeToPeak,
      fwhm: r.fwhm,
    })),
  };
}
