/**
 * Per-pulse records as columns of numbers, so a chunk's pulses cross from a worker
 * thread as two transferred buffers instead of thousands of cloned objects (for
 * 5,000 records, cloning cost about five times packing, moving and unpacking them
 * on the same loaded machine; `npm run bench` measures the whole pipeline). The round trip is
 * exact: numbers are copied as doubles, booleans as 0/1, null as NaN (no pulse figure
 * is ever NaN), and each record's output-pulse widths follow in a flat array.
 *
 * @example unpackPulseStats(packPulseStats(pulses)) // deep-equal to pulses
 */
import type { PulseStat } from "@/shared/schemas/run-spec";

export interface PackedPulseStats {
  /** PULSE_FIELDS numbers per record, record-major. */
  numbers: Float64Array;
  /** Every record's widths, in record order (record i has numbers[i * PULSE_FIELDS + 12] of them). */
  widths: Float64Array;
}

export const PULSE_FIELDS = 14;

const nullable = (x: number | null) => (x === null ? NaN : x);
const orNull = (x: number) => (Number.isNaN(x) ? null : x);

export function packPulseStats(pulses: readonly PulseStat[]): PackedPulseStats {
  const numbers = new Float64Array(pulses.length * PULSE_FIELDS);
  let nWidths = 0;
  for (const p of pulses) nWidths += p.widths.length;
  const widths = new Float64Array(nWidths);
  let w = 0;
  for (let i = 0; i < pulses.length; i++) {
    const p = pulses[i];
    const o = i * PULSE_FIELDS;
    numbers[o] = p.replicate;
    numbers[o + 1] = p.pulseIndex;
    numbers[o + 2] = p.on;
    numbers[o + 3] = p.off;
    numbers[o + 4] = p.durationBin;
    numbers[o + 5] = p.excluded ? 1 : 0;
    numbers[o + 6] = p.passed ? 1 : 0;
    numbers[o + 7] = nullable(p.delay);
    numbers[o + 8] = nullable(p.offDelay);
    numbers[o + 9] = p.peak;
    numbers[o + 10] = p.timeToPeak;
    numbers[o + 11] = nullable(p.fwhm);
    numbers[o + 12] = p.widths.length;
    numbers[o + 13] = p.baseline;
    for (const x of p.widths) widths[w++] = x;
  }
  return { numbers, widths };
}

export function unpackPulseStats(packed: PackedPulseStats): PulseStat[] {
  const { numbers: a, widths } = packed;
  const n = a.length / PULSE_FIELDS;
  const out: PulseStat[] = new Array(n);
  let w = 0;
  for (let i = 0; i < n; i++) {
    const o = i * PULSE_FIELDS;
    const nw = a[o + 12];
    const ws: number[] = new Array(nw);
    for (let j = 0; j < nw; j++) ws[j] = widths[w++];
    out[i] = {
      replicate: a[o],
      pulseIndex: a[o + 1],
      on: a[o + 2],
      off: a[o + 3],
      durationBin: a[o + 4],
      excluded: a[o + 5] === 1,
      passed: a[o + 6] === 1,
      delay: orNull(a[o + 7]),
      offDelay: orNull(a[o + 8]),
      widths: ws,
      peak: a[o + 9],
      timeToPeak: a[o + 10],
      fwhm: orNull(a[o + 11]),
      baseline: a[o + 13],
    };
  }
  return out;
}
