/**
 * The section-5 pulse figures of uploaded single-cell traces, per cell and per
 * input pulse, through the same tracker the simulations use
 * (pulseStatsFromSampledTrace in sim/metrics/pulse-tracker.ts) and the same
 * summary (summarizeRun in sim/analysis, cells as replicates).
 *
 * - Threshold in trace units for cell c: b_c + s x theta (theta in molecules,
 *   s trace units per molecule, b_c the cell's background); the down level is
 *   b_c + s x theta x (1 - h). Peaks and baselines stay in trace units.
 * - Coverage: a cell is only scored on pulses it watched whole: on >= its first
 *   frame and the response window end (min(off + window, next on)) <= its last
 *   frame. Other pulses are listed as skipped ("notCovered"), so a cell that
 *   starts late or ends early neither counts as a miss nor as a pass.
 * - Gaps (see preprocess.ts) are never interpolated across: a crossing inside a
 *   gap is dated at the first frame after it (so its delay is an upper bound).
 *   Each record carries the longest gap inside its window; with maxGapMinutes
 *   set, pulses with a longer gap are skipped ("gap").
 *
 * @example analyseTraces(cells, [{ on: 30, off: 90 }], { thresholdMolecules: 50, ... })
 */
import type { PulseStat } from "@/shared/schemas/run-spec";
import type { CellMetrics, TraceAnalysis, TracePulse, TraceSettings } from "@/shared/schemas/api-traces";
import { pulseStatsFromSampledTrace, type TrackedPulse } from "@/sim/metrics/pulse-tracker";
import { summarizeRun } from "@/sim/analysis/summarize-run";
import { prepareCells, resolveScale, type PreparedCell, type RawCell } from "./preprocess";

export type TracePulseStat = PulseStat & { longestGapMinutes: number };

/** Pulses sorted by on, with durationBin filled in. */
export function trackedPulses(schedule: readonly TracePulse[]): TrackedPulse[] {
  return [...schedule]
    .sort((a, b) => a.on - b.on)
    .map((p) => ({ on: p.on, off: p.off, durationBin: p.durationBin ?? roundBin(p.off - p.on) }));
}

function roundBin(d: number): number {
  return Math.round(d * 1e6) / 1e6;
}

/** Window end of each pulse: min(off + window, next on). */
export function pulseWindowEnds(pulses: readonly TrackedPulse[], windowMinutes: number): number[] {
  return pulses.map((p, i) => Math.min(p.off + windowMinutes, i + 1 < pulses.length ? pulses[i + 1].on : Infinity));
}

/** Longest gap (minutes between the valid frames around a NaN marker) overlapping [from, to]. */
function longestGap(c: PreparedCell, from: number, to: number): number {
  let best = 0;
  for (let i = 1; i + 1 < c.times.length; i++) {
    if (c.values[i] === c.values[i]) continue;
    const a = c.times[i - 1];
    const b = c.times[i + 1];
    if (b > from && a < to) best = Math.max(best, b - a);
  }
  return best;
}

/** Pulse figures of one prepared cell (records of covered pulses only) and the skipped pulses. */
export function cellMetrics(
  c: PreparedCell,
  index: number,
  pulses: readonly TrackedPulse[],
  settings: TraceSettings,
  unitsPerMolecule: number,
): CellMetrics {
  const theta = c.background + unitsPerMolecule * settings.thresholdMolecules;
  const downTheta = c.background + unitsPerMolecule * settings.thresholdMolecules * (1 - settings.hysteresis);
  let first = NaN;
  let last = NaN;
  for (let i = 0; i < c.times.length; i++) {
    if (c.values[i] !== c.values[i]) continue;
    if (first !== first) first = c.times[i];
    last = c.times[i];
  }
  const ends = pulseWindowEnds(pulses, settings.windowMinutes);
  const records = pulseStatsFromSampledTrace(
    c.times,
    c.values,
    pulses,
    { theta, downTheta, windowMinutes: settings.windowMinutes },
    index,
  );
  const byIndex = new Map(records.map((r) => [r.pulseIndex, r]));
  const kept: TracePulseStat[] = [];
  const skipped: CellMetrics["skipped"] = [];
  pulses.forEach((p, i) => {
    const r = byIndex.get(i);
    if (!r || p.on < first || ends[i] > last) {
      skipped.push({ pulseIndex: i, reason: "notCovered" });
      return;
    }
    const gap = longestGap(c, p.on, ends[i]);
    if (settings.maxGapMinutes !== undefined && gap > settings.maxGapMinutes) {
      skipped.push({ pulseIndex: i, reason: "gap" });
      return;
    }
    kept.push({ ...r, longestGapMinutes: gap });
  });
  return {
    cell: c.cell,
    points: c.points,
    firstMinute: first,
    lastMinute: last,
    gaps: c.gaps,
    background: c.background,
    thresholdTraceUnits: theta,
    pulses: kept,
    skipped,
  };
}

