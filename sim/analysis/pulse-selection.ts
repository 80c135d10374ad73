/**
 * Which pulse records enter which figure (docs/metrics.md, "Edge rules"):
 * excluded pulses (output already above threshold at on) never enter pass,
 * delay, width or pulse-generation figures; they are only counted.
 *
 * Also the censoring time of a pulse's response delay: its response window
 * closes at min(off + window, next pulse's on, end of the path), so a pulse
 * with no response is right-censored at that time minus on.
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import { F as FIELDS, PULSE_FIELDS as FIELD_COUNT, type PulseTable } from "./pulse-table";

// Local copies: under tsx (the server) an imported binding is read through a getter at every use, a
// measurable cost in loops over a million records.
const F = { ...FIELDS };
const PULSE_FIELDS = FIELD_COUNT;

export function evaluablePulses(pulses: readonly PulseStat[]): PulseStat[] {
  return pulses.filter((p) => !p.excluded);
}

/** Response delays of the evaluable pulses, null = censored (no response in the window). */
export function delaysOf(pulses: readonly PulseStat[]): (number | null)[] {
  return evaluablePulses(pulses).map((p) => p.delay);
}

/** Output pulse widths starting in the windows of the evaluable pulses. */
export function widthsOf(pulses: readonly PulseStat[]): number[] {
  const out: number[] = [];
  for (const p of evaluablePulses(pulses)) for (const w of p.widths) out.push(w);
  return out;
}

/**
 * For each pulse record, when its response window closes (absolute minutes):
 * min(off + windowMinutes, on of the same replicate's next pulse, endTimeMinutes).
 * The next pulse is taken from the records (pulseIndex + 1); when its record is
 * missing (its window never opened) the path ended first, which endTimeMinutes covers.
 */
export function windowEnds(
  pulses: readonly PulseStat[],
  windowMinutes: number,
  endTimeMinutes: number = Infinity,
): number[] {
  const byReplicate = new Map<number, Map<number, number>>();
  for (const p of pulses) {
    let m = byReplicate.get(p.replicate);
    if (!m) byReplicate.set(p.replicate, (m = new Map()));
    m.set(p.pulseIndex, p.on);
  }
  return pulses.map((p) => {
    const next = byReplicate.get(p.replicate)!.get(p.pulseIndex + 1);
    return Math.min(p.off + windowMinutes, next ?? Infinity, endTimeMinutes);
  });
}

/**
 * windowEnds of records held as columns (./pulse-table.ts), the same numbers. Records in (replicate,
 * pulseIndex) order, as runs keep them, find their next pulse as the record after them (no map per
 * replicate); any other order is looked up as windowEnds does.
 */
export function windowEndsOfTable(
  t: PulseTable,
  windowMinutes: number,
  endTimeMinutes: number = Infinity,
  /** Records [from, to) only, whole replicates (a run's summary fed a chunk at a time); out[k] is record from + k's. */
  from = 0,
  to: number = t.length,
): Float64Array {
  const a = t.numbers;
  const rep = (i: number) => a[i * PULSE_FIELDS + F.replicate];
  const idx = (i: number) => a[i * PULSE_FIELDS + F.pulseIndex];
  const on = (i: number) => a[i * PULSE_FIELDS + F.on];
  let ordered = true;
  for (let i = from; i < to && ordered; i++) {
    if (!Number.isInteger(idx(i))) ordered = false;
    else if (i > from && !(rep(i - 1) < rep(i) || (rep(i - 1) === rep(i) && idx(i - 1) < idx(i)))) ordered = false;
  }
  const out = new Float64Array(to - from);
  if (ordered) {
    for (let i = from; i < to; i++) {
      const next = i + 1 < to && rep(i + 1) === rep(i) && idx(i + 1) === idx(i) + 1 ? on(i + 1) : Infinity;
      out[i - from] = Math.min(a[i * PULSE_FIELDS + F.off] + windowMinutes, next, endTimeMinutes);
    }
    return out;
  }
  const byReplicate = new Map<number, Map<number, number>>();
  for (let i = from; i < to; i++) {
    let m = byReplicate.get(rep(i));
    if (!m) byReplicate.set(rep(i), (m = new Map()));
    m.set(idx(i), on(i));
  }
  for (let i = from; i < to; i++) {
    const next = byReplicate.get(rep(i))!.get(idx(i) + 1);
    out[i - from] = Math.min(a[i * PULSE_FIELDS + F.off] + windowMinutes, next ?? Infinity, endTimeMinutes);
  }
  return out;
}
