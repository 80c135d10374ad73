/**
 * CSV exports of a run (RFC 4180 via papaparse's unparse): per-pulse records,
 * per-replicate statistics, the figures by duration, and the headline figures
 * as metric,value rows. Empty cell = not defined (null); numbers are written
 * at full precision; text cells pass through csvCell (formula injection); rows in a fixed order so the same input gives the same bytes.
 */
import Papa from "papaparse";
import { csvCell } from "@/shared/csv-cell";
import type { RunSummary } from "@/shared/schemas/analysis";
import type { PulseStat } from "@/shared/schemas/run-spec";
import { describe } from "@/sim/stats/describe";
import type { ReplicateTotals } from "./summarize-run";

type Cell = string | number | boolean | null;

function toCsv(fields: string[], rows: Cell[][]): string {
  const clean = rows.map((r) =>
    r.map((c) =>
      c === null || (typeof c === "number" && !Number.isFinite(c)) ? "" : typeof c === "string" ? csvCell(c) : c,
    ),
  );
  return Papa.unparse({ fields, data: clean }, { newline: "\n" }) + "\n";
}

/** One row per (replicate, input pulse); widths joined with ";". */
export function pulseStatsCsv(pulses: readonly PulseStat[]): string {
  const fields = [
    "replicate",
    "pulseIndex",
    "on",
    "off",
    "durationBin",
    "excluded",
    "passed",
    "delay",
    "offDelay",
    "widths",
    "peak",
    "timeToPeak",
    "fwhm",
    "baseline",
  ];
  const rows = [...pulses]
    .sort((a, b) => a.replicate - b.replicate || a.pulseIndex - b.pulseIndex)
    .map((p) => [
      p.replicate,
      p.pulseIndex,
      p.on,
      p.off,
      p.durationBin,
      p.excluded,
      p.passed,
      p.delay,
      p.offDelay,
      p.widths.join(";"),
      p.peak,
      p.timeToPeak,
      p.fwhm,
      p.baseline,
    ]);
  return toCsv(fields, rows);
}

/** One row per replicate: simulation totals, output moments and its pulse figures. */
export function replicateStatsCsv(pulses: readonly PulseStat[], replicates: readonly ReplicateTotals[]): string {
  const fields = [
    "replicate",
    "events",
    "capped",
    "outputMean",
    "outputVar",
    "fano",
    "pulses",
    "evaluable",
    "excluded",
    "passed",
    "passFraction",
    "medianObservedDelay",
    "outputPulses",
    "medianWidth",
  ];
  const byRep = new Map<number, PulseStat[]>();
  for (const p of pulses) {
    if (!byRep.has(p.replicate)) byRep.set(p.replicate, []);
    byRep.get(p.replicate)!.push(p);
  }
  const reps = [...replicates].sort((a, b) => a.replicate - b.replicate);
  const rows = reps.map((r) => {
    const ps = byRep.get(r.replicate) ?? [];
    const ev = ps.filter((p) => !p.excluded);
    const passed = ev.filter((p) => p.passed).length;
    const delays = ev.map((p) => p.delay).filter((d): d is number => d !== null);
    const widths = ev.flatMap((p) => p.widths);
    return [
      r.replicate,
      r.events,
      r.capped,
      r.outputMean,
      r.outputVar,
      r.outputMean > 0 ? r.outputVar / r.outputMean : null,
      ps.length,
      ev.length,
      ps.length - ev.length,
      passed,
      ev.length ? passed / ev.length : null,
      describe(delays).median,
      widths.length,
      describe(widths).median,
    ];
  });
  return toCsv(fields, rows);
}

/** The filter curve and per-duration figures, one row per duration. */
export function byDurationCsv(summary: RunSummary): string {
  const fields = [
    "duration",
    "pulses",
    "passed",
    "passProbability",
    "ciLow",
    "ciHigh",
    "fittedPassProbability",
    "medianDelay",
    "medianDelayCiLow",
    "medianDelayCiHigh",
    "censored",
    "excluded",
    "medianWidth",
    "medianPeak",
    "medianOffDelay",
  ];
  const rows = summary.byDuration.map((e) => [
    e.duration,
    e.pulses,
    e.passed,
    e.passProbability,
    e.ci ? e.ci[0] : null,
    e.ci ? e.ci[1] : null,
    summary.logistic.fitted.find((f) => f.duration === e.duration)?.passProbability ?? null,
    e.medianDelay,
    e.medianDelayCi[0],
    e.medianDelayCi[1],
    e.censored,
    e.excluded,
    e.medianWidth,
    e.medianPeak,
    e.medianOffDelay,
  ]);
  return toCsv(fields, rows);
}

/** Headline figures as metric,value rows (units in the metric name). */
export function summaryCsv(summary: RunSummary): string {
  const s = summary;
  const rows: Cell[][] = [
    ["thresholdMolecules", s.threshold.theta],
    ["downThresholdMolecules", s.threshold.downTheta],
    ["hysteresis", s.threshold.hysteresis],
    ["windowMinutes", s.threshold.windowMinutes],
    ["outputLifetimeMinutes", s.threshold.outputLifetimeMinutes],
    ["noiseDurationMinutes", s.noiseDurationMinutes],
    ["replicates", s.counts.replicates],
    ["cappedReplicates", s.counts.cappedReplicates],
    ["eventsTotal", s.counts.events.total],
    ["pulseRecords", s.counts.pulses],
    ["evaluablePulses", s.counts.evaluable],
    ["excludedPulses", s.counts.excluded],
    ["passedPulses", s.counts.passed],
    ["d50Minutes", s.d50],
    ["d50CiLowMinutes", s.d50Ci ? s.d50Ci[0] : null],
    ["d50CiHighMinutes", s.d50Ci ? s.d50Ci[1] : null],
    ["d50Note", s.d50Note],
    ["logisticSlopePerLogMinute", s.logistic.slopePerLogMinute],
    ["logisticSlopeAtD50PerMinute", s.logistic.slopeAtD50PerMinute],
    ["falsePassRate", s.falsePassRate],
    ["falsePassCiLow", s.falsePass ? s.falsePass.ci[0] : null],
    ["falsePassCiHigh", s.falsePass ? s.falsePass.ci[1] : null],
    ["medianDelayMinutes", s.delay.median],
    ["medianDelayCiLowMinutes", s.delay.medianCi[0]],
    ["medianDelayCiHighMinutes", s.delay.medianCi[1]],
    ["censoredPulses", s.delay.censored],
    ["medianOffDelayMinutes", s.offDelay.median],
    ["delayCostMinDurationMinutes", s.delayCost ? s.delayCost.minDurationMinutes : null],
    ["delayCostMedianDelayMinutes", s.delayCost ? s.delayCost.medianDelay : null],
    ["medianWidthMinutes", s.widths.summary.median],
    ["medianPeakMolecules", s.pulseGeneration.peak.median],
    ["medianTimeToPeakMinutes", s.pulseGeneration.timeToPeak.median],
    ["medianFwhmMinutes", s.pulseGeneration.fwhm.median],
    ["meanOutputMolecules", s.noise.meanOutput],
    ["outputCv", s.noise.cv],
    ["outputFano", s.noise.fano],
  ];
  return toCsv(["metric", "value"], rows);
}
