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
import { describe, describeSorted, mean, medianSorted, noNaN } from "@/sim/stats/describe";
import { mergeSorted } from "@/sim/stats/merge-sorted";
import { histogram } from "@/sim/stats/histogram";
import { kaplanMeierOfSortedTimes, kmQuantile, kmQuantileInterval } from "@/sim/stats/kaplan-meier";
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
  const summary = createRunSummaryBuilder({
    windowMinutes: input.threshold.windowMinutes,
    endTimeMinutes: input.endTimeMinutes ?? Infinity,
  });
  summary.add(pulseTable(input.pulses));
  return summary.finish(input);
}

/** Samples sorted a chunk at a time, merged as they come (two runs when the older is no longer than the newer). */
class SortedRuns {
  private runs: Float64Array[] = [];
  /** A chunk's values, sorted here (in place). */
  push(values: Float64Array): void {
    if (values.length === 0) return;
    const runs = this.runs;
    runs.push(values.sort());
    while (runs.length >= 2 && runs[runs.length - 2].length <= runs[runs.length - 1].length) {
      const b = runs.pop()!;
      runs.push(mergeSorted([runs.pop()!, b]));
    }
  }
  /** Every value pushed, in Float64Array sort order (the order sorting them all at once gives). */
  merged(): Float64Array {
    return mergeSorted(this.runs);
  }
}

/** One pulse duration's records so far. */
interface DurationGroup {
  pulses: number;
  passed: number;
  excluded: number;
  observed: SortedRuns;
  censored: SortedRuns;
  widths: SortedRuns;
  peaks: SortedRuns;
  offObserved: SortedRuns;
}

export type RunSummaryBuilder = ReturnType<typeof createRunSummaryBuilder>;

/**
 * summarizeRun fed the records a chunk at a time (whole replicates each, in record order), as the server's
 * finalising thread receives them, so that the sorting (most of a summary's cost) happens while the run still
 * computes: each chunk's samples are sorted as they come and merged with the earlier ones, and finish only
 * merges what is left. Every figure of docs/metrics.md takes sorted samples (their order of summation is the
 * sorted one) or sums in record order, so the summary is byte for byte summarizeRun's for any split into
 * chunks (tests/sim/analysis/pulse-table.test.ts); the checks summarizeRun makes (NaN samples,
 * non-finite delays) are made at finish, in its order, with its messages.
 */
