/**
 * A run's per-pulse records held as columns of numbers instead of one object per
 * record: the packed layout of sim/engine/pulse-columns.ts (PULSE_FIELDS doubles
 * per record, record-major; null as NaN, booleans as 0/1) with every record's
 * widths in one flat array and where each record's widths start. A
 * 100,000-replicate run has over a million records; as objects (with their widths
 * arrays and the summary's per-record observations) they were most of the
 * finalising thread's memory, as columns they are 120 bytes a record (with where its
 * widths start) plus 8 a width.
 * The summary (./summarize-run.ts) and the per-replicate figures read either form
 * with the same floating-point operations in the same record order, so both give
 * the same bytes (tests/sim/analysis/pulse-table.test.ts).
 *
 * @example pulseTable(records).length === records.length
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import { PULSE_FIELDS, packPulseStats, type PackedPulseStats } from "@/sim/engine/pulse-columns";

export interface PulseTable {
  readonly kind: "pulse-table";
  /** Records. */
  readonly length: number;
  /** PULSE_FIELDS numbers per record (pulse-columns.ts layout). */
  readonly numbers: Float64Array;
  readonly widths: Float64Array;
  /** Record i's widths are widths[widthStart[i] .. widthStart[i + 1]). */
  readonly widthStart: Float64Array;
}

/** Field offsets within a record (pulse-columns.ts). */
export const F = {
  replicate: 0,
  pulseIndex: 1,
  on: 2,
  off: 3,
  durationBin: 4,
  excluded: 5,
  passed: 6,
  delay: 7,
  offDelay: 8,
  peak: 9,
  timeToPeak: 10,
  fwhm: 11,
  widthCount: 12,
  baseline: 13,
} as const;

export { PULSE_FIELDS };

export const isPulseTable = (x: readonly PulseStat[] | PulseTable): x is PulseTable =>
  !Array.isArray(x) && (x as PulseTable).kind === "pulse-table";

/** Records as a table (a copy). */
export function pulseTable(records: readonly PulseStat[] | PulseTable): PulseTable {
  if (isPulseTable(records)) return records;
  const b = createPulseTableBuilder();
  b.append(packPulseStats(records as readonly PulseStat[]));
  return b.table();
}

/**
 * A table grown a chunk at a time. append copies the packed records, so the
 * chunk's own buffers can go.
 */
export function createPulseTableBuilder() {
  let numbers: Float64Array = new Float64Array(0);
  let widths: Float64Array = new Float64Array(0);
  let widthStart: Float64Array = new Float64Array(1);
  let n = 0;
  let nw = 0;
  const grow = (a: Float64Array, need: number): Float64Array => {
    if (need <= a.length) return a;
    const b = new Float64Array(Math.max(need, Math.ceil(a.length * 1.5), 1024));
    b.set(a);
    return b;
  };
  return {
    append(packed: PackedPulseStats) {
      const a = packed.numbers;
      const m = a.length / PULSE_FIELDS;
      numbers = grow(numbers, (n + m) * PULSE_FIELDS);
      widths = grow(widths, nw + packed.widths.length);
      widthStart = grow(widthStart, n + m + 1);
      numbers.set(a, n * PULSE_FIELDS);
      widths.set(packed.widths, nw);
      for (let i = 0; i < m; i++) {
        nw += a[i * PULSE_FIELDS + F.widthCount];
        widthStart[++n] = nw;
      }
    },
    get length() {
      return n;
    },
    table(): PulseTable {
      return {
        kind: "pulse-table",
        length: n,
        numbers: numbers.subarray(0, n * PULSE_FIELDS),
        widths: widths.subarray(0, nw),
        widthStart: widthStart.subarray(0, n + 1),
      };
    },
  };
}
