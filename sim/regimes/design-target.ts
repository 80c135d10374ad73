/**
 * Design to a target (docs/regimes.md): does a sweep point meet the limits a
 * designer states, and by what margin (positive: inside the limit, in the
 * limit's own unit)? With cell-to-cell variation each replicate carries its
 * own extrinsic draw, so the fraction of cells meeting the target is estimated
 * from the replicates' own pass/fail with a Wilson 95% interval (Wilson 1927,
 * J Am Stat Assoc 22:209), from at least MIN_REPLICATES_FOR_FRACTION replicates.
 *
 * Example: meetsTarget({ falsePass: { maxRate: 0.01, belowMinutes: 5 } },
 *   { byDuration: [{ duration: 2, pulses: 200, passed: 1 }] }).meets // true (rate 0.005)
 */
import { wilson } from "@/sim/stats/wilson-interval";

export interface DesignTarget {
  /** False-pass rate at most maxRate for pulses shorter than belowMinutes. */
  falsePass?: { maxRate: number; belowMinutes: number };
  /** Pass probability at least minProbability at atMinutes (a tested duration). */
  pass?: { minProbability: number; atMinutes: number };
  /** Delay paid for long pulses at most maxMinutes. */
  delayCost?: { maxMinutes: number };
  /** Sustained oscillation with a period within [minMinutes, maxMinutes]. */
  oscillation?: { minMinutes: number; maxMinutes: number };
}

export interface PointFigures {
  byDuration?: { duration: number; pulses: number; passed: number }[];
  delayCostMinutes?: number | null;
  label?: string | null;
  periodMinutes?: number | null;
}

export interface LimitResult {
  limit: keyof DesignTarget;
  meets: boolean;
  /** Distance inside the limit (negative: outside), in the limit's unit; null when not measurable. */
  margin: number | null;
  reason?: string;
}

export interface TargetResult {
  meets: boolean;
  limits: LimitResult[];
}

export const MIN_REPLICATES_FOR_FRACTION = 20;

export function meetsTarget(target: DesignTarget, f: PointFigures): TargetResult {
  const limits: LimitResult[] = [];
  const rows = f.byDuration ?? [];
  if (target.falsePass) {
    const short = rows.filter((r) => r.duration < target.falsePass!.belowMinutes);
    const pulses = short.reduce((a, r) => a + r.pulses, 0);
    const passed = short.reduce((a, r) => a + r.passed, 0);
    if (pulses === 0)
      limits.push({ limit: "falsePass", meets: false, margin: null, reason: "no pulses shorter than the limit" });
    else {
      const margin = target.falsePass.maxRate - passed / pulses;
      limits.push({ limit: "falsePass", meets: margin >= 0, margin });
    }
  }
  if (target.pass) {
    const row = rows.find((r) => Math.abs(r.duration - target.pass!.atMinutes) < 1e-9);
    if (!row || row.pulses === 0)
      limits.push({ limit: "pass", meets: false, margin: null, reason: `no pulses of ${target.pass.atMinutes} min` });
    else {
      const margin = row.passed / row.pulses - target.pass.minProbability;
      limits.push({ limit: "pass", meets: margin >= 0, margin });
    }
  }
  if (target.delayCost) {
    const d = f.delayCostMinutes;
    if (d === null || d === undefined)
      limits.push({ limit: "delayCost", meets: false, margin: null, reason: "no delay cost measured" });
    else
      limits.push({
        limit: "delayCost",
        meets: target.delayCost.maxMinutes - d >= 0,
        margin: target.delayCost.maxMinutes - d,
      });
  }
  if (target.oscillation) {
    const p = f.periodMinutes;
    if (f.label !== "sustained oscillation" || p === null || p === undefined)
      limits.push({ limit: "oscillation", meets: false, margin: null, reason: "not a sustained oscillation" });
    else {
      const margin = Math.min(p - target.oscillation.minMinutes, target.oscillation.maxMinutes - p);
      limits.push({ limit: "oscillation", meets: margin >= 0, margin });
    }
  }
  return { meets: limits.length > 0 && limits.every((l) => l.meets), limits };
}

/** Fraction of cells (replicates) meeting the target, with its Wilson 95% interval; null below the minimum count. */
export function fractionMeeting(
  perReplicate: boolean[],
): { fraction: number; low: number; high: number; replicates: number } | null {
  const n = perReplicate.length;
  if (n < MIN_REPLICATES_FOR_FRACTION) return null;
  const k = perReplicate.filter(Boolean).length;
  const [low, high] = wilson(k, n);
  return { fraction: k / n, low, high, replicates: n };
}