export function createRunSummaryBuilder(opts: { windowMinutes: number; endTimeMinutes: number }) {
  const { windowMinutes, endTimeMinutes } = opts;
  const normalizeDuration = durationNormalizer();
  let lastBin = NaN;
  let lastDuration = NaN;
  const groups = new Map<number, DurationGroup>();
  let lastKey = NaN;
  let lastGroup: DurationGroup | undefined;
  const groupOf = (d: number): DurationGroup => {
    if (d === lastKey && lastGroup !== undefined) return lastGroup;
    let g = groups.get(d);
    if (g === undefined)
      groups.set(
        d,
        (g = {
          pulses: 0,
          passed: 0,
          excluded: 0,
          observed: new SortedRuns(),
          censored: new SortedRuns(),
          widths: new SortedRuns(),
          peaks: new SortedRuns(),
          offObserved: new SortedRuns(),
        }),
      );
    lastKey = d;
    lastGroup = g;
    return g;
  };
  let nPulses = 0;
  let excludedTotal = 0;
  let evaluable = 0;
  let passedTotal = 0;
  let nFwhm = 0;
  // the evaluable records' duration and delay, in record order, a chunk each (the delay cost sums in that order)
  const rowDurations: Float64Array[] = [];
  const rowDelays: Float64Array[] = [];
  const rowObserved: Uint8Array[] = [];
  const offCensored = new SortedRuns();
  const fwhm = new SortedRuns();
  const peakAboveBaseline = new SortedRuns();
  const timeToPeak = new SortedRuns();
  let finished = false;

  return {
    windowMinutes,
    endTimeMinutes,
    /** Records [from, to) of t (default all), whole replicates, after every record added before. */
    add(t: PulseTable, from = 0, to: number = t.length): void {
      if (finished) throw new Error("summary already finished");
      const a = t.numbers;
      const ws = t.widths;
      const wStart = t.widthStart;
      const at = (i: number, field: number) => a[i * PULSE_FIELDS + field];
      const nullable = (x: number): number | null => (Number.isNaN(x) ? null : x);
      const ends = windowEndsOfTable(t, windowMinutes, endTimeMinutes, from, to);
      const n = to - from;
      nPulses += n;
      // ---- per record: survival observations for the response delay and the OFF delay; the chunk's
      // evaluable records by duration (record order)
      const duration = new Float64Array(n);
      const delayTime = new Float64Array(n);
      const delayEvent = new Uint8Array(n);
      const offTime = new Float64Array(n);
      const offKind = new Uint8Array(n);
      const rowList: number[] = [];
      const chunkGroups = new Map<DurationGroup, number[]>();
      for (let k = 0; k < n; k++) {
        const i = from + k;
        // records come in runs of one duration: the last one's normalised value is reused (=== as the cache's key)
        const bin = at(i, F.durationBin);
        if (bin !== lastBin) {
          lastBin = bin;
          lastDuration = normalizeDuration(bin);
        }
        duration[k] = lastDuration;
        const g = groupOf(lastDuration);
        if (at(i, F.excluded) === 1) {
          excludedTotal++;
          g.excluded++;
          continue;
        }
        const delay = nullable(at(i, F.delay));
        if (delay !== null) {
          delayTime[k] = delay;
          delayEvent[k] = 1;
        } else delayTime[k] = Math.max(0, ends[k] - at(i, F.on));
        if (at(i, F.passed) === 1) {
          const offDelay = nullable(at(i, F.offDelay));
          if (offDelay !== null) {
            offTime[k] = offDelay;
            offKind[k] = 1;
          } else {
            offTime[k] = Math.max(0, ends[k] - at(i, F.off));
            offKind[k] = 2;
          }
        }
        rowList.push(k);
        let list = chunkGroups.get(g);
        if (list === undefined) chunkGroups.set(g, (list = []));
        list.push(k);
      }
      const rows = Int32Array.from(rowList);
      evaluable += rows.length;
      const rowDuration = new Float64Array(rows.length);
      const rowDelay = new Float64Array(rows.length);
      const rowEvent = new Uint8Array(rows.length);
      let nOffCensored = 0;
      let chunkFwhm = 0;
      for (let r = 0; r < rows.length; r++) {
        const k = rows[r];
        rowDuration[r] = duration[k];
        rowDelay[r] = delayTime[k];
        rowEvent[r] = delayEvent[k];
        if (at(from + k, F.passed) === 1) passedTotal++;
        if (offKind[k] === 2) nOffCensored++;
        if (!Number.isNaN(at(from + k, F.fwhm))) chunkFwhm++;
      }
      rowDurations.push(rowDuration);
      rowDelays.push(rowDelay);
      rowObserved.push(rowEvent);
      // ---- each duration's samples of this chunk, sorted into the group's
      for (const [g, list] of chunkGroups) {
        g.pulses += list.length;
        let nObserved = 0;
        let nOff = 0;
        let nWidths = 0;
        for (const k of list) {
          nObserved += delayEvent[k];
          if (offKind[k] === 1) nOff++;
          nWidths += wStart[from + k + 1] - wStart[from + k];
        }
        const observed = new Float64Array(nObserved);
        const censored = new Float64Array(list.length - nObserved);
        const off = new Float64Array(nOff);
        const widths = new Float64Array(nWidths);
        const peaks = new Float64Array(list.length);
        let o = 0;
        let c = 0;
        let f = 0;
        let w = 0;
        for (let q = 0; q < list.length; q++) {
          const k = list[q];
          const i = from + k;
          if (delayEvent[k] === 1) observed[o++] = delayTime[k];
          else censored[c++] = delayTime[k];
          if (at(i, F.passed) === 1) {
            g.passed++;
            if (offKind[k] === 1) off[f++] = offTime[k];
          }
          for (let j = wStart[i]; j < wStart[i + 1]; j++) widths[w++] = ws[j];
          peaks[q] = at(i, F.peak);
        }
        g.observed.push(observed);
        g.censored.push(censored);
        g.offObserved.push(off);
        g.widths.push(widths);
        g.peaks.push(peaks);
      }
      // ---- the run's samples over every evaluable record
      const offC = new Float64Array(nOffCensored);
      const fw = new Float64Array(chunkFwhm);
      const above = new Float64Array(rows.length);
      const toPeak = new Float64Array(rows.length);
      for (let r = 0, c = 0, f = 0; r < rows.length; r++) {
        const k = rows[r];
        const i = from + k;
        if (offKind[k] === 2) offC[c++] = offTime[k];
        const x = nullable(at(i, F.fwhm));
        if (x !== null) fw[f++] = x;
        above[r] = at(i, F.peak) - at(i, F.baseline);
        toPeak[r] = at(i, F.timeToPeak);
      }
      nFwhm += chunkFwhm;
      offCensored.push(offC);
      fwhm.push(fw);
      peakAboveBaseline.push(above);
      timeToPeak.push(toPeak);
    },

    /** The summary of every record added (the input's pulses are not read: they were added). */
    finish(input: Omit<SummarizeRunInput, "pulses">): RunSummary {
      if (finished) throw new Error("summary already finished");
      finished = true;
      if (input.threshold.windowMinutes !== windowMinutes || (input.endTimeMinutes ?? Infinity) !== endTimeMinutes)
        throw new Error("summary builder made for another window or end time");
      return finishSummary(input, {
        groups,
        nPulses,
        excludedTotal,
        evaluable,
        passedTotal,
        nFwhm,
        rowDurations,
        rowDelays,
        rowObserved,
        offCensored,
        fwhm,
        peakAboveBaseline,
        timeToPeak,
      });
    },
  };
}

