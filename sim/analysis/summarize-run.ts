/**
 * The noise-filter figures of one run (docs/metrics.md): filter curve by input
 * pulse duration with Wilson 95% intervals, d50 from the monotone pass curve
 * (pass-curve-d50.ts; the logistic fit only as a smooth with its goodness of fit), false-pass
 * rate, delay distribution under censoring (Kaplan-Meier), delay cost for long
 * pulses, output pulse widths, pulse-generation figures and output noise.
 *
 * Input: the per-pulse records of docs/metrics.md (for simulations detected
 * online on the exact event path by sim/metrics/pulse-tracker.ts; for uploaded
 * traces from the same tracker on the sampled trace), as objects or as columns
 * (./pulse-table.ts), and per-replicate totals.
 * Deterministic: the same input in the same order gives the same output.
 *
 * @example summarizeRun({ pulses, replicates, threshold, noiseDurationMinutes: 10 }).byDuration
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import type {
  ByDurationEntry,
  DelayCoverage,
  RunSettingsBlock,
  RunSummary,
  ThresholdUsed,
} from "@/shared/schemas/analysis";
import { describe, describeInPlace, describeSorted, mean, medianInPlace } from "@/sim/stats/describe";
import { mergeSorted } from "@/sim/stats/merge-sorted";
import { histogram } from "@/sim/stats/histogram";
import { kaplanMeierOfSortedTimes, kaplanMeierOfTimes, kmQuantile, kmQuantileInterval } from "@/sim/stats/kaplan-meier";
import { fitLogisticPass } from "@/sim/stats/logistic-fit";
import { logisticGoodnessOfFit } from "@/sim/stats/logistic-goodness-of-fit";
import { wilson } from "@/sim/stats/wilson-interval";
import { medianStatus, summarizeSortedDelayTimes } from "./delay-summary";
import { passCurveD50 } from "./pass-curve-d50";
import { windowEndsOfTable } from "./pulse-selection";
import { F as FIELDS, PULSE_FIELDS as FIELD_COUNT, pulseTable, type PulseTable } from "./pulse-table";
import { durationNormalizer } from "./normalize-duration";

// Local copies: under tsx (the server) an imported binding is read through a getter at every use, a
// measurable cost in loops over a million records.
const F = { ...FIELDS };
const PULSE_FIELDS = FIELD_COUNT;

export interface ReplicateTotals {
  replicate: number;
  /** Reaction firings in this replicate. */
  events: number;
  /** Stopped at the event cap. */
  capped: boolean;
  /** Time-averaged output at steady state (see the engine docs), molecules; NaN when unknown. */
  outputMean: number;
  /** Time-averaged variance of the output about outputMean; NaN when unknown. */
  outputVar: number;
}

export interface SummarizeRunInput {
  /** The per-pulse records, as objects or as columns (./pulse-table.ts): the same summary either way. */
  pulses: readonly PulseStat[] | PulseTable;
  replicates: readonly ReplicateTotals[];
  threshold: {
    theta: number;
    downTheta: number;
    hysteresis: number;
    windowMinutes: number;
    outputLifetimeMinutes?: number | null;
  };
  /** Pulses shorter than this count as noise for the false-pass rate (minutes). */
  noiseDurationMinutes: number;
  /** Pulses at least this long count as long for the delay cost; default 3 x noiseDurationMinutes. */
  longPulseMinutes?: number;
  /** End of the simulated (or recorded) path; windows close there at the latest. */
  endTimeMinutes?: number;
  /** Measured traces have no steady-state output moments per cell: leave the noise figures empty without a remark. */
  measuredTraces?: boolean;
  /** The run's settings block (sim/analysis/run-settings.ts); its warnings are repeated in notes. */
  settings?: RunSettingsBlock;
}

/** A duration class responds "in most replicates" when its pass probability is above this. */
export const MOST_REPLICATES = 0.5;

const finite = (x: number | null | undefined): number | null =>
  x !== null && x !== undefined && Number.isFinite(x) ? x : null;