/** Full analysis of a trace set: preprocessing, per-cell figures and the pooled summary. */
export function analyseTraces(
  cells: readonly RawCell[],
  schedule: readonly TracePulse[],
  settings: TraceSettings,
): { analysis: TraceAnalysis; prepared: PreparedCell[] } {
  const pulses = trackedPulses(schedule);
  const prepared = prepareCells(cells, pulses.length ? pulses[0].on : null, {
    background: settings.background,
    smoothing: settings.smoothing,
    gapFactor: settings.gapFactor,
  });
  const scale = resolveScale(settings.scale, prepared.cells, schedule);
  const perCell = prepared.cells.map((c, i) => cellMetrics(c, i, pulses, settings, scale.unitsPerMolecule));
  const all: PulseStat[] = perCell.flatMap((c) => c.pulses.map(({ longestGapMinutes: _g, ...r }) => r));
  const bgs = perCell.map((c) => c.background).sort((a, b) => a - b);
  const bgMedian = bgs.length ? bgs[bgs.length >> 1] : 0;
  const analysis = summarizeRun({
    pulses: all,
    replicates: perCell.map((_, i) => ({ replicate: i, events: 0, capped: false, outputMean: NaN, outputVar: NaN })),
    threshold: {
      theta: bgMedian + scale.unitsPerMolecule * settings.thresholdMolecules,
      downTheta: bgMedian + scale.unitsPerMolecule * settings.thresholdMolecules * (1 - settings.hysteresis),
      hysteresis: settings.hysteresis,
      windowMinutes: settings.windowMinutes,
    },
    noiseDurationMinutes: settings.noiseDurationMinutes,
    measuredTraces: true,
  });
  return {
    prepared: prepared.cells,
    analysis: {
      frameIntervalMinutes: prepared.frameIntervalMinutes,
      scaleUnitsPerMolecule: scale.unitsPerMolecule,
      scaleNote: scale.note,
      cells: perCell,
      summary: {
        cells: perCell.length,
        pulsesAnalysed: all.length,
        skippedNotCovered: perCell.reduce((s, c) => s + c.skipped.filter((k) => k.reason === "notCovered").length, 0),
        skippedGap: perCell.reduce((s, c) => s + c.skipped.filter((k) => k.reason === "gap").length, 0),
        analysis,
      },
    },
  };
}

/** Pulse records of an analysis, pooled over cells (the observed sample for matching). */
export function pooledPulses(analysis: TraceAnalysis): PulseStat[] {
  return analysis.cells.flatMap((c) => c.pulses.map(({ longestGapMinutes: _g, ...r }) => r));
}

/** Cells for charts: at most maxPoints samples per cell (every k-th), gaps as null. */
export function chartCells(
  cells: readonly PreparedCell[],
  maxPoints: number,
): { cell: string; times: number[]; values: (number | null)[] }[] {
  return cells.map((c) => {
    const n = c.times.length;
    const step = Math.max(1, Math.ceil(n / maxPoints));
    const times: number[] = [];
    const values: (number | null)[] = [];
    for (let i = 0; i < n; i++) {
      const v = c.values[i];
      // keep every gap marker so a chart never draws a line across a gap
      if (i % step !== 0 && v === v && i !== n - 1) continue;
      times.push(c.times[i]);
      values.push(v === v ? v : null);
    }
    return { cell: c.cell, times, values };
  });
}
