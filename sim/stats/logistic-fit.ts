/**
 * Binomial logistic regression of pass against log duration, by maximum
 * likelihood (Newton-Raphson / iteratively reweighted least squares with step
 * halving; McCullagh & Nelder 1989, Generalized Linear Models, ch. 4):
 *
 *   logit P(pass | d) = intercept + slope * ln(d / 1 min)
 *
 * d50 = exp(-intercept / slope) is the duration passed half the time; its 95%
 * interval comes from the delta method on ln d50 with the inverse Fisher
 * information (common practice). The slope is also given as dP/dd at d50
 * = slope / (4 d50), in probability per minute.
 *
 * d50 is null, with a plain-words note, when the maximum-likelihood estimate
 * does not exist or would be an extrapolation:
 * - fewer than two distinct durations, or every / no pulse passed;
 * - the observed pass fractions do not straddle 50%;
 * - complete separation (every failure shorter than every pass) or
 *   quasi-complete separation (mixed outcomes at one duration only): the
 *   slope is unbounded (Albert & Anderson 1984, Biometrika 71:1);
 * - the fitted d50 falls outside the measured durations.
 *
 * @example fitLogisticPass([{ duration: 1, trials: 10, passed: 1 }, { duration: 10, trials: 10, passed: 9 }]).d50
 */
import { Z_95 } from "./normal-distribution";

export interface PassCount {
  /** Input pulse duration in minutes (> 0). */
  duration: number;
  trials: number;
  passed: number;
}

export interface LogisticPassFit {
  d50: number | null;
  d50Ci: [number, number] | null;
  d50Note: string | null;
  /** Coefficients on ln(duration in minutes); null when no fit was made. */
  intercept: number | null;
  slopePerLogMinute: number | null;
  /** dP/dd at d50, per minute. */
  slopeAtD50PerMinute: number | null;
  converged: boolean;
  iterations: number;
  /** Fitted pass probability at each input duration (ascending); empty when no fit. */
  fitted: { duration: number; passProbability: number }[];
}

const MAX_ITER = 100;

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : String(Number(x.toPrecision(4)));
}

function empty(note: string, iterations = 0): LogisticPassFit {
  return {
    d50: null,
    d50Ci: null,
    d50Note: note,
    intercept: null,
    slopePerLogMinute: null,
    slopeAtD50PerMinute: null,
    converged: false,
    iterations,
    fitted: [],
  };
}

