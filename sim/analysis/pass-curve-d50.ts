/**
 * d50 (the input pulse duration passed half the time) read from the observed
 * pass curve without assuming its shape (docs/metrics.md, "d50").
 *
 * 1. Monotone estimate: the isotonic regression of the pass fractions on
 *    duration weighted by pulse counts (pool-adjacent-violators; Ayer et al.
 *    1955, Ann Math Stat 26:641), the binomial maximum-likelihood estimate under
 *    the sole assumption that passing does not get rarer with longer pulses.
 * 2. Monotonicity check: likelihood-ratio deviance of the isotonic fit against
 *    the raw fractions, referred to chi-square on k-1 df (conservative: the
 *    order-restricted null distribution is a chi-bar-square mixture of
 *    chi-square(0..k-1); Robertson, Wright & Dykstra 1988, Order Restricted
 *    Statistical Inference, ch. 2). p < 0.05 -> "plateau: not monotone".
 * 3. Point estimate: linear interpolation on ln(duration) between the last tried
 *    duration whose monotone estimate is below 50% and the next one.
 * 4. 95% interval: Wilson 95% bands per duration made monotone (an upper bound
 *    at d is the least upper band at d or longer; a lower bound the greatest
 *    lower band at d or shorter). low = the longest tried duration whose bound
 *    says "surely below 50%", high = the shortest whose bound says "surely above
 *    50%". Both are tried durations: between them the data say nothing.
 *
 * Refusals, in words, never a number: not bracketed (below the shortest or
 * above the longest tried duration, or not clearly past 50% on one side),
 * not estimable (the durations straddling 50% are more than GAP_RATIO apart),
 * plateau (not monotone beyond sampling error, or no duration clearly below
 * and none clearly above 50%).
 *
 * This is the pass-curve verdict other analyses should read (e.g. a behaviour
 * classifier): `passCurveD50(counts).kind`.
 *
 * @example passCurveD50([{ duration: 1, trials: 50, passed: 2 }, { duration: 2, trials: 50, passed: 30 }, { duration: 4, trials: 50, passed: 49 }])
 */
import type { PassCurveD50 } from "@/shared/schemas/analysis";
import { chiSquareUpperTail } from "@/sim/stats/chi-square";
import { isotonicRegression } from "@/sim/stats/isotonic-regression";
import type { PassCount } from "@/sim/stats/logistic-fit";
import { wilson } from "@/sim/stats/wilson-interval";
import { formatNumber, formatPValue, formatProbability } from "@/shared/number-format";

/** Tried durations straddling 50% further apart than this ratio give no number (half a decade, about 3.16x). */
export const GAP_RATIO = Math.sqrt(10);

export const PASS_CURVE_D50_METHOD =
  "isotonic regression (pool-adjacent-violators) interpolated on log duration; 95% interval from the Wilson bands made monotone, ends at tried durations";

// Figures in the reasons are written by the app's one number format (docs/metrics.md, "How numbers are written").
const fmt = (x: number): string => formatNumber(x);
const pct = (x: number): string => formatProbability(x);

function xlogy(k: number, ratio: number): number {
  return k === 0 ? 0 : k * Math.log(ratio);
}

export function passCurveD50(counts: readonly PassCount[]): PassCurveD50 {
  const g = counts
    .filter((c) => c.trials > 0)
    .slice()
    .sort((a, b) => a.duration - b.duration);
  for (const c of g) if (!(c.duration > 0)) throw new RangeError("passCurveD50: durations must be positive");
  if (g.length === 0)
    return { kind: "plateau", reason: "No evaluable pulses: there is no pass curve to read d50 from." };
  const k = g.length;
  const d = g.map((c) => c.duration);
  const raw = g.map((c) => c.passed / c.trials);
  const f = isotonicRegression(
    raw,
    g.map((c) => c.trials),
  );
  const shortest = d[0];
  const longest = d[k - 1];

  // monotonicity beyond sampling error
  if (k >= 2) {
    let dev = 0;
    g.forEach((c, i) => {
      dev += 2 * (xlogy(c.passed, raw[i] / f[i]) + xlogy(c.trials - c.passed, (1 - raw[i]) / (1 - f[i])));
    });
    const p = chiSquareUpperTail(dev, k - 1);
    if (p < 0.05) {
      return {
        kind: "plateau",
        reason: `The pass curve falls with longer pulses beyond sampling error (likelihood-ratio test against a monotone curve, ${formatPValue(p)}; observed ${raw.map(pct).join(", ")}): no single d50 describes it.`,
      };
    }
  }
  if (f[k - 1] < 0.5) {
    return {
      kind: "not-bracketed",
      side: "above-longest",
      bound: longest,
      reason: `Never reaches 50%: at most ${pct(Math.max(...raw))} passed; d50 lies above the longest tried duration, ${fmt(longest)} min.`,
    };
  }
  if (f[0] >= 0.5) {
    return {
      kind: "not-bracketed",
      side: "below-shortest",
      bound: shortest,
      reason: `Already ${pct(raw[0])} passed at the shortest tried duration, ${fmt(shortest)} min: d50 lies at or below it.`,
    };
  }

  const bands = g.map((c) => wilson(c.passed, c.trials));
  const upper = bands.map((b) => b[1]);
  const lower = bands.map((b) => b[0]);
  for (let i = k - 2; i >= 0; i--) upper[i] = Math.min(upper[i], upper[i + 1]);
  for (let i = 1; i < k; i++) lower[i] = Math.max(lower[i], lower[i - 1]);
  let lowIdx = -1;
  for (let i = 0; i < k; i++) if (upper[i] < 0.5) lowIdx = i;
  let highIdx = -1;
  for (let i = k - 1; i >= 0; i--) if (lower[i] > 0.5) highIdx = i;
  if (lowIdx < 0 && highIdx < 0) {
    return {
      kind: "plateau",
      reason: `No tried duration passes clearly below or clearly above 50% (Wilson 95% bands; observed ${raw.map(pct).join(", ")}): the pass curve stays near 50% within sampling error.`,
    };
  }
  if (highIdx < 0) {
    return {
      kind: "not-bracketed",
      side: "above-longest",
      bound: longest,
      reason: `No tried duration passes clearly above 50% (Wilson 95% band; ${pct(raw[k - 1])} at ${fmt(longest)} min): d50 may lie above the longest tried duration.`,
    };
  }
  if (lowIdx < 0) {
    return {
      kind: "not-bracketed",
      side: "below-shortest",
      bound: shortest,
      reason: `No tried duration passes clearly below 50% (Wilson 95% band; ${pct(raw[0])} at ${fmt(shortest)} min): d50 may lie below the shortest tried duration.`,
    };
  }

  let j = 0;
  while (f[j + 1] < 0.5) j++;
  const a = d[j];
  const b = d[j + 1];
  if (b / a > GAP_RATIO) {
    return {
      kind: "not-estimable",
      between: [a, b],
      reason: `Not estimable: no durations between ${fmt(a)} and ${fmt(b)} min, where the pass curve crosses 50% (${pct(raw[j])} at ${fmt(a)} min, ${pct(raw[j + 1])} at ${fmt(b)} min).`,
    };
  }
  const t = (0.5 - f[j]) / (f[j + 1] - f[j]);
  const d50 = Math.exp(Math.log(a) + t * (Math.log(b) - Math.log(a)));
  return {
    kind: "estimate",
    d50,
    low: Math.min(d[lowIdx], d50),
    high: Math.max(d[highIdx], d50),
    method: PASS_CURVE_D50_METHOD,
  };
}