export function summarizeRun(input: SummarizeRunInput): RunSummary {
  const { replicates, noiseDurationMinutes } = input;
  // Records as columns (a table is read as it is): no object per record below, so a run of a million
  // pulses needs a few arrays of numbers. Every figure takes its values in record order, as from objects.
  const t = pulseTable(input.pulses);
  const a = t.numbers;
  const nPulses = t.length;
  const at = (i: number, field: number) => a[i * PULSE_FIELDS + field];
  const nullable = (x: number): number | null => (Number.isNaN(x) ? null : x);
  const th = input.threshold;
  const threshold: ThresholdUsed = {
    theta: th.theta,
    downTheta: th.downTheta,
    hysteresis: th.hysteresis,
    windowMinutes: th.windowMinutes,
    outputLifetimeMinutes: finite(th.outputLifetimeMinutes),
  };
  const normalizeDuration = durationNormalizer();
  let lastBin = NaN;
  let lastDuration = NaN;
  const ends = windowEndsOfTable(t, th.windowMinutes, input.endTimeMinutes ?? Infinity);
  const notes: string[] = [];

  // ---- per pulse: survival observations for the response delay and the OFF delay
  // rows: the evaluable records' indices; delayTime/delayEvent and offTime/offKind (0 none, 1 event, 2 censored)
  const delayTime = new Float64Array(nPulses);
  const delayEvent = new Uint8Array(nPulses);
  const offTime = new Float64Array(nPulses);
  const offKind = new Uint8Array(nPulses);
  const duration = new Float64Array(nPulses);
  const rowList: number[] = [];
  let excludedTotal = 0;
  for (let i = 0; i < nPulses; i++) {
    // records come in runs of one duration: the last one's normalised value is reused (=== as the cache's key)
    const bin = at(i, F.durationBin);
    if (bin !== lastBin) {
      lastBin = bin;
      lastDuration = normalizeDuration(bin);
    }
    duration[i] = lastDuration;
    if (at(i, F.excluded) === 1) {
      excludedTotal++;
      continue;
    }
    const delay = nullable(at(i, F.delay));
    if (delay !== null) {
      delayTime[i] = delay;
      delayEvent[i] = 1;
    } else delayTime[i] = Math.max(0, ends[i] - at(i, F.on));
    if (at(i, F.passed) === 1) {
      const offDelay = nullable(at(i, F.offDelay));
      if (offDelay !== null) {
        offTime[i] = offDelay;
        offKind[i] = 1;
      } else {
        offTime[i] = Math.max(0, ends[i] - at(i, F.off));
        offKind[i] = 2;
      }
    }
    rowList.push(i);
  }
  const rows = Int32Array.from(rowList);
  rowList.length = 0;
  const passedAt = (i: number) => at(i, F.passed) === 1;
  // Samples are gathered into Float64Arrays in record order and sorted in place by the figure that needs
  // them sorted (describeInPlace, medianInPlace, Kaplan-Meier): one sort per sample, no copies.
  const ws = t.widths;
  const wStart = t.widthStart;
  const widthsOf = (idx: ArrayLike<number>): Float64Array => {
    let n = 0;
    for (let k = 0; k < idx.length; k++) n += wStart[idx[k] + 1] - wStart[idx[k]];
    const out = new Float64Array(n);
    let w = 0;
    for (let k = 0; k < idx.length; k++) {
      const i = idx[k];
      for (let j = wStart[i]; j < wStart[i + 1]; j++) out[w++] = ws[j];
    }
    return out;
  };
  const column = (idx: ArrayLike<number>, field: number): Float64Array => {
    const out = new Float64Array(idx.length);
    for (let k = 0; k < idx.length; k++) out[k] = a[idx[k] * PULSE_FIELDS + field];
    return out;
  };
  /** The delays of the records idx, observed and censored apart, each in record order. */
  const delayTimes = (idx: ArrayLike<number>): [Float64Array, Float64Array] => {
    let nObserved = 0;
    for (let k = 0; k < idx.length; k++) nObserved += delayEvent[idx[k]];
    const observed = new Float64Array(nObserved);
    const censored = new Float64Array(idx.length - nObserved);
    for (let k = 0, o = 0, c = 0; k < idx.length; k++) {
      const i = idx[k];
      if (delayEvent[i] === 1) observed[o++] = delayTime[i];
      else censored[c++] = delayTime[i];
    }
    return [observed, censored];
  };

  // ---- by duration
  const groups = new Map<number, { rows: number[]; excluded: number }>();
  // the last duration's group reused (a Map lookup per record was a measurable part of a large run's summary)
  let lastKey = NaN;
  let lastGroup: { rows: number[]; excluded: number } | undefined;
  const groupOf = (d: number) => {
    if (d !== lastKey || lastGroup === undefined) {
      lastGroup = groups.get(d);
      if (lastGroup === undefined) return undefined;
      lastKey = d;
    }
    return lastGroup;
  };
  for (let i = 0; i < nPulses; i++) {
    const d = duration[i];
    let g = groupOf(d);
    if (!g) groups.set(d, (g = { rows: [], excluded: 0 }));
    if (at(i, F.excluded) === 1) g.excluded++;
  }
  for (const i of rows) groupOf(duration[i])!.rows.push(i);
  const durations = [...groups.keys()].sort((x, y) => x - y);
  // each duration's samples, sorted for its medians and its Kaplan-Meier curve, merged below into the whole
  // run's and the pooled ones (every evaluable record is in one duration), instead of sorting every value again
  const groupWidths: Float64Array[] = [];
  const groupPeaks: Float64Array[] = [];
  const groupObserved: Float64Array[] = [];
  const groupCensored: Float64Array[] = [];
  const groupOffObserved: Float64Array[] = [];
  const byDuration: ByDurationEntry[] = durations.map((d) => {
    const g = groups.get(d)!;
    const n = g.rows.length;
    let passed = 0;
    const offDelayBuf = new Float64Array(n);
    let nOff = 0;
    for (const i of g.rows) {
      if (!passedAt(i)) continue;
      passed++;
      const offDelay = nullable(at(i, F.offDelay));
      if (offDelay !== null) offDelayBuf[nOff++] = offDelay;
    }
    const [observed, censored] = delayTimes(g.rows);
    const km = kaplanMeierOfTimes(observed, censored);
    const widthSample = widthsOf(g.rows);
    const peakSample = column(g.rows, F.peak);
    const offSample = offDelayBuf.subarray(0, nOff);
    groupWidths.push(widthSample);
    groupPeaks.push(peakSample);
    groupObserved.push(observed);
    groupCensored.push(censored);
    groupOffObserved.push(offSample);
    return {
      duration: d,
      pulses: n,
      passed,
      passProbability: n > 0 ? passed / n : null,
      ci: n > 0 ? wilson(passed, n) : null,
      medianDelay: n > 0 ? kmQuantile(km, 0.5) : null,
      medianDelayCi: n > 0 ? kmQuantileInterval(km, 0.5) : [null, null],
      medianDelayStatus: medianStatus(km),
      censored: km.censored,
      excluded: g.excluded,
      medianWidth: medianInPlace(widthSample),
      medianPeak: medianInPlace(peakSample),
      medianOffDelay: medianInPlace(offSample),
    };
  });
  groups.clear();

  // ---- d50 from the monotone pass curve; the logistic fit is an optional smooth with its goodness of fit
  const passCounts = byDuration
    .filter((e) => e.duration > 0)
    .map((e) => ({ duration: e.duration, trials: e.pulses, passed: e.passed }));
  const d50Verdict = passCurveD50(passCounts);
  const fit = fitLogisticPass(passCounts);
  const goodnessOfFit = logisticGoodnessOfFit(passCounts, fit.fitted);
  if (goodnessOfFit?.poorFit) {
    notes.push(
      `The logistic smooth does not fit the pass curve (Pearson chi-square ${fmt(goodnessOfFit.chiSquare)} on ${goodnessOfFit.df} df, p ${goodnessOfFit.pValue < 0.001 ? "< 0.001" : `= ${fmt(goodnessOfFit.pValue)}`}); do not read d50 from it.`,
    );
  }

  // ---- false-pass rate
  const noise = byDuration.filter((e) => e.duration < noiseDurationMinutes && e.pulses > 0);
  const noisePulses = noise.reduce((s, e) => s + e.pulses, 0);
  const noisePassed = noise.reduce((s, e) => s + e.passed, 0);
  const falsePass =
    noisePulses > 0
      ? {
          noiseDurationMinutes,
          durations: noise.map((e) => e.duration),
          pulses: noisePulses,
          passed: noisePassed,
          rate: noisePassed / noisePulses,
          ci: wilson(noisePassed, noisePulses),
        }
      : null;

  // ---- delay cost for long pulses
  const withPulses = byDuration.filter((e) => e.pulses > 0);
  let longMin = input.longPulseMinutes ?? 3 * noiseDurationMinutes;
  if (withPulses.length > 0 && !withPulses.some((e) => e.duration >= longMin)) {
    longMin = withPulses[withPulses.length - 1].duration;
    notes.push(
      `No pulse was at least ${fmt(input.longPulseMinutes ?? 3 * noiseDurationMinutes)} min long; the delay cost uses the longest duration, ${fmt(longMin)} min.`,
    );
  }
  // the long durations' sorted delays merged; their mean summed in record order as mean() sums
  let longPulses = 0;
  let longResponded = 0;
  let longDelaySum = 0;
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k];
    if (!(duration[i] >= longMin)) continue;
    longPulses++;
    if (delayEvent[i] === 1) {
      longResponded++;
      longDelaySum += delayTime[i];
    }
  }
  let delayCost: RunSummary["delayCost"] = null;
  if (longPulses > 0) {
    const long = (parts: Float64Array[]) => mergeSorted(parts.filter((_, g) => durations[g] >= longMin));
    const meanObservedDelay = longResponded ? longDelaySum / longResponded : null;
    const km = kaplanMeierOfSortedTimes(long(groupObserved), long(groupCensored));
    delayCost = {
      minDurationMinutes: longMin,
      durations: withPulses.filter((e) => e.duration >= longMin).map((e) => e.duration),
      pulses: longPulses,
      responded: longResponded,
      medianDelay: kmQuantile(km, 0.5),
      medianDelayCi: kmQuantileInterval(km, 0.5),
      medianDelayStatus: medianStatus(km),
      meanObservedDelay,
    };
  }

  // ---- pooled response delay: only the durations that respond in most replicates
  const responsive = byDuration.filter((e) => e.passProbability !== null && e.passProbability > MOST_REPLICATES);
  const responsiveSet = new Set(responsive.map((e) => e.duration));
  const pooled = (parts: Float64Array[]) => mergeSorted(parts.filter((_, g) => responsiveSet.has(durations[g])));
  const pooledObserved = pooled(groupObserved);
  const pooledCensored = pooled(groupCensored);
  const delayCoverage = coverage(byDuration, responsive, pooledObserved.length + pooledCensored.length);
  const pooledDelay = summarizeSortedDelayTimes(pooledObserved, pooledCensored);
  let passedTotal = 0;
  let nOffCensored = 0;
  for (const i of rows) {
    if (passedAt(i)) passedTotal++;
    if (offKind[i] === 2) nOffCensored++;
  }
  // the observed OFF delays are each duration's, sorted for its median (offKind 1: passed with an OFF delay)
  const offCensored = new Float64Array(nOffCensored);
  for (let k = 0, c = 0; k < rows.length; k++) {
    const i = rows[k];
    if (offKind[i] === 2) offCensored[c++] = offTime[i];
  }
  const offDelaySummary = summarizeSortedDelayTimes(mergeSorted(groupOffObserved), offCensored.sort());

  // ---- widths and pulse generation (evaluable pulses)
  const widths = mergeSorted(groupWidths);
  const fwhmBuf = new Float64Array(rows.length);
  let nFwhm = 0;
  const peakAboveBaseline = new Float64Array(rows.length);
  for (let k = 0; k < rows.length; k++) {
    const i = rows[k];
    const fwhm = nullable(at(i, F.fwhm));
    if (fwhm !== null) fwhmBuf[nFwhm++] = fwhm;
    peakAboveBaseline[k] = at(i, F.peak) - at(i, F.baseline);
  }
  const pulseGeneration = {
    pulses: rows.length,
    peak: describeSorted(mergeSorted(groupPeaks)),
    peakAboveBaseline: describeInPlace(peakAboveBaseline),
    timeToPeak: describeInPlace(column(rows, F.timeToPeak)),
    fwhm: describeInPlace(fwhmBuf.subarray(0, nFwhm)),
    fwhmNotMeasurable: rows.length - nFwhm,
  };

  // ---- output noise from per-replicate moments (law of total variance)
  const moments = replicates.filter((r) => Number.isFinite(r.outputMean) && Number.isFinite(r.outputVar));
  let noiseSummary: RunSummary["noise"];
  {
    const means = moments.map((r) => r.outputMean);
    const m = means.length ? mean(means) : NaN;
    const within = moments.length ? mean(moments.map((r) => r.outputVar)) : NaN;
    const between = means.length ? mean(means.map((x) => (x - m) * (x - m))) : NaN;
    const variance = within + between;
    noiseSummary = {
      replicates: moments.length,
      meanOutput: finite(m),
      variance: finite(variance),
      cv: m > 0 ? finite(Math.sqrt(variance) / m) : null,
      fano: m > 0 ? finite(variance / m) : null,
      perReplicateMean: describe(means),
      perReplicateFano: describe(moments.filter((r) => r.outputMean > 0).map((r) => r.outputVar / r.outputMean)),
    };
  }

  // ---- counts and notes
  if (input.settings) notes.push(...input.settings.warnings);
  const capped = replicates.filter((r) => r.capped).length;
  const events = replicates.reduce((s, r) => s + r.events, 0);
  if (capped > 0)
    notes.push(`${capped} of ${replicates.length} replicates stopped at the event cap; their figures end at the cap.`);
  if (excludedTotal > 0) {
    notes.push(
      `${excludedTotal} of ${nPulses} pulses started with the output already above threshold and are left out of pass and delay figures.`,
    );
  }
  if (replicates.length > moments.length && !input.measuredTraces) {
    notes.push(
      `${replicates.length - moments.length} replicates had no steady-state output moments and are left out of the noise figures.`,
    );
  }

  return {
    schemaVersion: 1,
    threshold,
    ...(input.settings ? { settings: input.settings } : {}),
    noiseDurationMinutes,
    counts: {
      replicates: replicates.length,
      cappedReplicates: capped,
      events: { total: events, meanPerReplicate: replicates.length ? events / replicates.length : null },
      pulses: nPulses,
      evaluable: rows.length,
      excluded: excludedTotal,
      passed: passedTotal,
    },
    byDuration,
    d50: d50Verdict.kind === "estimate" ? d50Verdict.d50 : null,
    d50Ci: d50Verdict.kind === "estimate" ? [d50Verdict.low, d50Verdict.high] : null,
    d50Note: d50Verdict.kind === "estimate" ? null : d50Verdict.reason,
    passCurveD50: d50Verdict,
    logistic: {
      intercept: fit.intercept,
      slopePerLogMinute: fit.slopePerLogMinute,
      slopeAtD50PerMinute: fit.slopeAtD50PerMinute,
      d50Ci: fit.d50Ci,
      converged: fit.converged,
      fitted: fit.fitted,
      d50: fit.d50,
      goodnessOfFit,
    },
    falsePassRate: falsePass ? falsePass.rate : null,
    falsePass,
    delay: pooledDelay,
    delayCoverage,
    offDelay: offDelaySummary,
    delayCost,
    widths: { summary: describeSorted(widths), histogram: histogram(widths) },
    pulseGeneration,
    noise: noiseSummary,
    notes,
  };
}

