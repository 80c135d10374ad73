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
import { API_LIMITS } from "@/shared/schemas/api-runs";
import { meetsTarget, type DesignTarget, type TargetResult } from "./design-target";

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
  pulses: readonly PulseStat[],
  opts: { longMinutes: number | null; maxReplicates?: number },
): ReplicateFigures {
  const cap = opts.maxReplicates ?? MAX_REPLICATE_FIGURES;
  // a run has few distinct durations and many pulses: each duration is normalised once
  const normalizeDuration = durationNormalizer();
  const durations = [...new Set(pulses.map((p) => normalizeDuration(p.durationBin)))].sort((a, b) => a - b);
  const col = new Map(durations.map((d, i) => [d, i]));
  const reps = [...new Set(pulses.map((p) => p.replicate))].sort((a, b) => a - b).slice(0, cap);
  const row = new Map(reps.map((r, i) => [r, i]));
  const counted = reps.map(() => durations.map(() => 0));
  const passed = reps.map(() => durations.map(() => 0));
  const delays: number[][] = reps.map(() => []);
  for (const p of pulses) {
    const i = row.get(p.replicate);
    if (i === undefined || p.excluded) continue;
    const d = normalizeDuration(p.durationBin);
    const j = col.get(d)!;
    counted[i][j]++;
    if (p.passed) passed[i][j]++;
    if (opts.longMinutes !== null && d >= opts.longMinutes) delays[i].push(p.delay ?? Infinity);
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
