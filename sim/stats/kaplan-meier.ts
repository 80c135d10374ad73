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
  /** One step per distinct time with an event or a censoring, ascending (objects made when first read). */
  readonly steps: SurvivalStep[];
  /** The same steps as columns, without an object per distinct time (a run of a million pulses has ~10^6). */
  readonly columns: SurvivalColumns;
}

/** The steps of a curve as columns: step k is time[k], atRisk[k], ... (length: the number of steps). */
export interface SurvivalColumns {
  length: number;
  time: Float64Array;
  atRisk: Int32Array;
  events: Int32Array;
  censored: Int32Array;
  survival: Float64Array;
  standardError: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** The indices of the steps with events, ascending. */
  eventSteps: Int32Array;
}

class Curve implements KaplanMeierResult {
  private stepObjects: SurvivalStep[] | undefined;
  constructor(
    readonly n: number,
    readonly events: number,
    readonly censored: number,
    readonly columns: SurvivalColumns,
  ) {}
  get steps(): SurvivalStep[] {
    if (!this.stepObjects) {
      const c = this.columns;
      this.stepObjects = Array.from({ length: c.length }, (_, k) => ({
        time: c.time[k],
        atRisk: c.atRisk[k],
        events: c.events[k],
        censored: c.censored[k],
        survival: c.survival[k],
        standardError: c.standardError[k],
        lower: c.lower[k],
        upper: c.upper[k],
      }));
    }
    return this.stepObjects;
  }
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
  finiteTimes(eventTimes);
  finiteTimes(censorTimes);
  return walk(eventTimes.sort(), censorTimes.sort(), z);
}

function finiteTimes(times: Float64Array): Float64Array {
  for (let i = 0; i < times.length; i++)
    if (!Number.isFinite(times[i])) throw new RangeError("kaplanMeier: times must be finite");
  return times;
}

/**
 * kaplanMeierOfTimes of times already ascending in Float64Array sort order (-0 before +0; sim/stats/merge-sorted.ts
 * keeps it), without sorting them again: a run's summary merges the per-duration samples Kaplan-Meier sorted.
 */
export function kaplanMeierOfSortedTimes(
  eventTimes: Float64Array,
  censorTimes: Float64Array,
  z: number = Z_95,
): KaplanMeierResult {
  ascendingTimes(finiteTimes(eventTimes));
  ascendingTimes(finiteTimes(censorTimes));
  return walk(eventTimes, censorTimes, z);
}

function ascendingTimes(times: Float64Array): void {
  for (let i = 1; i < times.length; i++)
    if (!(times[i - 1] <= times[i])) throw new RangeError("kaplanMeierOfSortedTimes: times must be ascending");
}

/** The product-limit walk over event and censoring times, each ascending. */
function walk(eventTimes: Float64Array, censorTimes: Float64Array, z: number): KaplanMeierResult {
  const total = eventTimes.length + censorTimes.length;
  // at most one step per observation; the columns are cut to the steps there are
  const time = new Float64Array(total);
  const atRiskAt = new Int32Array(total);
  const eventsAt = new Int32Array(total);
  const censoredAt = new Int32Array(total);
  const survival = new Float64Array(total);
  const standardErrorAt = new Float64Array(total);
  const lowerAt = new Float64Array(total);
  const upperAt = new Float64Array(total);
  const eventSteps = new Int32Array(total);
  let nSteps = 0;
  let nEventSteps = 0;
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
      eventSteps[nEventSteps++] = nSteps;
    }
    totalEvents += events;
    const seLog = Math.sqrt(greenwoodSum);
    time[nSteps] = t;
    atRiskAt[nSteps] = atRisk;
    eventsAt[nSteps] = events;
    censoredAt[nSteps] = censored;
    survival[nSteps] = s;
    standardErrorAt[nSteps] = s === 0 ? 0 : s * seLog;
    lowerAt[nSteps] = s === 0 ? 0 : s * Math.exp(-z * seLog);
    upperAt[nSteps] = s === 0 ? 0 : Math.min(1, s * Math.exp(z * seLog));
    nSteps++;
    atRisk -= events + censored;
  }
  const columns: SurvivalColumns = {
    length: nSteps,
    time: time.subarray(0, nSteps),
    atRisk: atRiskAt.subarray(0, nSteps),
    events: eventsAt.subarray(0, nSteps),
    censored: censoredAt.subarray(0, nSteps),
    survival: survival.subarray(0, nSteps),
    standardError: standardErrorAt.subarray(0, nSteps),
    lower: lowerAt.subarray(0, nSteps),
    upper: upperAt.subarray(0, nSteps),
    eventSteps: eventSteps.subarray(0, nEventSteps),
  };
  return new Curve(total, totalEvents, total - totalEvents, columns);
}

/** First event time at which `curve` (S, lower or upper) is <= level (midpoint rule on exact ties); null if never. */
function firstTimeAtOrBelow(km: KaplanMeierResult, curve: Float64Array, level: number, strict: boolean): number | null {
  const { eventSteps, time } = km.columns;
  for (let k = 0; k < eventSteps.length; k++) {
    const v = curve[eventSteps[k]];
    if (Math.abs(v - level) <= EXACT) {
      if (strict) continue;
      return k + 1 < eventSteps.length ? (time[eventSteps[k]] + time[eventSteps[k + 1]]) / 2 : time[eventSteps[k]];
    }
    if (v < level) return time[eventSteps[k]];
  }
  return null;
}

/** The p-quantile of the time to event (p = 0.5: median); null when S never reaches 1 - p. */
export function kmQuantile(km: KaplanMeierResult, p: number): number | null {
  return firstTimeAtOrBelow(km, km.columns.survival, 1 - p, false);
}

/** Brookmeyer-Crowley style 95% interval of the p-quantile; either end null when not reached. */
export function kmQuantileInterval(km: KaplanMeierResult, p: number): [number | null, number | null] {
  const level = 1 - p;
  const lo = firstTimeAtOrBelow(km, km.columns.lower, level, false);
  const hi = firstTimeAtOrBelow(km, km.columns.upper, level, true);
  return [lo, hi];
}
