/**
 * Distribution of a delay under right censoring (docs/metrics.md): Kaplan-Meier
 * median with its Brookmeyer-Crowley 95% interval and quantiles, a plain
 * description and histogram of the observed delays, and the thinned
 * survival curve.
 */
import type { DelaySummary } from "@/shared/schemas/analysis";
import { describeSorted } from "@/sim/stats/describe";
import { histogram } from "@/sim/stats/histogram";
import {
  kaplanMeierOfSortedTimes,
  kaplanMeierOfTimes,
  kmQuantile,
  kmQuantileInterval,
  type KaplanMeierResult,
  type SurvivalObservation,
} from "@/sim/stats/kaplan-meier";

/** Smallest drop in survival between two kept points of the reported curve. */
const CURVE_STEP = 0.005;

export function summarizeDelays(observations: readonly SurvivalObservation[]): DelaySummary {
  const observed = observations.filter((o) => o.event).map((o) => o.time);
  const censored = observations.filter((o) => !o.event).map((o) => o.time);
  return summarizeDelayTimes(observed, censored);
}

/**
 * summarizeDelays from the observed (event) times, in observation order, and the censoring times apart:
 * the same summary without an object per observation.
 */
export function summarizeDelayTimes(observed: readonly number[], censored: readonly number[]): DelaySummary {
  return summarizeDelayTimesInPlace(Float64Array.from(observed), Float64Array.from(censored));
}

/** summarizeDelayTimes of times in Float64Arrays that may be reordered (both are sorted in place, not copied). */
export function summarizeDelayTimesInPlace(observed: Float64Array, censored: Float64Array): DelaySummary {
  return summarizeCurve(kaplanMeierOfTimes(observed, censored), observed);
}

/** summarizeDelayTimes of times already ascending (Float64Array sort order), without sorting them again. */
export function summarizeSortedDelayTimes(observed: Float64Array, censored: Float64Array): DelaySummary {
  return summarizeCurve(kaplanMeierOfSortedTimes(observed, censored), observed);
}

/** The summary of a curve and its observed times (ascending: Kaplan-Meier sorted them, and checked them finite). */
function summarizeCurve(km: KaplanMeierResult, observed: Float64Array): DelaySummary {
  const survival: DelaySummary["survival"] = [];
  const c = km.columns;
  const eventSteps = c.eventSteps;
  let lastKept = 1;
  for (let i = 0; i < eventSteps.length; i++) {
    const k = eventSteps[i];
    if (lastKept - c.survival[k] >= CURVE_STEP || i === eventSteps.length - 1 || i === 0) {
      survival.push({
        time: c.time[k],
        survival: c.survival[k],
        lower: c.lower[k],
        upper: c.upper[k],
        atRisk: c.atRisk[k],
      });
      lastKept = c.survival[k];
    }
  }
  return {
    evaluable: km.n,
    responded: km.events,
    censored: km.censored,
    median: kmQuantile(km, 0.5),
    medianCi: kmQuantileInterval(km, 0.5),
    medianStatus: medianStatus(km),
    quantiles: {
      q10: kmQuantile(km, 0.1),
      q25: kmQuantile(km, 0.25),
      q50: kmQuantile(km, 0.5),
      q75: kmQuantile(km, 0.75),
      q90: kmQuantile(km, 0.9),
    },
    observed: describeSorted(observed),
    histogram: histogram(observed),
    survival,
  };
}

/** "estimate" when the Kaplan-Meier curve falls to one half, "not-reached" when it stays above, "no-pulses" with no observations. */
export function medianStatus(km: KaplanMeierResult): DelaySummary["medianStatus"] {
  if (km.n === 0) return "no-pulses";
  return kmQuantile(km, 0.5) === null ? "not-reached" : "estimate";
}
