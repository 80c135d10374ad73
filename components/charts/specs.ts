/** Builders from API data to ChartSpecs (no drawing here). */
import type { Palette } from "@/components/theme/tokens";
import type { ChartRow, ChartSpec } from "./chart-spec";
import {
  formatInterval,
  formatNumber,
  formatPValue,
  formatProbability,
  formatQuantity,
  formatReached,
} from "@/shared/number-format";
import { isotonicRegression } from "@/sim/stats/isotonic-regression";
import type { RunSummary, Comparison } from "@/shared/schemas/analysis";
import type { RunSeries } from "@/shared/schemas/api-runs";
import type { PreviewProgramResponse } from "@/shared/schemas/api-programs";

/** Step samples of a piecewise-constant signal from [on, off) pulses, on a grid of `times`. */
export function signalOnGrid(times: number[], pulses: { on: number; off: number; level: number }[]): number[] {
  return times.map((t) => {
    let v = 0;
    for (const p of pulses) if (t >= p.on && t < p.off) v = Math.max(v, p.level);
    return v;
  });
}

/**
 * Rows of a piecewise-constant signal drawn as steps: level 0 from time 0, then each switch. Drawn with
 * curve "stepAfter", so the level holds until the next switch (no ramp from 0 to the first pulse).
 */
export function stepRows(switches: { t: number; level: number }[], end: number, key = "level"): ChartRow[] {
  const rows: ChartRow[] = [{ x: 0, [key]: 0 }];
  let prev = 0;
  for (const s of switches) {
    if (s.t > end) break;
    if (s.t <= 0) {
      rows[0][key] = s.level;
    } else rows.push({ x: s.t, [key]: s.level });
    prev = s.level;
  }
  rows.push({ x: end, [key]: prev });
  return rows;
}

/** The preview of an input program: the signal level over time (a step plot). */
export function programPreviewSpec(preview: PreviewProgramResponse, c: Palette): ChartSpec {
  const end = preview.endTimeMinutes;
  const rows = stepRows(
    preview.switchTimes.map((t, i) => ({ t, level: preview.levels[i] })),
    end,
  );
  const n = preview.pulses.length;
  const durations = [...new Set(preview.pulses.map((p) => Math.round((p.off - p.on) * 100) / 100))].sort(
    (a, b) => a - b,
  );
  return {
    title: "Input signal preview",
    description: `${n} pulse${n === 1 ? "" : "s"} before ${formatQuantity(end, "minutes")}; durations ${durations
      .slice(0, 8)
      .map((d) => formatNumber(d))
      .join(", ")}${durations.length > 8 ? "…" : ""} minutes.`,
    xLabel: "Time (min)",
    yLabel: "Signal level",
    rows,
    layers: [
      { type: "area", key: "level", color: c.series[0], opacity: 0.25, curve: "stepAfter" },
      { type: "line", key: "level", color: c.series[0], width: 2, curve: "stepAfter" },
    ],
    legend: [{ label: "Input signal", color: c.series[0] }],
    xDomain: [0, end],
    height: 160,
  };
}

/** Logistic pass probability at duration d from the fitted intercept and slope per ln-minute. */
function logisticAt(summary: RunSummary, d: number): number | null {
  const { intercept, slopePerLogMinute, converged } = summary.logistic;
  if (!converged || intercept === null || slopePerLogMinute === null || d <= 0) return null;
  return 1 / (1 + Math.exp(-(intercept + slopePerLogMinute * Math.log(d))));
}

/** Points of a smooth curve on a grid of n x values between lo and hi (log-spaced when log). */
function grid(lo: number, hi: number, n: number, log: boolean): number[] {
  return Array.from({ length: n }, (_, i) =>
    log ? lo * Math.pow(hi / lo, i / (n - 1)) : lo + ((hi - lo) * i) / (n - 1),
  );
}

/** Linear interpolation of ys over xs at x (on log x when log); null outside. */
function interpolate(xs: number[], ys: number[], x: number, log: boolean): number | null {
  for (let i = 0; i + 1 < xs.length; i++) {
    if (x >= xs[i] && x <= xs[i + 1]) {
      const t = log
        ? (Math.log(x) - Math.log(xs[i])) / (Math.log(xs[i + 1]) - Math.log(xs[i]))
        : (x - xs[i]) / (xs[i + 1] - xs[i]);
      return ys[i] + t * (ys[i + 1] - ys[i]);
    }
  }
  return x === xs[xs.length - 1] ? ys[ys.length - 1] : null;
}

/** Wide enough a range of durations to read on a log axis. */
function wantsLog(xs: number[]): boolean {
  return xs.length > 1 && xs[0] > 0 && xs[xs.length - 1] / xs[0] >= 8;
}

