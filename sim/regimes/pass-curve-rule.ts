/**
 * Filter or follower from a pass curve (docs/regimes.md): per tested pulse
 * duration, the number of pulses that passed out of those counted, with a
 * Wilson 95% interval (given, or computed here; Wilson 1927, J Am Stat Assoc
 * 22:209).
 *   persistence filter: some duration with upper bound <= 0.2 ("rarely") and a
 *     longer one with lower bound >= 0.8 ("almost always");
 *   follower: lower bound >= 0.8 at every tested duration, with at least two
 *     durations tested.
 * Otherwise null (the curve says neither).
 */
import { wilson } from "@/sim/stats/wilson-interval";
import { isPassCurvePending, type PassCurvePending, type RegimeVerdict } from "./labels";

export interface PassCurvePoint {
  durationMinutes: number;
  passed: number;
  counted: number;
  /** Wilson 95% interval; computed from passed/counted when absent. */
  low?: number;
  high?: number;
}

export const RARELY_UPPER = 0.2;
export const ALMOST_ALWAYS_LOWER = 0.8;

export function passCurveVerdict(points: PassCurvePoint[]): RegimeVerdict | null {
  const pts = points
    .filter((p) => p.counted > 0)
    .map((p) => {
      const [lo, hi] = p.low !== undefined && p.high !== undefined ? [p.low, p.high] : wilson(p.passed, p.counted);
      return { d: p.durationMinutes, lo, hi, f: p.passed / p.counted };
    })
    .sort((a, b) => a.d - b.d);
  if (pts.length < 2) return null;
  const evidence = {
    durationsMinutes: pts.map((p) => p.d),
    passFractions: pts.map((p) => p.f),
    passLow: pts.map((p) => p.lo),
    passHigh: pts.map((p) => p.hi),
  };
  for (let i = 0; i < pts.length; i++) {
    if (pts[i].hi > RARELY_UPPER) continue;
    const j = pts.findIndex((q, k) => k > i && q.lo >= ALMOST_ALWAYS_LOWER);
    if (j >= 0)
      return {
        label: "persistence filter",
        evidence: { ...evidence, blockedDurationMinutes: pts[i].d, passedDurationMinutes: pts[j].d },
      };
  }
  if (pts.every((p) => p.lo >= ALMOST_ALWAYS_LOWER)) return { label: "follower", evidence };
  return null;
}

/** The last two rules of a classification (pass curve, then steady) on a verdict left pending for them. */
export function settlePassCurve(
  v: RegimeVerdict | PassCurvePending,
  passCurve: PassCurvePoint[] | undefined,
): RegimeVerdict {
  if (!isPassCurvePending(v)) return v;
  if (passCurve) {
    const pc = passCurveVerdict(passCurve);
    if (pc) return { label: pc.label, evidence: { ...v.passCurveBase, ...pc.evidence } };
  }
  return v.steady;
}