export function fitLogisticPass(counts: readonly PassCount[], z: number = Z_95): LogisticPassFit {
  const groups = counts
    .filter((c) => c.trials > 0)
    .slice()
    .sort((a, b) => a.duration - b.duration);
  for (const g of groups) {
    if (!(g.duration > 0)) throw new RangeError("fitLogisticPass: durations must be positive");
  }
  if (groups.length < 2) return empty("d50 needs at least two distinct pulse durations with evaluable pulses.");
  const totalTrials = groups.reduce((s, g) => s + g.trials, 0);
  const totalPassed = groups.reduce((s, g) => s + g.passed, 0);
  if (totalPassed === 0) return empty("No pulse passed at any duration: d50 lies above the longest duration measured.");
  if (totalPassed === totalTrials)
    return empty("Every pulse passed at every duration: d50 lies below the shortest duration measured.");
  const fractions = groups.map((g) => g.passed / g.trials);
  const minP = Math.min(...fractions);
  const maxP = Math.max(...fractions);
  if (!(minP <= 0.5 && maxP >= 0.5)) {
    return empty(
      maxP < 0.5
        ? `Pass fractions stay below 50% (at most ${fmt(maxP * 100)}%): d50 lies above the longest duration measured.`
        : `Pass fractions stay above 50% (at least ${fmt(minP * 100)}%): d50 lies below the shortest duration measured.`,
    );
  }
  const withFail = groups.filter((g) => g.passed < g.trials);
  const withPass = groups.filter((g) => g.passed > 0);
  const longestFail = withFail[withFail.length - 1].duration;
  const shortestPass = withPass[0].duration;
  if (longestFail < shortestPass) {
    return empty(
      `Outcomes separate completely: every pulse of ${fmt(longestFail)} min or shorter failed and every pulse of ${fmt(shortestPass)} min or longer passed, so d50 lies between them and the logistic fit has no finite slope.`,
    );
  }
  if (longestFail === shortestPass) {
    const g = groups.find((x) => x.duration === longestFail)!;
    return empty(
      `Outcomes separate completely except at ${fmt(longestFail)} min (${g.passed} of ${g.trials} passed): d50 is near ${fmt(longestFail)} min but the logistic fit has no finite slope.`,
    );
  }

  const xs = groups.map((g) => Math.log(g.duration));
  const logLik = (b0: number, b1: number) => {
    let ll = 0;
    groups.forEach((g, i) => {
      const eta = b0 + b1 * xs[i];
      // log sigmoid computed stably
      const logP = -Math.log1p(Math.exp(-eta));
      const log1mP = -Math.log1p(Math.exp(eta));
      ll += g.passed * logP + (g.trials - g.passed) * log1mP;
    });
    return ll;
  };
  const p0 = totalPassed / totalTrials;
  let b0 = Math.log(p0 / (1 - p0));
  let b1 = 0;
  let ll = logLik(b0, b1);
  let converged = false;
  let iterations = 0;
  let info = [0, 0, 0]; // [I00, I01, I11]
  for (iterations = 1; iterations <= MAX_ITER; iterations++) {
    let g0 = 0,
      g1 = 0,
      i00 = 0,
      i01 = 0,
      i11 = 0;
    groups.forEach((g, i) => {
      const p = 1 / (1 + Math.exp(-(b0 + b1 * xs[i])));
      const r = g.passed - g.trials * p;
      const w = g.trials * p * (1 - p);
      g0 += r;
      g1 += r * xs[i];
      i00 += w;
      i01 += w * xs[i];
      i11 += w * xs[i] * xs[i];
    });
    info = [i00, i01, i11];
    const det = i00 * i11 - i01 * i01;
    if (!(det > 0)) break;
    const d0 = (i11 * g0 - i01 * g1) / det;
    const d1 = (-i01 * g0 + i00 * g1) / det;
    let step = 1;
    let nb0 = b0 + d0,
      nb1 = b1 + d1,
      nll = logLik(nb0, nb1);
    while (nll < ll - 1e-12 && step > 1e-6) {
      step /= 2;
      nb0 = b0 + step * d0;
      nb1 = b1 + step * d1;
      nll = logLik(nb0, nb1);
    }
    const change = Math.abs(nb0 - b0) + Math.abs(nb1 - b1);
    b0 = nb0;
    b1 = nb1;
    ll = nll;
    if (change < 1e-10 * (1 + Math.abs(b0) + Math.abs(b1))) {
      converged = true;
      break;
    }
  }
  // information at the final estimate, for the interval
  {
    let i00 = 0,
      i01 = 0,
      i11 = 0;
    groups.forEach((g, i) => {
      const p = 1 / (1 + Math.exp(-(b0 + b1 * xs[i])));
      const w = g.trials * p * (1 - p);
      i00 += w;
      i01 += w * xs[i];
      i11 += w * xs[i] * xs[i];
    });
    info = [i00, i01, i11];
  }
  const fitted = groups.map((g, i) => ({
    duration: g.duration,
    passProbability: 1 / (1 + Math.exp(-(b0 + b1 * xs[i]))),
  }));
  const base = { intercept: b0, slopePerLogMinute: b1, converged, iterations, fitted };
  if (!converged || !(Math.abs(b1) > 1e-12)) {
    return {
      ...base,
      d50: null,
      d50Ci: null,
      d50Note: "The logistic fit did not converge to a finite slope.",
      slopeAtD50PerMinute: null,
    };
  }
  const logD50 = -b0 / b1;
  const d50 = Math.exp(logD50);
  const lo = groups[0].duration;
  const hi = groups[groups.length - 1].duration;
  if (d50 < lo || d50 > hi) {
    return {
      ...base,
      d50: null,
      d50Ci: null,
      slopeAtD50PerMinute: null,
      d50Note: `The fitted d50 (${fmt(d50)} min) lies outside the measured durations (${fmt(lo)} to ${fmt(hi)} min).`,
    };
  }
  const [i00, i01, i11] = info;
  const det = i00 * i11 - i01 * i01;
  // covariance = inverse information
  const c00 = i11 / det,
    c01 = -i01 / det,
    c11 = i00 / det;
  const g0 = -1 / b1,
    g1 = b0 / (b1 * b1);
  const varLog = g0 * g0 * c00 + 2 * g0 * g1 * c01 + g1 * g1 * c11;
  const se = Math.sqrt(Math.max(0, varLog));
  const d50Ci: [number, number] = [Math.exp(logD50 - z * se), Math.exp(logD50 + z * se)];
  const note = b1 < 0 ? "Pass probability falls with pulse duration at these parameters (negative slope)." : null;
  return { ...base, d50, d50Ci, d50Note: note, slopeAtD50PerMinute: b1 / (4 * d50) };
}