/** The d50 verdict in a sentence for chart descriptions and images. */
export function d50Sentence(summary: RunSummary): string {
  const v = summary.passCurveD50;
  if (v.kind === "estimate")
    return `d50 ${formatQuantity(v.d50, "min")} (95% interval ${formatNumber(v.low)}–${formatQuantity(v.high, "min")}, tried durations) from the monotone pass curve.`;
  return `No d50: ${v.reason}`;
}

/**
 * Filter curve: pass probability at each tried input pulse duration as a point with its Wilson 95% interval,
 * the monotone (pool-adjacent-violators) estimate as a dotted segment between tried durations (broken where
 * the durations straddling 50% are too far apart to give a d50), and the logistic smooth when it converged,
 * with a warning when it fits poorly. No line is drawn through the points themselves.
 */
export function filterCurveSpec(summary: RunSummary, c: Palette): ChartSpec {
  const entries = summary.byDuration.filter((e) => e.passProbability !== null && e.pulses > 0 && e.duration > 0);
  const xs = entries.map((e) => e.duration);
  const logX = wantsLog(xs);
  const mono = entries.length
    ? isotonicRegression(
        entries.map((e) => e.passed / e.pulses),
        entries.map((e) => e.pulses),
      )
    : [];
  const v = summary.passCurveD50;
  const gap = v.kind === "not-estimable" ? v.between : null;
  const monoAt = (x: number) => (gap && x > gap[0] && x < gap[1] ? null : interpolate(xs, mono, x, logX));
  const rows: ChartRow[] = entries.map((e, i) => ({
    x: e.duration,
    pass: e.passProbability,
    lo: e.ci ? e.ci[0] : e.passProbability,
    hi: e.ci ? e.ci[1] : e.passProbability,
    mono: mono[i],
  }));
  const fitOk = summary.logistic.converged && entries.length > 1;
  if (entries.length > 1) {
    // Fill-in rows for the smooth and for the break in the monotone segment; they have no point and no interval.
    for (const x of grid(xs[0], xs[xs.length - 1], 48, logX)) {
      if (xs.includes(x)) continue;
      rows.push({
        x,
        pass: null,
        lo: null,
        hi: null,
        mono: monoAt(x),
        ...(fitOk ? { fit: logisticAt(summary, x) } : {}),
      });
    }
    if (fitOk) for (const r of rows) if (r.fit === undefined) r.fit = logisticAt(summary, r.x);
    rows.sort((p, q) => p.x - q.x);
  }
  const gof = summary.logistic.goodnessOfFit;
  const poor = !!gof?.poorFit;
  const notes: string[] = [d50Sentence(summary)];
  if (fitOk && poor && gof)
    notes.push(
      `The logistic smooth fits poorly (Pearson chi-square ${formatNumber(gof.chiSquare)} on ${gof.df} df, ${formatPValue(gof.pValue)}): do not read d50 from it.`,
    );
  if (gap) notes.push(`No durations were tried between ${formatNumber(gap[0])} and ${formatQuantity(gap[1], "min")}.`);
  return {
    title: "Filter curve",
    description: `Pass probability for ${entries.length} input durations: ${entries
      .map(
        (e) =>
          `${formatQuantity(e.duration, "min")}: ${formatProbability(e.passProbability)} (${formatInterval(e.ci, "%")})`,
      )
      .join("; ")}. ${d50Sentence(summary)}`,
    xLabel: logX ? "Input pulse duration (min, log scale)" : "Input pulse duration (min)",
    yLabel: "Pass probability",
    rows,
    layers: [
      ...(fitOk
        ? [{ type: "line" as const, key: "fit", color: c.series[1], width: 1.5, opacity: poor ? 0.5 : 0.9 }]
        : []),
      { type: "line", key: "mono", color: c.series[0], width: 1.5, dashed: true },
      { type: "errorBars", lower: "lo", upper: "hi", color: c.series[0], width: 1.5 },
      { type: "points", key: "pass", color: c.series[0], radius: 4 },
    ],
    legend: [
      { label: "Pass fraction with Wilson 95% interval", color: c.series[0] },
      { label: "Monotone estimate (between tried durations)", color: c.series[0], dashed: true },
      ...(fitOk ? [{ label: poor ? "Logistic smooth (poor fit)" : "Logistic smooth", color: c.series[1] }] : []),
    ],
    yDomain: [0, 1],
    logX,
    notes,
    height: 240,
  };
}

