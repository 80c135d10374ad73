/**
 * The record-based summary and per-replicate figures as they were before the
 * finalising thread held pulses as columns (sim/analysis/pulse-table.ts), kept
 * frozen as the reference the column-based code must equal byte for byte
 * (tests/sim/analysis/pulse-table.test.ts). Not used by the product.
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import type {
  ByDurationEntry,
  DelayCoverage,
  RunSettingsBlock,
  RunSummary,
  ThresholdUsed,
} from "@/shared/schemas/analysis";
import { describe, mean } from "@/sim/stats/describe";
import { histogram } from "@/sim/stats/histogram";
import { kaplanMeier, kmQuantile, kmQuantileInterval, type SurvivalObservation } from "@/sim/stats/kaplan-meier";
import { fitLogisticPass } from "@/sim/stats/logistic-fit";
import { logisticGoodnessOfFit } from "@/sim/stats/logistic-goodness-of-fit";
import { wilson } from "@/sim/stats/wilson-interval";
import { medianStatus, summarizeDelays } from "@/sim/analysis/delay-summary";
import { passCurveD50 } from "@/sim/analysis/pass-curve-d50";
import { windowEnds } from "@/sim/analysis/pulse-selection";
import { durationNormalizer } from "@/sim/analysis/normalize-duration";
import { MAX_REPLICATE_FIGURES, type ReplicateFigures } from "@/sim/regimes/replicate-figures";

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
  pulses: readonly PulseStat[];
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
const MOST_REPLICATES = 0.5;

const finite = (x: number | null | undefined): number | null =>
  x !== null && x !== undefined && Number.isFinite(x) ? x : null;
const medianOf = (xs: number[]): number | null => describe(xs).median;

export function summarizeRunByRecords(input: SummarizeRunInput): RunSummary {
  const { pulses, replicates, noiseDurationMinutes } = input;
  const th = input.threshold;
  const threshold: ThresholdUsed = {
    theta: th.theta,
    downTheta: th.downTheta,
    hysteresis: th.hysteresis,
    windowMinutes: th.windowMinutes,
    outputLifetimeMinutes: finite(th.outputLifetimeMinutes),
  };
  const normalizeDuration = durationNormalizer();
  const ends = windowEnds(pulses, th.windowMinutes, input.endTimeMinutes ?? Infinity);
  const notes: string[] = [];

  // ---- per pulse: survival observations for the response delay and the OFF delay
  type Row = { p: PulseStat; delayObs: SurvivalObservation; offObs: SurvivalObservation | null };
  const rows: Row[] = [];
  let excludedTotal = 0;
  pulses.forEach((p, i) => {
    if (p.excluded) {
      excludedTotal++;
      return;
    }
    const delayObs: SurvivalObservation =
      p.delay !== null ? { time: p.delay, event: true } : { time: Math.max(0, ends[i] - p.on), event: false };
    const offObs: SurvivalObservation | null = !p.passed
      ? null
      : p.offDelay !== null
        ? { time: p.offDelay, event: true }
        : { time: Math.max(0, ends[i] - p.off), event: false };
    rows.push({ p, delayObs, offObs });
  });

  // ---- by duration
  const groups = new Map<number, { rows: Row[]; excluded: number }>();
  for (const p of pulses) {
    const d = normalizeDuration(p.durationBin);
    if (!groups.has(d)) groups.set(d, { rows: [], excluded: 0 });
    if (p.excluded) groups.get(d)!.excluded++;
  }
  for (const r of rows) groups.get(normalizeDuration(r.p.durationBin))!.rows.push(r);
  const durations = [...groups.keys()].sort((a, b) => a - b);
  const byDuration: ByDurationEntry[] = durations.map((duration) => {
    const g = groups.get(duration)!;
    const n = g.rows.length;
    const passed = g.rows.filter((r) => r.p.passed).length;
    const km = kaplanMeier(g.rows.map((r) => r.delayObs));
    const offDelays = g.rows.filter((r) => r.p.passed && r.p.offDelay !== null).map((r) => r.p.offDelay as number);
    return {
      duration,
      pulses: n,
      passed,
      passProbability: n > 0 ? passed / n : null,
      ci: n > 0 ? wilson(passed, n) : null,
      medianDelay: n > 0 ? kmQuantile(km, 0.5) : null,
      medianDelayCi: n > 0 ? kmQuantileInterval(km, 0.5) : [null, null],
      medianDelayStatus: medianStatus(km),
      censored: km.censored,
      excluded: g.excluded,
      medianWidth: medianOf(g.rows.flatMap((r) => r.p.widths)),
      medianPeak: medianOf(g.rows.map((r) => r.p.peak)),
      medianOffDelay: medianOf(offDelays),
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
  const longRows = rows.filter((r) => normalizeDuration(r.p.durationBin) >= longMin);
  let delayCost: RunSummary["delayCost"] = null;
  if (longRows.length > 0) {
    const km = kaplanMeier(longRows.map((r) => r.delayObs));
    const observed = longRows.filter((r) => r.p.delay !== null).map((r) => r.p.delay as number);
    delayCost = {
      minDurationMinutes: longMin,
      durations: withPulses.filter((e) => e.duration >= longMin).map((e) => e.duration),
      pulses: longRows.length,
      responded: observed.length,
      medianDelay: kmQuantile(km, 0.5),
      medianDelayCi: kmQuantileInterval(km, 0.5),
      medianDelayStatus: medianStatus(km),
      meanObservedDelay: observed.length ? mean(observed) : null,
    };
  }

  // ---- pooled response delay: only the durations that respond in most replicates
  const responsive = byDuration.filter((e) => e.passProbability !== null && e.passProbability > MOST_REPLICATES);
  const responsiveSet = new Set(responsive.map((e) => e.duration));
  const pooledRows = rows.filter((r) => responsiveSet.has(normalizeDuration(r.p.durationBin)));
  const delayCoverage = coverage(byDuration, responsive, pooledRows.length);

  // ---- widths and pulse generation (evaluable pulses)
  const widths = rows.flatMap((r) => r.p.widths);
  const fwhms = rows.map((r) => r.p.fwhm).filter((x): x is number => x !== null);
  const pulseGeneration = {
    pulses: rows.length,
    peak: describe(rows.map((r) => r.p.peak)),
    peakAboveBaseline: describe(rows.map((r) => r.p.peak - r.p.baseline)),
    timeToPeak: describe(rows.map((r) => r.p.timeToPeak)),
    fwhm: describe(fwhms),
    fwhmNotMeasurable: rows.length - fwhms.length,
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
      `${excludedTotal} of ${pulses.length} pulses started with the output already above threshold and are left out of pass and delay figures.`,
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
      pulses: pulses.length,
      evaluable: rows.length,
      excluded: excludedTotal,
      passed: rows.filter((r) => r.p.passed).length,
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
    delay: summarizeDelays(pooledRows.map((r) => r.delayObs)),
    delayCoverage,
    offDelay: summarizeDelays(rows.filter((r) => r.offObs !== null).map((r) => r.offObs as SurvivalObservation)),
    delayCost,
    widths: { summary: describe(widths), histogram: histogram(widths) },
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

export function replicateFiguresByRecords(
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