/** Which durations the pooled delay covers, in words (DelayCoverageSchema). */
function coverage(all: ByDurationEntry[], responsive: ByDurationEntry[], pulses: number): DelayCoverage {
  const durations = responsive.map((e) => e.duration);
  const leftOut = all.filter((e) => !responsive.includes(e)).map((e) => e.duration);
  const tried = all.filter((e) => e.pulses > 0);
  let text: string;
  if (responsive.length === 0) {
    const best = tried.reduce<ByDurationEntry | null>(
      (b, e) => (b === null || (e.passProbability ?? 0) > (b.passProbability ?? 0) ? e : b),
      null,
    );
    text =
      best === null
        ? "No evaluable pulses: no pooled delay."
        : `No pulse duration passed in most replicates (highest pass probability ${fmt(100 * (best.passProbability ?? 0))}% at ${fmt(best.duration)} min): no pooled delay; see the delay per duration.`;
  } else {
    const idx = responsive.map((e) => tried.indexOf(e));
    const contiguous = idx.every((k, i) => i === 0 || k === idx[i - 1] + 1);
    const what =
      durations.length === 1
        ? `Pulses of ${fmt(durations[0])} min`
        : contiguous
          ? `Pulses of ${fmt(durations[0])} to ${fmt(durations[durations.length - 1])} min`
          : `Pulses of ${durations.slice(0, -1).map(fmt).join(", ")} and ${fmt(durations[durations.length - 1])} min`;
    text = `${what} (${durations.length} of ${tried.length} durations, ${pulses} pulses), the durations passed in more than half of the pulses.`;
  }
  return { durations, leftOut, pulses, text };
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : String(Number(x.toPrecision(4)));
}