/** Thins a series to at most maxPoints by taking every k-th point (keeps the last). */
function thinIndices(n: number, maxPoints: number): number[] {
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i);
  const step = Math.ceil(n / maxPoints);
  const out: number[] = [];
  for (let i = 0; i < n; i += step) out.push(i);
  if (out[out.length - 1] !== n - 1) out.push(n - 1);
  return out;
}

/** Mean output with a ±1 SD band, the ODE solution, and the input signal scaled to the plot. */
export function meanBandSpec(series: RunSeries, c: Palette): ChartSpec | null {
  const out = series.species.find((s) => s.name === series.outputSpecies) ?? series.species[0];
  if (!out || series.times.length === 0) return null;
  const idx = thinIndices(series.times.length, 400);
  const top = Math.max(1, ...idx.map((i) => out.mean[i] + out.sd[i]), ...(out.ode ? idx.map((i) => out.ode![i]) : []));
  const input = signalOnGrid(series.times, series.input.pulses);
  const inputMax = Math.max(1e-9, ...input);
  const rows: ChartRow[] = idx.map((i) => ({
    x: series.times[i],
    mean: out.mean[i],
    lo: Math.max(0, out.mean[i] - out.sd[i]),
    hi: out.mean[i] + out.sd[i],
    ...(out.ode ? { ode: out.ode[i] } : {}),
    input: (input[i] / inputMax) * top * 0.25,
  }));
  return {
    title: `Mean ${out.name} with SD band`,
    description: `Mean of ${out.name} over replicates, shaded one standard deviation either side${out.ode ? ", with the deterministic (ODE) solution" : ""}; the input signal is drawn at the bottom, scaled.`,
    xLabel: "Time (min)",
    yLabel: `${out.name} (molecules)`,
    rows,
    layers: [
      { type: "area", key: "input", color: c.series[2], opacity: 0.18, curve: "stepAfter" },
      { type: "band", lower: "lo", upper: "hi", color: c.series[0], opacity: 0.2 },
      { type: "line", key: "mean", color: c.series[0], width: 2 },
      ...(out.ode ? [{ type: "line" as const, key: "ode", color: c.series[1], width: 1.5 }] : []),
    ],
    legend: [
      { label: "Mean", color: c.series[0] },
      { label: "±1 SD", color: c.primarySoft },
      ...(out.ode ? [{ label: "ODE", color: c.series[1] }] : []),
      { label: "Input (scaled)", color: c.series[2] },
    ],
    height: 240,
  };
}

/** A few sample trajectories of the output over the input signal, with the threshold. */
export function trajectoriesSpec(series: RunSeries, c: Palette, maxTrajectories = 4): ChartSpec | null {
  const trajs = series.trajectories.slice(0, maxTrajectories).filter((t) => t.values[series.outputSpecies]);
  if (!trajs.length) return null;
  const idx = thinIndices(series.times.length, 400);
  let top = 1;
  for (const t of trajs) for (const i of idx) top = Math.max(top, t.values[series.outputSpecies][i] ?? 0);
  const input = signalOnGrid(series.times, series.input.pulses);
  const inputMax = Math.max(1e-9, ...input);
  const rows: ChartRow[] = idx.map((i) => {
    const r: ChartRow = { x: series.times[i], input: (input[i] / inputMax) * top * 0.25 };
    trajs.forEach((t, k) => (r[`r${k}`] = t.values[series.outputSpecies][i] ?? null));
    if (series.threshold) r.theta = series.threshold.theta;
    return r;
  });
  const colors = [c.series[0], c.series[3], c.series[4], c.series[5]];
  return {
    title: `Sample trajectories of ${series.outputSpecies}`,
    description: `${trajs.length} simulated replicates of ${series.outputSpecies} over time, with the input pulses drawn at the bottom${series.threshold ? ` and the threshold at ${formatQuantity(series.threshold.theta, "molecules")}` : ""}.`,
    xLabel: "Time (min)",
    yLabel: `${series.outputSpecies} (molecules)`,
    rows,
    layers: [
      { type: "area", key: "input", color: c.series[2], opacity: 0.18, curve: "stepAfter" },
      ...trajs.map((_, k) => ({
        type: "line" as const,
        key: `r${k}`,
        color: colors[k % colors.length],
        width: 1.25,
        curve: "stepAfter" as const,
      })),
      ...(series.threshold ? [{ type: "line" as const, key: "theta", color: c.series[1], width: 1 }] : []),
    ],
    legend: [
      ...trajs.map((t, k) => ({ label: `Replicate ${t.replicate}`, color: colors[k % colors.length] })),
      ...(series.threshold ? [{ label: "Threshold", color: c.series[1] }] : []),
      { label: "Input (scaled)", color: c.series[2] },
    ],
    height: 240,
  };
}

