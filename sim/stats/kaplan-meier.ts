/**
 * Kaplan-Meier product-limit estimate of a survival curve under right
 * censoring (Kaplan & Meier 1958, J Am Stat Assoc 53:457), with Greenwood's
 * variance (Greenwood 1926) and quantiles with confidence intervals by the
 * test-inversion method of Brookmeyer & Crowley 1982 (Biometrics 38:29) on the
 * log-transformed Greenwood band.
 *
 * Here "survival" S(t) is the probability that a pulse has not yet responded
 * by t minutes after its start; an event is a response (an up-crossing) and a
 * censored observation is a pulse whose window closed without one.
 *
 * Conventions (the common ones):
 * - at a time with both events and censorings, the censored are still at risk;
 * - the p-quantile is the first event time with S(t) <= 1 - p; when S equals
 *   1 - p exactly on a step, the midpoint to the next event time is used (so
 *   with no censoring the median equals the ordinary sample median);
 * - the quantile's confidence interval is the set of times whose pointwise
 *   band contains 1 - p: lower end where the lower band first reaches 1 - p,
 *   upper end where the upper band first drops below it; null = not reached.
 *
 * @example kaplanMeier([{ time: 1, event: true }, { time: 2, event: false }]).steps[0].survival // 0.5
 */
import { Z_95 } from "./normal-distribution";

export interface SurvivalObservation {
  /** Time of the event or of censoring (minutes). */
  time: number;
  /** true = event observed (responded); false = right-censored. */
  event: boolean;
}

export interface SurvivalStep {
  time: number;
  atRisk: number;
  events: number;
  censored: number;
  /** S(t) just after this time. */
  survival: number;
  /** Greenwood standard error of S(t). */
  standardError: number;
  /** Pointwise 95% band from the log transform: S exp(+-z se(log S)). */
  lower: number;
  upper: number;
}

export interface KaplanMeierResult {
  n: number;
  events: number;
  censored: number;
  /** One step per distinct time with an event or a censoring, ascending. */
  steps: SurvivalStep[];
}

const EXACT = 1e-12;

export function kaplanMeier(observations: readonly SurvivalObservation[], z: number = Z_95): KaplanMeierResult {
  // Event times and censoring times sorted apart as numbers (fast for runs of a million pulses), then walked
  // together: the same distinct times with the same counts as one sort of the observations.
  let nEvents = 0;
  for (const o of observations) if (o.event) nEvents++;
  const eventTimes = new Float64Array(nEvents);
  const censorTimes = new Float64Array(observations.length - nEvents);
  for (let k = 0, e = 0, c = 0; k < observations.length; k++) {
    const o = observations[k];
    if (o.event) eventTimes[e++] = o.time;
    else censorTimes[c++] = o.time;
  }
  return kaplanMeierOfTimes(eventTimes, censorTimes, z);
}

/**
 * kaplanMeier from the event times and the censoring times apart (any order; both arrays are sorted in place):
 * the same result as kaplanMeier of those observations, without an object per observation.
 */
export function kaplanMeierOfTimes(
  eventTimes: Float64Array,
  censorTimes: Float64Array,
  z: number = Z_95,
): KaplanMeierResult {
  for (const t of eventTimes) if (!Number.isFinite(t)) throw new RangeError("kaplanMeier: times must be finite");
  for (const t of censorTimes) if (!Number.isFinite(t)) throw new RangeError("kaplanMeier: times must be finite");
  const total = eventTimes.length + censorTimes.length;
  eventTimes.sort();
  censorTimes.sort();
  const steps: SurvivalStep[] = [];
  let atRisk = total;
  let s = 1;
  let greenwoodSum = 0;
  let totalEvents = 0;
  let ie = 0;
  let ic = 0;
  while (ie < eventTimes.length || ic < censorTimes.length) {
    const te = ie < eventTimes.length ? eventTimes[ie] : Infinity;
    const tc = ic < censorTimes.length ? censorTimes[ic] : Infinity;
    // -0 and 0 are one time (as ===), reported as 0
    const t = (te < tc ? te : tc) + 0;
    let events = 0;
    let censored = 0;
    while (ie < eventTimes.length && eventTimes[ie] === t) {
      events++;
      ie++;
    }
    while (ic < censorTimes.length && censorTimes[ic] === t) {
      censored++;
      ic++;
    }
    if (events > 0) {
      s *= (atRisk - events) / atRisk;
      greenwoodSum += atRisk === events ? Infinity : events / (atRisk * (atRisk - events));
    }
    totalEvents += events;
    const seLog = Math.sqrt(greenwoodSum);
    const standardError = s === 0 ? 0 : s * seLog;
    const lower = s === 0 ? 0 : s * Math.exp(-z * seLog);
    const upper = s === 0 ? 0 : Math.min(1, s * Math.exp(z * seLog));
    steps.push({ time: t, atRisk, events, censored, survival: s, standardError, lower, upper });
    atRisk -= events + censored;
  }
  return { n: total, events: totalEvents, censored: total - totalEvents, steps };
}

/** The steps with events, found once per curve (a summary asks several quantiles of a curve of 10^5 steps). */
const eventStepCache = new WeakMap<KaplanMeierResult, SurvivalStep[]>();
export function eventStepsOf(km: KaplanMeierResult): SurvivalStep[] {
  let steps = eventStepCache.get(km);
  if (!steps) eventStepCache.set(km, (steps = km.steps.filter((st) => st.events > 0)));
  return steps;
}

/** First event time at which `curve` (S, lower or upper) is <= level (midpoint rule on exact ties); null if never. */
function firstTimeAtOrBelow(
  km: KaplanMeierResult,
  pick: (s: SurvivalStep) => number,
  level: number,
  strict: boolean,
): number | null {
  const eventSteps = eventStepsOf(km);
  for (let k = 0; k < eventSteps.length; k++) {
    const v = pick(eventSteps[k]);
    if (Math.abs(v - level) <= EXACT) {
      if (strict) continue;
      const next = eventSteps[k + 1];
      return next ? (eventSteps[k].time + next.time) / 2 : eventSteps[k].time;
    }
    if (v < level) return eventSteps[k].time;
  }
  return null;
}

/** The p-quantile of the time to event (p = 0.5: median); null when S never reaches 1 - p. */
export function kmQuantile(km: KaplanMeierResult, p: number): number | null {
  return firstTimeAtOrBelow(km, (st) => st.survival, 1 - p, false);
}

/** Brookmeyer-Crowley style 95% interval of the p-quantile; either end null when not reached. */
export function kmQuantileInterval(km: KaplanMeierResult, p: number): [number | null, number | null] {
  const level = 1 - p;
  const lo = firstTimeAtOrBelow(km, (st) => st.lower, level, false);
  const hi = firstTimeAtOrBelow(km, (st) => st.upper, level, true);
  return [lo, hi];
}
