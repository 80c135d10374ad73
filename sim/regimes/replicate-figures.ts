/**
 * A compact per-replicate summary of a run (docs/regimes.md, "Design to a
 * target"): for each replicate, the pulses counted and passed per duration and
 * the median delay of its long pulses. With cell-to-cell (extrinsic) variation
 * each replicate carries its own parameter draw, so these are the figures one
 * cell would show; the fraction of cells meeting a target is estimated from
 * them (./design-target.ts, fractionMeeting).
 *
 * Stored for at most MAX_REPLICATE_FIGURES replicates (the first ones), so a
 * 400-point sweep at the sweep limit (1,000 replicates a point) keeps every
 * replicate. A replicate's long-pulse median is the plain median with an
 * unanswered pulse counted as longer than any answered one (censoring only at
 * the end of a pulse's window); null when half or more went unanswered.
 *
 * Example: replicateFigures(pulses, { longMinutes: 30 }).passed[0] // passes of replicate 0 per duration
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import { durationNormalizer } from "@/sim/analysis/normalize-duration";
import { F as FIELDS, PULSE_FIELDS as FIELD_COUNT, pulseTable, type PulseTable } from "@/sim/analysis/pulse-table";
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { meetsTarget, type DesignTarget, type TargetResult } from "./design-target";

// Local copies: under tsx (the server) an imported binding is read through a getter at every use, a
// measurable cost in loops over a million records.
const F = { ...FIELDS };
const PULSE_FIELDS = FIELD_COUNT;

export const MAX_REPLICATE_FIGURES = API_LIMITS.maxReplicateFiguresPerPoint;

export interface ReplicateFigures {
  /** Duration classes (min), ascending. */
  durations: number[];
  /** Pulses at least this long count as long (the run's delay-cost rule); null without pulses. */
  longMinutes: number | null;
  /** Replicate numbers kept, ascending. */
  replicates: number[];
  /** [replicate][duration]: pulses counted (not excluded) and passed. */
  counted: number[][];
  passed: number[][];
  /** Median delay of each replicate's long pulses; null when not reached or no long pulse. */
  longDelay: (number | null)[];
}

export function replicateFigures(
  records: readonly PulseStat[] | PulseTable,
  opts: { longMinutes: number | null; maxReplicates?: number },
): ReplicateFigures {
  const cap = opts.maxReplicates ?? MAX_REPLICATE_FIGURES;
  // records as columns (a table as it is), read in record order
  const t = pulseTable(records);
  const at = (i: number, field: number) => t.numbers[i * PULSE_FIELDS + field];
  // a run has few distinct durations and many pulses: each duration is normalised once
  const normalizeDuration = durationNormalizer();
  const durationSet = new Set<number>();
  const repSet = new Set<number>();
  // records come in runs of one replicate and one duration: a value like the record before's is in already
  let lastBin = NaN;
  let lastRep = NaN;
  for (let i = 0; i < t.length; i++) {
    const bin = at(i, F.durationBin);
    if (i === 0 || !Object.is(bin, lastBin)) durationSet.add(normalizeDuration((lastBin = bin)));
    const rep = at(i, F.replicate);
    if (i === 0 || !Object.is(rep, lastRep)) repSet.add((lastRep = rep));
  }
  const durations = [...durationSet].sort((a, b) => a - b);
  const col = new Map(durations.map((d, i) => [d, i]));
  const reps = [...repSet].sort((a, b) => a - b).slice(0, cap);
  const row = new Map(reps.map((r, i) => [r, i]));
  const counted = reps.map(() => durations.map(() => 0));
  const passed = reps.map(() => durations.map(() => 0));
  const delays: number[][] = reps.map(() => []);
  // the last record's replicate row and duration column reused (a Map lookup per record was most of the loop)
  let nextRep = NaN;
  let nextRow: number | undefined;
  let nextBin = NaN;
  let nextCol = -1;
  let nextDuration = NaN;
  for (let k = 0; k < t.length; k++) {
    const rep = at(k, F.replicate);
    if (k === 0 || !Object.is(rep, nextRep)) nextRow = row.get((nextRep = rep));
    const i = nextRow;
    if (i === undefined || at(k, F.excluded) === 1) continue;
    const bin = at(k, F.durationBin);
    if (nextCol < 0 || !Object.is(bin, nextBin))
      nextCol = col.get((nextDuration = normalizeDuration((nextBin = bin))))!;
    const d = nextDuration;
    const j = nextCol;
    counted[i][j]++;
    if (at(k, F.passed) === 1) passed[i][j]++;
    const delay = at(k, F.delay);
    if (opts.longMinutes !== null && d >= opts.longMinutes) delays[i].push(Number.isNaN(delay) ? Infinity : delay);
  }
  const longDelay = delays.map((ds) => {
    if (!ds.length) return null;
    const s = ds.sort((a, b) => a - b);
    const n = s.length;
    const m = n % 2 ? s[(n - 1) / 2] : (s[n / 2 - 1] + s[n / 2]) / 2;
    return Number.isFinite(m) ? m : null;
  });
  return { durations, longMinutes: opts.longMinutes, replicates: reps, counted, passed, longDelay };
}

/** Each kept replicate judged against the target alone (its own pulses, its own long-pulse median). */
export function replicateVerdicts(f: ReplicateFigures, target: DesignTarget): TargetResult[] {
  return f.replicates.map((_, i) =>
    meetsTarget(target, {
      byDuration: f.durations.map((duration, j) => ({ duration, pulses: f.counted[i][j], passed: f.passed[i][j] })),
      delayCostMinutes: f.longDelay[i],
    }),
  );
}