/** Histogram of observed response delays; censored pulses are stated in the description. */
export function delayHistogramSpec(summary: RunSummary, c: Palette): ChartSpec | null {
  const h = summary.delay.histogram;
  if (!h.counts.length) return null;
  const rows: ChartRow[] = h.counts.map((n, k) => ({ x: (h.edges[k] + h.edges[k + 1]) / 2, count: n }));
  return {
    title: "Response delay histogram",
    description: `${summary.delay.responded} responses in ${h.counts.length} bins from ${formatNumber(h.edges[0])} to ${formatQuantity(h.edges[h.edges.length - 1], "minutes")}; ${summary.delay.censored} pulses had no response in their window (not drawn). Median delay ${formatReached(summary.delay.median, "min")}.`,
    xLabel: "Response delay (min)",
    yLabel: "Pulses",
    rows,
    layers: [{ type: "bars", key: "count", color: c.series[0] }],
    legend: [{ label: `Observed delays (${summary.delay.censored} censored not shown)`, color: c.series[0] }],
    yDomain: [0, Math.max(1, ...h.counts)],
    height: 200,
  };
}

/**
 * Filter curves of 2-4 runs overlaid: each run's pass fractions as points with a Wilson 95% band, joined by a
 * dotted segment (the band and segment break at durations the run did not try).
 */
export function compareFilterSpec(cmp: Comparison, c: Palette): ChartSpec {
  const curves = cmp.filterCurves.filter((f) => f.duration > 0);
  const rows: ChartRow[] = curves.map((fc) => {
    const r: ChartRow = { x: fc.duration };
    fc.runs.forEach((e, k) => {
      const p = e && e.pulses > 0 ? e.passProbability : null;
      r[`p${k}`] = p;
      r[`lo${k}`] = p === null ? null : (e!.ci?.[0] ?? p);
      r[`hi${k}`] = p === null ? null : (e!.ci?.[1] ?? p);
    });
    return r;
  });
  const xs = curves.map((f) => f.duration);
  const logX = wantsLog(xs);
  const missing = cmp.runs
    .map((run, k) => ({
      run,
      none: curves.filter((f) => !f.runs[k] || f.runs[k]!.pulses === 0).map((f) => f.duration),
    }))
    .filter((m) => m.none.length);
  return {
    title: "Filter curves compared",
    description: cmp.runs
      .map(
        (r, k) =>
          `${r.name}: ${curves
            .map((f) => {
              const e = f.runs[k];
              return `${formatQuantity(f.duration, "min")} ${e && e.pulses > 0 ? `${formatProbability(e.passProbability)} (${formatInterval(e.ci, "%")})` : "not tried"}`;
            })
            .join(", ")}`,
      )
      .join(". "),
    xLabel: logX ? "Input pulse duration (min, log scale)" : "Input pulse duration (min)",
    yLabel: "Pass probability",
    rows,
    layers: [
      ...cmp.runs.map((_, k) => ({
        type: "band" as const,
        lower: `lo${k}`,
        upper: `hi${k}`,
        color: c.series[k],
        opacity: 0.14,
      })),
      ...cmp.runs.flatMap((_, k) => [
        { type: "line" as const, key: `p${k}`, color: c.series[k], width: 1.5, dashed: true },
        { type: "points" as const, key: `p${k}`, color: c.series[k], radius: 4 },
      ]),
    ],
    legend: [
      ...cmp.runs.map((r, k) => ({ label: r.name, color: c.series[k] })),
      { label: "Shaded: Wilson 95% band", color: c.border },
    ],
    notes: missing.map(
      (m) =>
        `${m.run.name} did not try ${m.none.map((d) => formatQuantity(d, "min")).join(", ")}: its curve has a gap there.`,
    ),
    yDomain: [0, 1],
    logX,
    height: 240,
  };
}

/** Delay distributions of 2-4 runs on shared bins (as fractions, so run sizes compare). */
export function compareDelaySpec(cmp: Comparison, c: Palette): ChartSpec | null {
  const d = cmp.distributions.delays;
  if (d.edges.length < 2) return null;
  const rows: ChartRow[] = d.edges.slice(0, -1).map((e, k) => {
    const r: ChartRow = { x: (e + d.edges[k + 1]) / 2 };
    d.runs.forEach((run, j) => {
      const total = run.counts.reduce((a, b) => a + b, 0);
      r[`f${j}`] = total ? run.counts[k] / total : 0;
    });
    return r;
  });
  return {
    title: "Response delays compared",
    description:
      cmp.runs.map((r, j) => `${r.name}: ${d.runs[j].censored} censored`).join("; ") +
      ". Fractions of observed delays per bin.",
    xLabel: "Response delay (min)",
    yLabel: "Fraction of responses",
    rows,
    layers: cmp.runs.map((_, j) => ({
      type: "line" as const,
      key: `f${j}`,
      color: c.series[j],
      width: 2,
      curve: "stepAfter" as const,
    })),
    legend: cmp.runs.map((r, j) => ({ label: r.name, color: c.series[j] })),
    height: 200,
  };
}