interface Gathered {
  groups: Map<number, DurationGroup>;
  nPulses: number;
  excludedTotal: number;
  evaluable: number;
  passedTotal: number;
  nFwhm: number;
  rowDurations: Float64Array[];
  rowDelays: Float64Array[];
  rowObserved: Uint8Array[];
  offCensored: SortedRuns;
  fwhm: SortedRuns;
  peakAboveBaseline: SortedRuns;
  timeToPeak: SortedRuns;
}

function finishSummary(input: Omit<SummarizeRunInput, "pulses">, s: Gathered): RunSummary {
  const { replicates, noiseDurationMinutes } = input;
  const { nPulses, excludedTotal, passedTotal } = s;
  const th = input.threshold;
  const threshold: ThresholdUsed = {
    theta: th.theta,
    downTheta: th.downTheta,
    hysteresis: th.hysteresis,
    windowMinutes: th.windowMinutes,
    outputLifetimeMinutes: finite(th.outputLifetimeMinutes),
  };
  const notes: string[] = [];

  // ---- by duration: each duration's samples, sorted for its medians and its Kaplan-Meier curve, merged below
  // into the whole run's and the pooled ones (every evaluable record is in one duration)
  const durations = [...s.groups.keys()].sort((x, y) => x - y);
  const groupWidths: Float64Array[] = [];
  const groupPeaks: Float64Array[] = [];
  const groupObserved: Float64Array[] = [];
  const groupCensored: Float64Array[] = [];
  const groupOffObserved: Float64Array[] = [];
  const byDuration: ByDurationEntry[] = durations.map((d) => {
    const g = s.groups.get(d)!;
    const n = g.pulses;
    const observed = g.observed.merged();
    const censored = g.censored.merged();
    const km = kaplanMeierOfSortedTimes(observed, censored);
    const widthSample = g.widths.merged();
    const peakSample = g.peaks.merged();
    const offSample = g.offObserved.merged();
    groupWidths.push(widthSample);
    groupPeaks.push(peakSample);
    groupObserved.push(observed);
    groupCensored.push(censored);
    groupOffObserved.push(offSample);
    return {
      duration: d,
      pulses: n,
      passed: g.passed,
      passProbability: n > 0 ? g.passed / n : null,
      ci: n > 0 ? wilson(g.passed, n) : null,
      medianDelay: n > 0 ? kmQuantile(km, 0.5) : null,
      medianDelayCi: n > 0 ? kmQuantileInterval(km, 0.5) : [null, null],
      medianDelayStatus: medianStatus(km),
      censored: km.censored,
      excluded: g.excluded,
      medianWidth: medianSorted(widthSample),
      medianPeak: medianSorted(peakSample),
      medianOffDelay: medianSorted(offSample),
    };
  });

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
  for (let c = 0; c < s.rowDurations.length; c++) {
    const duration = s.rowDurations[c];
    const delay = s.rowDelays[c];
    const observed = s.rowObserved[c];
    for (let r = 0; r < duration.length; r++) {
      if (!(duration[r] >= longMin)) continue;
      longPulses++;
      if (observed[r] === 1) {
        longResponded++;
        longDelaySum += delay[r];
      }
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
  // the observed OFF delays are each duration's, sorted for its median
  const offDelaySummary = summarizeSortedDelayTimes(mergeSorted(groupOffObserved), s.offCensored.merged());

  // ---- widths and pulse generation (evaluable pulses)
  const widths = mergeSorted(groupWidths);
  const pulseGeneration = {
    pulses: s.evaluable,
    peak: describeSorted(mergeSorted(groupPeaks)),
    peakAboveBaseline: describeSorted(noNaN(s.peakAboveBaseline.merged())),
    timeToPeak: describeSorted(noNaN(s.timeToPeak.merged())),
    fwhm: describeSorted(noNaN(s.fwhm.merged())),
    fwhmNotMeasurable: s.evaluable - s.nFwhm,
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
      evaluable: s.evaluable,
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