export type SweepFigure = "d50" | "falsePassRate" | "medianDelay" | "peak" | "fano";
type SweepPointLike = {
  values: Record<string, number>;
  status: string;
  figures: {
    d50: number | null;
    falsePassRate: number | null;
    medianDelay: number | null;
    peak: number | null;
    fano: number | null;
    intervals?: {
      d50: [number, number] | null;
      falsePassRate: [number, number] | null;
      medianDelay: [number | null, number | null] | null;
    };
    reasons?: Record<string, string | null>;
  } | null;
};

/** How a sweep figure is written: probabilities as percent, minutes with their unit. */
export function formatSweepFigure(f: SweepFigure, v: number | null | undefined): string {
  if (f === "falsePassRate") return formatProbability(v);
  if (f === "d50" || f === "medianDelay") return formatQuantity(v, "min");
  if (f === "peak") return formatQuantity(v, "molecules");
  return formatNumber(v);
}

/**
 * One sweep figure over a one-parameter sweep: a point per swept value with its 95% interval where the figure
 * has one; a point without a value is a gap (the line breaks there) and its reason is listed in the notes.
 */
export function sweepLineSpec(
  parameter: string,
  sweptValues: number[],
  points: SweepPointLike[],
  figure: SweepFigure,
  figLabel: string,
  c: Palette,
): ChartSpec | null {
  const all = points
    .map((p) => {
      const v = p.figures ? p.figures[figure] : null;
      const iv = figure === "peak" || figure === "fano" ? null : (p.figures?.intervals?.[figure] ?? null);
      const lo = iv && typeof iv[0] === "number" ? iv[0] : null;
      // A Kaplan-Meier upper end that is not reached is drawn to the top of the chart's data (open-ended).
      const hi = iv && typeof iv[1] === "number" ? iv[1] : null;
      const reason =
        v === null
          ? (p.figures?.reasons?.[figure] ?? (p.figures ? "not estimable" : `no results (${p.status})`))
          : null;
      return { x: p.values[parameter], y: v, lo: v === null ? null : lo, hi: v === null ? null : hi, reason };
    })
    .sort((a, b) => a.x - b.x);
  if (!all.some((r) => r.y !== null)) return null;
  const xs = [...sweptValues].sort((a, b) => a - b);
  const xMin = xs[0];
  const xMax = xs[xs.length - 1];
  const logX = xs.length > 1 && xMin > 0 && xMax / xMin >= 8;
  const hasIntervals = all.some((r) => r.lo !== null && r.hi !== null);
  const rows: ChartRow[] = all.map((r) => ({ x: r.x, y: r.y, lo: r.lo, hi: r.hi }));
  const gaps = all.filter((r) => r.y === null);
  const intervalLabel =
    figure === "d50"
      ? "95% interval (tried durations)"
      : figure === "falsePassRate"
        ? "Wilson 95% interval"
        : "Kaplan-Meier 95% interval";
  return {
    title: `${figLabel} over ${parameter}`,
    // pairs are read "x: y; x: y", so a reason's own semicolons become commas
    description: all
      .map(
        (r) =>
          `${parameter} ${formatNumber(r.x)}: ${r.y === null ? `no value (${(r.reason ?? "not estimable").replace(/;\s*/g, ", ")})` : formatSweepFigure(figure, r.y)}`,
      )
      .join("; "),
    xLabel: logX ? `${parameter} (log scale)` : parameter,
    yLabel: figLabel,
    rows,
    layers: [
      { type: "line", key: "y", color: c.series[0], width: 2 },
      ...(hasIntervals ? [{ type: "errorBars" as const, lower: "lo", upper: "hi", color: c.series[0] }] : []),
      { type: "points", key: "y", color: c.series[0], radius: 4 },
    ],
    legend: [
      { label: figLabel, color: c.series[0] },
      ...(hasIntervals ? [{ label: intervalLabel, color: c.series[0] }] : []),
    ],
    notes: gaps.map((g) => `No value at ${parameter} = ${formatNumber(g.x)}: ${g.reason}. Drawn as a gap.`),
    logX,
    xDomain: xMax > xMin ? [xMin, xMax] : undefined,
  };
}
